"""Write the stored corpus of recipe mutants (tests/data/mutants/corpus.json).

Run it again after a field declaration, a bundled recipe or a validation rule changes:

    PYTHONPATH=. python tests/make_mutant_corpus.py

The mutants come from the field declarations (``soft_molds/recipe/fields.py``, the body and
void kinds' ``FIELDS``, the settings blocks of ``schema.py``), applied to the bundled
recipes with a seeded generator, so the same code writes the same corpus. Each mutant's
expected outcome is either

- ``declared``: the new value breaks the field's declaration (wrong type, out of its
  range, NaN or infinity, an unknown key, a block of the wrong shape, a missing required
  key) or is text a YAML reader refuses (a tab, a duplicate key, a base-60 or octal
  number, a number beyond a double): it must be refused, naming the field (or the
  document, for a syntax error) on the line the emitter wrote it, saying what the
  declaration allows; worked out here from the declarations, then checked against the
  loader (a disagreement stops the generator: it is a bug to fix, not to record);
- ``recorded``: the value lies inside the declared range, so whether the recipe as a
  whole holds together (walls, cross-checks, the mold's rules) depends on the geometry;
  the loader's answer when the corpus was written is recorded, and the test checks it
  stays the same.

``--check`` compares the mutants this script would write (without running the loader)
with the stored corpus: the test suite runs that to catch a stale corpus.
"""

from __future__ import annotations

import argparse
import json
import math
import random
import sys
import tempfile
from collections import Counter
from dataclasses import asdict, dataclass, replace
from pathlib import Path

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:
    sys.path.insert(0, str(HERE))

from mutants import CORPUS, Mutant, base_document, render  # noqa: E402

from soft_molds.recipe.fields import MAX_POINTS, Field  # noqa: E402
from soft_molds.recipe.registry import body_kinds, void_kinds  # noqa: E402
from soft_molds.recipe.schema import BLOCKS, TOP_FIELDS  # noqa: E402

SEED = 20261203
#: Bases whose body and void fields are mutated (one of each body and void kind); the
#: family adds its variants block. Sizes keep the corpus near 300 mutants, about 30 s of
#: validation on one core.
BASES = ("seedling-finger", "tray-pusher", "plug-bellows", "stem-cushion", "wrist-twister",
         "twin-row-finger", "finger-family", "stem-ring-cuff")
#: Bases on which every change of the menu is tried on the body's first number and the
#: first void's first whole number.
FULL_MENU = ("seedling-finger", "tray-pusher")
#: Shape-changing mutants per base (all of them on the first base).
STRUCTURAL_PER_BASE = 5
BAD_PER_FIELD = 1
IN_RANGE_PER_FIELD = 1
#: In-range changes left out because validating them takes tens of seconds: a bellows of
#: 50 or 100 pleats (the declared top) spends about 17 and 48 s of one core (25 pleats:
#: 6 s) in the distance function of its profile (recipe/primitives.py, Revolved.sdf,
#: called by the bellows fit and the sanity checks), more than this corpus's budget.
SLOW_TO_VALIDATE = {("body.pleats", "at the top"), ("body.pleats", "underscores"),
                    ("body.pleats", "middle")}
BUILD_SAMPLE = 6
BOUNDS = {"at the top", "at the bottom", "just above an open bottom", "gap edge", "zero",
          "both at the bottom"}
CLI_SAMPLE = 10


@dataclass(frozen=True)
class Change:
    why: str
    value: str
    klass: str  # bad (field refuses), part (a part of the value refuses, e.g. a grade's
    # end, named field.part with that part's allowed text), reader (the YAML reader refuses),
    # syntax, in-range


def _num(x: float) -> str:
    """A decimal YAML number for ``x`` (repr keeps every digit; ints stay ints)."""
    if float(x).is_integer() and abs(x) < 1e15:
        return str(int(x))
    return repr(float(x))


def _step(f: Field) -> float:
    """A step just across a bound: small against the bound, never below 0.001."""
    ref = max(abs(f.lo or 0.0), abs(f.hi or 0.0), 1.0)
    return 0.001 * ref if f.kind != "integer" else 1.0


