"""The recipe reference (every key, unit, default, allowed range) as Markdown, generated
from the same field lists that validate recipes; README.md embeds it and a test keeps the
two identical (``soft-molds reference`` prints it, ``soft-molds reference --update README.md``
rewrites the README's copy)."""

from __future__ import annotations

from .fields import MIN_SIZE_MM, Field
from .load import SCALE_HINT_BELOW_MM
from .registry import body_kinds, void_kinds
from .schema import BLOCKS, LIST_BLOCKS, MAX_INLETS, TOP_FIELDS


def _default(f: Field) -> str:
    if f.required:
        return "required"
    if f.default is None:
        return "derived"
    if isinstance(f.default, tuple):
        return "[" + ", ".join(f"{x:g}" for x in f.default) + "]"
    if isinstance(f.default, float):
        return f"{f.default:g}"
    return f"`{f.default}`" if f.default != "" else '""'


def _table(fields: tuple[Field, ...]) -> list[str]:
    rows = ["| key | meaning | default | allowed |", "|---|---|---|---|"]
    for f in fields:
        rows.append(f"| `{f.name}` | {f.doc} | {_default(f)} | {f.allowed()} |")
    for f in fields:
        if f.kind == "records":
            rows += ["", f"Each item of `{f.name}`:", "", *_table(f.fields)]
    return rows


_NUMBERS = (
    "Lengths are millimetres (a body under {hint:g} mm across is reported as likely typed in "
    "centimetres) and none lies between 0 and {floor:g} mm. Values are read as YAML 1.1 "
    "with these deliberate exceptions: exponent forms without a dot or sign (`1e3`, "
    "`2.5e-3`) are numbers, as in YAML 1.2; base-60 forms (`1:00`, which YAML 1.1 reads as "
    "60) and leading-zero octal (`010`, read as 8) are refused, as are numbers beyond the "
    "range of a double (`1e400`); quote such text (`'1:00'`). Indent with spaces: a tab is "
    "refused. A `material.table_file` is read with the same limits as a recipe (size, "
    "nesting, aliases, one document, a regular file) and its values get the same ranges as "
    "the `material` block's."
)


def reference_markdown() -> str:
    numbers = _NUMBERS.format(hint=SCALE_HINT_BELOW_MM, floor=MIN_SIZE_MM)
    out = [numbers, "", "### Top level", "", *_table(TOP_FIELDS), "",
           "`body` (one mapping with `kind`) and `voids` (a list of 1-16 mappings with "
           "`kind`) are required; every other block is optional.", ""]
    for kind, cls in body_kinds().items():
        out += [f"### `body` kind `{kind}`", "", " ".join((cls.__doc__ or "").split()),
                "", *_table(cls.FIELDS), ""]
    for kind, vcls in void_kinds().items():
        out += [f"### `voids[]` kind `{kind}`", "",
                " ".join((vcls.__doc__ or "").split()), "", *_table(vcls.FIELDS), ""]
    for block, fields in BLOCKS.items():
        out += [f"### `{block}`", "", *_table(fields), ""]
    for block in LIST_BLOCKS:
        out += [f"### `{block}[]`", "",
                f"Instead of `inlet`, a list of 1 to {MAX_INLETS} inlet blocks with the "
                "fields above (`center_mm` required but for the first on the start face). "
                "Every group of joined voids opens into exactly one socket and gets its own "
                "core, pulled out through that socket; the parting plane runs through every "
                "socket centre.", ""]
    return "\n".join(out).rstrip() + "\n"


START = ("<!-- recipe-reference:start (generated: .venv/bin/soft-molds reference --update "
         "README.md) -->")
END = "<!-- recipe-reference:end -->"


def splice(document: str) -> str:
    """``document`` with the text between the reference markers replaced by the current
    reference."""
    head, rest = document.split(START, 1)
    _, tail = rest.split(END, 1)
    return f"{head}{START}\n\n{reference_markdown()}\n{END}{tail}"


if __name__ == "__main__":
    print(reference_markdown(), end="")
