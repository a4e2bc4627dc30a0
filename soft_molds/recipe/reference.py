"""The recipe reference (every key, unit, default, allowed range) as Markdown, generated
from the same field lists that validate recipes; README.md embeds it and a test keeps the
two identical (``soft-molds reference`` prints it, ``soft-molds reference --update README.md``
rewrites the README's copy)."""

from __future__ import annotations

from .fields import Field
from .registry import body_kinds, void_kinds
from .schema import BLOCKS, TOP_FIELDS


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
    return rows


def reference_markdown() -> str:
    out = ["### Top level", "", *_table(TOP_FIELDS), "",
           "`body` (one mapping with `kind`) and `voids` (a list of 1-16 mappings with "
           "`kind`) are required; every other block is optional.", ""]
    for kind, cls in body_kinds().items():
        out += [f"### `body` kind `{kind}`", "", " ".join((cls.__doc__ or "").split()),
                "", *_table(cls.FIELDS), ""]
    for kind, cls in void_kinds().items():
        out += [f"### `voids[]` kind `{kind}`", "",
                " ".join((cls.__doc__ or "").split()), "", *_table(cls.FIELDS), ""]
    for block, fields in BLOCKS.items():
        out += [f"### `{block}`", "", *_table(fields), ""]
    return "\n".join(out).rstrip() + "\n"


START = "<!-- recipe-reference:start (generated: soft-molds reference --update README.md) -->"
END = "<!-- recipe-reference:end -->"


def splice(document: str) -> str:
    """``document`` with the text between the reference markers replaced by the current
    reference."""
    head, rest = document.split(START, 1)
    _, tail = rest.split(END, 1)
    return f"{head}{START}\n\n{reference_markdown()}\n{END}{tail}"


if __name__ == "__main__":
    print(reference_markdown(), end="")