def number_changes(f: Field) -> list[Change]:
    """Changes of a number or whole-number field, from its declaration."""
    lo, hi, step = f.lo, f.hi, _step(f)
    bad = [Change("text", "seventy", "bad"), Change("quoted number", '"12"', "bad"),
           Change("list", "[1, 2]", "bad"), Change("mapping", "{a: 1}", "bad"),
           Change("nan", ".nan", "bad"), Change("inf", ".inf", "bad"),
           Change("-inf", "-.inf", "bad"), Change("null", "~", "bad"),
           Change("bool", "yes", "bad"), Change("huge int", "1" + "0" * 400, "bad"),
           Change("empty string", '""', "bad"), Change("unit in value", "12 mm", "bad"),
           Change("base-60", "1:00", "reader"), Change("octal", "010", "reader"),
           Change("beyond double", "1e400", "reader")]
    inside = []
    if f.kind == "integer":
        bad.append(Change("fraction", "2.5", "bad"))
        inside.append(Change("integer as float", _num(max(lo or 1, 1)) + ".0", "in-range"))
    if hi is not None:
        bad += [Change("above by a step", _num(hi + step), "bad"),
                Change("far above", _num(hi * 10 if hi > 0 else hi + 1000), "bad")]
        inside.append(Change("at the top", _num(hi), "in-range"))
    if f.gap_below > 0.0:
        bad += [Change("inside the gap", _num(f.gap_below / 2), "bad"),
                Change("negative", "-1", "bad")]
        inside += [Change("zero", "0", "in-range"), Change("negative zero", "-0.0", "in-range"),
                   Change("gap edge", _num(f.gap_below), "in-range")]
    elif lo is not None:
        if f.lo_open:
            bad.append(Change("at an open bottom", _num(lo), "bad"))
            inside.append(Change("just above an open bottom", _num(lo + step), "in-range"))
        else:
            bad.append(Change("below by a step", _num(lo - step), "bad"))
            inside.append(Change("at the bottom", _num(lo), "in-range"))
    if lo is not None and hi is not None:
        mid = (lo + hi) / 2
        inside += [Change("middle", _num(mid if f.kind != "integer" else math.floor(mid)),
                          "in-range"),
                   Change("exponent form", f"{(lo + hi) / 4:.3e}".replace("e+0", "e")
                          .replace("e+", "e") if f.kind != "integer" else f"{_num(lo)}e0",
                          "in-range"),
                   Change("underscores", _num(hi)[:1] + "_" + _num(hi)[1:]
                          if len(_num(hi)) > 1 and "." not in _num(hi)[:2] else _num(hi),
                          "in-range")]
    return bad + inside


def text_changes(f: Field) -> list[Change]:
    return [Change("empty string", '""', "bad"), Change("blank", '"   "', "bad"),
            Change("number", "5", "bad"), Change("list", "[a]", "bad"),
            Change("null", "~", "bad"),
            Change("odd text", '"Odd Name!"', "in-range"), Change("long text", '"' + "x" * 70
                                                                  + '"', "in-range")]


def choice_changes(f: Field) -> list[Change]:
    out = [Change("unknown word", "bogus", "bad"), Change("number", "5", "bad"),
           Change("list", f"[{f.choices[0]}]", "bad"), Change("empty string", '""', "bad"),
           Change("bool", "on", "bad")]
    swapped = f.choices[0].swapcase()
    if swapped not in f.choices:
        out.append(Change("wrong case", swapped, "bad"))
    out += [Change(f"choice {c}", c, "in-range") for c in f.choices]
    return out


def pair_changes(f: Field) -> list[Change]:
    lo = f.lo if f.lo is not None else -1000.0
    hi = f.hi if f.hi is not None else 1000.0
    step = _step(f)
    mid = _num((lo + hi) / 2)
    return [Change("one number", "[1]", "bad"), Change("three numbers", "[1, 2, 3]", "bad"),
            Change("text items", "[a, b]", "bad"), Change("scalar", "5", "bad"),
            Change("nan item", "[.nan, 0]", "bad"), Change("mapping", "{y: 0, z: 0}", "bad"),
            Change("below by a step", f"[{_num(lo - step)}, {mid}]", "bad"),
            Change("above by a step", f"[{mid}, {_num(hi + step)}]", "bad"),
            Change("both at the bottom", f"[{_num(lo)}, {_num(lo)}]", "in-range"),
            Change("middle", f"[{mid}, {mid}]", "in-range")]


def points_changes(f: Field) -> list[Change]:
    many = "[" + ", ".join(f"[{i}, 5]" for i in range(MAX_POINTS + 1)) + "]"
    return [Change("empty list", "[]", "bad"), Change("scalar", "5", "bad"),
            Change("short point", "[[0]]", "bad"), Change("text coordinate", "[[0, a], [10, 5]]",
                                                         "bad"),
            Change("negative radius", "[[0, -1], [10, 5]]", "bad"),
            Change("one point", "[[0, 5]]", "bad"),
            Change("inf coordinate", "[[0, .inf], [10, 5]]", "bad"),
            Change("too many points", many, "bad"),
            Change("a straight tube", "[[0, 8], [40, 8]]", "in-range"),
            Change("a cone", "[[0, 10], [30, 6], [40, 0]]", "in-range")]


def rounds_changes(f: Field) -> list[Change]:
    return [Change("negative", "-1", "bad"), Change("text item", "[a]", "bad"),
            Change("empty list", "[]", "bad"), Change("nan", ".nan", "bad"),
            Change("inside the gap", "0.01", "bad"),
            Change("zero", "0", "in-range"), Change("one mm", "1", "in-range")]


def graded_changes(f: Field) -> list[Change]:
    # A list's length and a grade's sizes meet the row's geometry, so those outcomes are
    # recorded; what breaks the declaration itself is refused.
    return [Change("text", "a", "bad"), Change("nan", ".nan", "bad"),
            Change("empty list", "[]", "bad"), Change("negative", "-1", "bad"),
            Change("inside the floor", "0.01", "bad"), Change("grade without its end",
                                                             "{from: 5}", "part"),
            Change("grade of text", "{from: a, to: 5}", "part"),
            Change("grade with a stranger key", "{from: 5, to: 4, by: 1}", "part"),
            Change("one number", "5", "in-range"), Change("a grade", "{from: 6, to: 4}",
                                                          "in-range"),
            Change("a list of two", "[5, 4]", "in-range")]


MENUS = {"number": number_changes, "integer": number_changes, "text": text_changes,
         "choice": choice_changes, "pair": pair_changes, "points": points_changes,
         "rounds": rounds_changes, "graded": graded_changes}


def fields_of(doc: dict) -> list[tuple[str, Field]]:
    """(path, declaration) of every field the base recipe's body and voids have."""
    out = []
    body = doc["body"]
    for f in body_kinds()[body["kind"]].FIELDS:
        out.append((f"body.{f.name}", f))
    for i, v in enumerate(doc["voids"]):
        for f in void_kinds()[v["kind"]].FIELDS:
            out.append((f"voids[{i}].{f.name}", f))
    return out


def settings_fields() -> list[tuple[str, Field]]:
    out = [(f.name, f) for f in TOP_FIELDS]
    for block, fields in BLOCKS.items():
        out += [(f"{block}.{f.name}", f) for f in fields]
    return out


def _misspelt(name: str) -> str:
    return name[:1] + name[2:] if len(name) > 3 else name + "x"


def structural(base: str, doc: dict, rng: random.Random) -> list[tuple]:
    """(op, path, value, why, klass, names) of mutants that change a recipe's shape."""
    body_fields = [p for p, f in fields_of(doc) if p.startswith("body.")]
    required = [p for p, f in fields_of(doc) if p.startswith("body.") and f.required]
    some = rng.choice(body_fields[1:] or body_fields)
    block = rng.choice(sorted(BLOCKS))
    field = rng.choice(BLOCKS[block])
    out = [
        ("set", "colour", '"red"', "unknown top-level key", "bad", ("colour",)),
        ("set", f"{block}.{_misspelt(field.name)}", "5", "misspelt key", "bad",
         (f"{block}.{_misspelt(field.name)}",)),
        ("set", f"body.{_misspelt(some.split('.')[1])}", "5", "misspelt body key", "bad",
         (f"body.{_misspelt(some.split('.')[1])}",)),
        ("set", "inlet.wall_mm", "5", "key in the wrong block", "bad", ("inlet.wall_mm",)),
        ("set", block, "5", "block as a number", "bad", (block,)),
        ("set", block, "[1, 2]", "block as a list", "bad", (block,)),
        ("set", "body", f"[{doc['body']['kind']}]", "body as a list", "bad", ("body",)),
        ("set", "voids", "{kind: bore}", "voids as a mapping", "bad", ("voids",)),
        ("set", "voids", "[]", "no voids", "bad", ("voids",)),
        ("set", "body.kind", f"{doc['body']['kind']}s", "unknown body kind", "bad",
         ("body.kind",)),
        ("set", "voids[0].kind", "cavity", "unknown void kind", "bad", ("voids[0].kind",)),
        ("delete", "body.kind", None, "missing kind", "bad", ("body.kind",)),
        ("delete", "voids", None, "missing voids", "bad", ("voids",)),
        ("tab_value", some, None, "tab after the colon", "syntax", ("",)),
        ("tab_indent", some, None, "tab in the indentation", "syntax", ("",)),
        ("dup", some, "1", "duplicate key", "reader", (some,)),
    ]
    if required:
        r = rng.choice(required)
        out.append(("delete", r, None, "missing required key", "bad", (r,)))
    if "variants" in doc:
        (key, values), = doc["variants"]["vary"].items()
        out += [
            ("set", "variants.vary", f"{{{key}: [{values[0]}, seven]}}",
             "variant value as text", "recorded", ()),
            ("set", "variants.vary", f"{{{_misspelt(key)}: [1, 2]}}",
             "variant of an unknown field", "recorded", ()),
            ("set", "variants", "5", "variants as a number", "recorded", ()),
        ]
    return out


def plan_mutants() -> list[Mutant]:
    """Every mutant and its declared expectation (recorded ones still unknown)."""
    rng = random.Random(SEED)
    out: list[Mutant] = []
    docs = {b: base_document(b) for b in BASES}
    settings = settings_fields()

    def add(base: str, op: str, path: str, value: str | None, why: str, klass: str,
            names: tuple[str, ...] = (), allowed: str | None = None) -> None:
        declared = klass in ("bad", "part", "reader", "syntax")
        if declared and not names:
            names = (path,)
        out.append(Mutant(f"m{len(out) + 1:04d}", base, op, path, value, why,
                          "refused" if declared else "?", "declared" if declared else
                          "recorded", names, allowed))

    def field_mutants(base: str, path: str, f: Field, full: bool = False) -> None:
        changes = MENUS[f.kind](f)
        bad = [c for c in changes if c.klass != "in-range"]
        inside = [c for c in changes if c.klass == "in-range"
                  and (path, c.why) not in SLOW_TO_VALIDATE]
        if not full:
            gap = [c for c in bad if c.why == "inside the gap"]
            bad = rng.sample(bad, min(BAD_PER_FIELD, len(bad)))
            inside = rng.sample(inside, min(IN_RANGE_PER_FIELD, len(inside)))
            # A field with a gap in its range (e.g. "0 or 0.05 to 20") always gets a value
            # inside it: the rarest refusal, and easy to lose to the sample.
            if gap and gap[0] not in bad:
                bad[-1] = gap[0]
        for c in bad + inside:
            add(base, "set", path, c.value, c.why, c.klass,
                allowed=f.allowed() if c.klass == "bad" else None)

    for i, base in enumerate(BASES):
        doc = docs[base]
        own = fields_of(doc) if "variants" not in doc else []
        # Every change of the menu on one number and one whole number: each category once.
        full = set()
        if base in FULL_MENU:
            full = {next(p for p, f in own if f.kind == kind and p.startswith(start))
                    for kind, start in (("number", "body."), ("integer", "voids[0]."))
                    if any(f.kind == kind and p.startswith(start) for p, f in own)}
        for path, f in own:
            field_mutants(base, path, f, full=path in full)
        # The settings' fields are shared out among the recipes, one recipe each.
        for path, f in settings[i::len(BASES)]:
            field_mutants(base, path, f)
        shape = structural(base, doc, rng)
        variants = [s for s in shape if s[1].startswith("variants")]
        if i > 0:
            shape = rng.sample(shape[:len(shape) - len(variants)], STRUCTURAL_PER_BASE)
            shape += variants
        for op, path, value, why, klass, names in shape:
            add(base, op, path, value, why, klass, names)
    return out


def run_one(m: Mutant, folder: Path) -> tuple[str, list[str], list[tuple[str, int | None]]]:
    """("refused" | "accepted", lines, (path, line) of each problem) by the public loader."""
    from soft_molds import RecipeError, load_variants

    text, _, _ = render(m.base, m.op, m.path, m.value)
    f = folder / f"{m.id}.yaml"
    f.write_text(text)
    try:
        load_variants(f)
    except RecipeError as exc:
        return "refused", exc.lines(), [(p.path, p.line) for p in exc.problems]
    return "accepted", [], []


def settle(mutants: list[Mutant]) -> list[Mutant]:
    """Run every mutant through the loader: record the recorded ones, check the declared."""
    rng = random.Random(SEED + 1)
    out, disagree = [], []
    with tempfile.TemporaryDirectory() as tmp:
        for m in mutants:
            outcome, lines, found = run_one(m, Path(tmp))
            if m.basis == "recorded":
                names = tuple(dict.fromkeys(p for p, _ in found))
                m = replace(m, outcome=outcome, names=names)
            elif outcome != "refused" or not any(_names(p, n) for p, _ in found
                                                  for n in m.names):
                disagree.append(f"{m.id} {m.base} {m.op} {m.path} = {m.value!r} ({m.why}): "
                                f"{outcome}; {lines}")
            out.append(m)
    if disagree:
        raise SystemExit("the loader disagrees with the declarations:\n" + "\n".join(disagree))
    build = [m for m in out if m.outcome == "accepted" and m.path.split(".")[0].split("[")[0]
             in ("body", "voids", "inlet", "mold", "marking", "parting")]
    picked: list[Mutant] = []
    for base in BASES:
        # Values at a bound of their declaration stress the kernel most; any other when a
        # recipe has none accepted.
        mine = [m for m in build if m.base == base and m.why in BOUNDS] or \
            [m for m in build if m.base == base]
        if mine and len(picked) < BUILD_SAMPLE:
            picked.append(rng.choice(mine))
    refused = [m for m in out if m.outcome == "refused"]
    cli = rng.sample(refused, min(CLI_SAMPLE, len(refused)))
    marks = {m.id: {"build": True} for m in picked} | {m.id: {"cli": True} for m in cli}
    return [replace(m, extra=marks.get(m.id, {})) for m in out]


def _names(found: str, name: str) -> bool:
    """Whether a problem at path ``found`` names the field ``name`` (or an item or a part
    of it)."""
    return found == name or found.startswith((name + "[", name + "."))


def spec(m: Mutant) -> tuple:
    """What the generator decides without the loader (compared by ``--check``)."""
    return (m.id, m.base, m.op, m.path, m.value, m.why, m.basis,
            m.names if m.basis == "declared" else (), m.allowed)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--check", action="store_true",
                    help="compare with the stored corpus instead of writing it")
    args = ap.parse_args(argv)
    planned = plan_mutants()
    if args.check:
        from mutants import load_corpus

        stored = load_corpus()
        same = [spec(m) for m in planned] == [spec(m) for m in stored]
        print("corpus up to date" if same else "corpus is stale: run "
              "tests/make_mutant_corpus.py")
        return 0 if same else 1
    settled = settle(planned)
    counts = Counter(f"{m.basis} {m.outcome}" for m in settled)
    CORPUS.parent.mkdir(parents=True, exist_ok=True)
    rows = ",\n".join("  " + json.dumps({k: v for k, v in asdict(m).items()
                                         if v not in ((), None, {})}, ensure_ascii=True)
                      for m in settled)
    head = {"generator": "tests/make_mutant_corpus.py", "seed": SEED,
            "count": len(settled), "by_outcome": dict(sorted(counts.items()))}
    CORPUS.write_text('{"about": ' + json.dumps(head) + ',\n "mutants": [\n' + rows
                      + "\n]}\n")
    print(f"wrote {len(settled)} mutants to {CORPUS}: {dict(sorted(counts.items()))}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
