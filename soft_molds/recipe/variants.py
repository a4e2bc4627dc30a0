"""Families of variants: one recipe, several labelled versions printed and cast side by side.

A recipe may hold a ``variants`` block, either explicit::

    variants:
      labels:
        A: {}                                  # the recipe as written
        B:
          voids[0].height_mm: 7                # field path -> value (block style: a flow
                                               # mapping cannot hold "[" in a key)

or a sweep over one or more fields::

    variants:
      vary:
        voids[0].height_mm: [6, 7, 8]          # a list of values
        mold.wall_mm: {from: 4, to: 6, count: 3}   # evenly spaced, both ends included
      combine: product                         # every combination, or zip: in step
      max_variants: 10000                      # refuse bigger sweeps unless raised

Labels are stable: a sweep's variants are numbered in expansion order (``product``: like
nested loops over the fields in the order written, the last field fastest; ``zip``: in
order) and numbered variant i (from 0) is letter ``"ABCDE"[i % 5]`` of family
``i // 5 + 1``. A sweep of at most five variants is labelled ``A``-``E``; a bigger one
``F1-A`` ... ``F1-E``, ``F2-A`` ... . Explicit labels are kept as written and grouped
into families of five in the order written. Rerunning the same recipe gives the same
labels.

The number of variants is worked out from the list lengths and counts (their product, or
the common length for ``zip``) before any value is made, and a plan above
``max_variants`` is refused at once; range ends must be numbers a double can hold.

Every variant is validated like a recipe; its problems carry the variant's label in
their path (``[F2-C] voids[0].height_mm: ...``) and, for a changed field, the line of
the ``variants`` entry that changed it.
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass, replace

from ..errors import Problem, RecipeError
from .yamlsource import Node

LETTERS = "ABCDE"
FAMILY_SIZE = len(LETTERS)
DEFAULT_MAX_VARIANTS = 10_000
HARD_MAX_VARIANTS = 1_000_000
LABEL_RE = re.compile(r"^[A-Z0-9][A-Z0-9-]{0,11}$")
PATH_RE = re.compile(r"^[a-z_][a-z0-9_]*(\[\d+\])?(\.[a-z_][a-z0-9_]*(\[\d+\])?)*$")


@dataclass(frozen=True)
class VariantSpec:
    """One variant: its ``label``, its ``family`` ("" when the recipe makes one family),
    its position ``index`` in the expansion and the ``changes`` (field path, value, line)
    it applies to the recipe as written."""

    label: str
    family: str
    index: int
    changes: tuple[tuple[str, object, int], ...]

    def changed(self) -> dict[str, object]:
        return {p: v for p, v, _ in self.changes}


def sweep_label(i: int, total: int) -> tuple[str, str]:
    """(label, family) of the i-th (0-based) of ``total`` swept variants."""
    letter = LETTERS[i % FAMILY_SIZE]
    if total <= FAMILY_SIZE:
        return letter, ""
    fam = f"F{i // FAMILY_SIZE + 1}"
    return f"{fam}-{letter}", fam


def split_path(path: str) -> list[str | int]:
    """``voids[0].height_mm`` -> ["voids", 0, "height_mm"]."""
    out: list[str | int] = []
    for part in path.split("."):
        m = re.match(r"^([a-z_][a-z0-9_]*)(?:\[(\d+)\])?$", part)
        assert m, path
        out.append(m.group(1))
        if m.group(2) is not None:
            out.append(int(m.group(2)))
    return out


def _plain_node(value: object, line: int) -> Node:
    if isinstance(value, list):
        return Node([_plain_node(v, line) for v in value], line)
    if isinstance(value, dict):
        return Node({k: _plain_node(v, line) for k, v in value.items()}, line, line)
    return Node(value, line, line)


def apply_changes(root: Node, changes, problems: list[Problem], label: str) -> Node:
    """A copy of ``root`` with each (path, value, line) set; missing mappings are added."""
    for path, value, line in changes:
        where = Problem(f"[{label}] {path}", "", line)
        root = _put(root, split_path(path), 0, _plain_node(value, line), where, problems) or root
    return root


def _put(node: Node | None, keys: list[str | int], i: int, new: Node, where: Problem,
         problems: list[Problem]) -> Node | None:
    key, last = keys[i], i == len(keys) - 1
    if isinstance(key, int):
        n = len(node.value) if node is not None and isinstance(node.value, list) else 0
        if node is None or key >= n:
            problems.append(replace(where, message="names a list entry the recipe does not "
                                    "have", allowed=f"an index below {n}"))
            return node
        items = list(node.value) if isinstance(node.value, list) else []
        items[key] = (_with_line(new, items[key]) if last
                      else _put(items[key], keys, i + 1, new, where, problems))
        return replace(node, value=items)
    if node is None:
        node = Node({}, new.line, new.line)
    if not isinstance(node.value, dict):
        problems.append(replace(where, message="goes through a value that is not a mapping",
                                allowed="a path to a field"))
        return node
    entries = dict(node.value)
    entries[key] = new if last else _put(entries.get(key), keys, i + 1, new, where, problems)
    return replace(node, value=entries)


def _with_line(new: Node, old: Node) -> Node:
    return replace(new, key_line=new.key_line if new.key_line is not None else old.key_line)


@dataclass(frozen=True)
class _Axis:
    """One ``vary`` entry: its field path, the line to blame, and either its listed
    ``values`` or an evenly spaced range (``start``, ``stop``, ``size`` values)."""

    path: str
    line: int
    size: int
    values: tuple[object, ...] | None = None
    start: float = 0.0
    stop: float = 0.0

    def materialise(self) -> list[object]:
        if self.values is not None:
            return list(self.values)
        a, b, c = self.start, self.stop, self.size
        if math.isfinite(b - a):
            steps = [a + (b - a) * k / (c - 1) for k in range(c)]
        else:  # ends near the float limit on both sides: b - a overflows, weights do not
            steps = [a * (1.0 - k / (c - 1)) + b * (k / (c - 1)) for k in range(c)]
        # Rounded so that 0.1 steps print as 0.1, not 0.30000000000000004.
        return [round(x, 9) + 0.0 for x in steps]


def _finite(node: Node, path: str, problems: list[Problem]) -> float | None:
    """The number of a range end, or None (a problem added) when it is not a number a
    double can hold."""
    v = node.value
    if not isinstance(v, (int, float)) or isinstance(v, bool):
        problems.append(Problem(path, "must be a number", node.line, node.plain(),
                                "a finite number"))
        return None
    try:
        x = float(v)
    except OverflowError:  # a YAML int of hundreds of digits
        problems.append(Problem(path, "is beyond the range of numbers", node.line, v,
                                "a finite number of magnitude below about 1.8e308"))
        return None
    if not math.isfinite(x):
        problems.append(Problem(path, "must be a finite number", node.line, v,
                                "a finite number"))
        return None
    return x


def _axis(path: str, spec: Node, where: str, problems: list[Problem]) -> _Axis | None:
    """One ``vary`` entry checked and sized, without making its values (a range of a
    million values costs nothing until the plan is known to be allowed)."""
    v = spec.value
    line = spec.key_line or spec.line
    if isinstance(v, list):
        if not v:
            problems.append(Problem(where, "has no values", spec.line, [], "a non-empty list"))
            return None
        return _Axis(path, line, len(v), tuple(n.plain() for n in v))
    if isinstance(v, dict):
        keys = set(v)
        if keys != {"from", "to", "count"}:
            problems.append(Problem(where, "is not a range", spec.line, sorted(keys),
                                    "{from: number, to: number, count: whole number >= 2}"))
            return None
        c = v["count"].value
        if not isinstance(c, int) or isinstance(c, bool) or c < 2:
            problems.append(Problem(where, "is not a range", spec.line, spec.plain(),
                                    "from and to numbers, count a whole number >= 2"))
            return None
        a = _finite(v["from"], where + ".from", problems)
        b = _finite(v["to"], where + ".to", problems)
        if a is None or b is None:
            return None
        if c > HARD_MAX_VARIANTS:
            problems.append(Problem(where + ".count", "is too large", v["count"].line, c,
                                    f"at most {HARD_MAX_VARIANTS}"))
            return None
        return _Axis(path, line, c, None, a, b)
    problems.append(Problem(where, "is neither a list of values nor a range", spec.line,
                            spec.plain(), "[v1, v2, ...] or {from, to, count}"))
    return None


def expand(root: Node) -> tuple[list[VariantSpec], list[Problem]]:
    """The variants of a recipe's document node (one unchanged variant when it has no
    ``variants`` block) and the problems of that block."""
    problems: list[Problem] = []
    top = root.value if isinstance(root.value, dict) else {}
    block = top.get("variants")
    if block is None:
        return [VariantSpec("", "", 0, ())], problems
    bl = block.key_line or block.line
    if not isinstance(block.value, dict):
        problems.append(Problem("variants", "must be a mapping", bl, block.plain(),
                                "labels: {...} or vary: {...}"))
        return [], problems
    items = block.value
    for key in items:
        if key not in ("labels", "vary", "combine", "max_variants"):
            problems.append(Problem(f"variants.{key}", "is not a known key",
                                    items[key].key_line, None,
                                    "labels, vary, combine, max_variants"))
    if ("labels" in items) == ("vary" in items):
        problems.append(Problem("variants", "needs exactly one of labels and vary", bl, None,
                                "labels: {A: {...}, ...} or vary: {path: [values]}"))
        return [], problems
    limit = DEFAULT_MAX_VARIANTS
    if "max_variants" in items:
        n = items["max_variants"]
        if (not isinstance(n.value, int) or isinstance(n.value, bool)
                or not 1 <= n.value <= HARD_MAX_VARIANTS):
            problems.append(Problem("variants.max_variants", "is not allowed", n.key_line,
                                    n.value, f"a whole number from 1 to {HARD_MAX_VARIANTS}"))
        else:
            limit = n.value
    if "labels" in items:
        return _explicit(items["labels"], limit, problems)
    return _sweep(items, limit, problems)


def _check_path(path: object, where: str, line: int, problems: list[Problem]) -> bool:
    if not isinstance(path, str) or not PATH_RE.match(path):
        problems.append(Problem(where, "is not a field path", line, path,
                                "dotted names with list indexes, e.g. voids[0].height_mm"))
        return False
    if path.split(".")[0].split("[")[0] in ("variants", "name"):
        problems.append(Problem(where, "cannot be varied", line, path,
                                "any field but name and the variants block"))
        return False
    return True


def _explicit(node: Node, limit: int, problems: list[Problem]) -> tuple[list[VariantSpec],
                                                                         list[Problem]]:
    if not isinstance(node.value, dict) or not node.value:
        problems.append(Problem("variants.labels", "must map labels to changes",
                                node.key_line or node.line, node.plain(),
                                "{A: {}, B: {voids[0].height_mm: 7}}"))
        return [], problems
    if len(node.value) > limit:
        problems.append(Problem("variants.labels", f"has {len(node.value)} variants",
                                node.key_line, None, f"at most variants.max_variants = {limit}"))
        return [], problems
    out = []
    for i, (label, ch) in enumerate(node.value.items()):
        where = f"variants.labels.{label}"
        if not LABEL_RE.match(str(label)):
            problems.append(Problem(where, "is not a valid label", ch.key_line, label,
                                    "upper case letters, digits and '-', up to 12 characters"))
            continue
        if not isinstance(ch.value, dict):
            problems.append(Problem(where, "must be a mapping of field path to value",
                                    ch.key_line, ch.plain(), "{voids[0].height_mm: 7}"))
            continue
        changes = []
        for path, vn in ch.value.items():
            if _check_path(path, f"{where}.{path}", vn.key_line or vn.line, problems):
                changes.append((path, vn.plain(), vn.key_line or vn.line))
        fam = "" if len(node.value) <= FAMILY_SIZE else f"F{i // FAMILY_SIZE + 1}"
        out.append(VariantSpec(str(label), fam, i, tuple(changes)))
    return out, problems


def _sweep(items: dict[str, Node], limit: int, problems: list[Problem]
           ) -> tuple[list[VariantSpec], list[Problem]]:
    vary = items["vary"]
    mode = "product"
    if "combine" in items:
        c = items["combine"]
        if c.value not in ("product", "zip"):
            problems.append(Problem("variants.combine", "is not a way to combine", c.key_line,
                                    c.value, "product or zip"))
            return [], problems
        mode = str(c.value)
    if not isinstance(vary.value, dict) or not vary.value:
        problems.append(Problem("variants.vary", "must map field paths to values",
                                vary.key_line or vary.line, vary.plain(),
                                "{voids[0].height_mm: [6, 7, 8]}"))
        return [], problems
    axes: list[_Axis] = []
    for path, spec in vary.value.items():
        where = f"variants.vary.{path}"
        if not _check_path(path, where, spec.key_line or spec.line, problems):
            continue
        axis = _axis(path, spec, where, problems)
        if axis is not None:
            axes.append(axis)
    if problems:
        return [], problems
    sizes = [a.size for a in axes]
    if mode == "zip" and len(set(sizes)) > 1:
        problems.append(Problem("variants.vary", "has lists of different lengths for zip",
                                vary.key_line, sizes, "equal lengths, or combine: product"))
        return [], problems
    # The plan's size from the counts alone, before any value or variant is made.
    total = math.prod(sizes) if mode == "product" else sizes[0]
    if total > limit:
        problems.append(Problem("variants.vary", f"would make {total} variants",
                                vary.key_line, None,
                                f"at most variants.max_variants = {limit} (raise it to allow "
                                "more)"))
        return [], problems
    columns = [a.materialise() for a in axes]
    combos = itertools.product(*columns) if mode == "product" else zip(*columns)
    out = []
    for i, combo in enumerate(combos):
        label, fam = sweep_label(i, total)
        changes = tuple((a.path, val, a.line) for a, val in zip(axes, combo))
        out.append(VariantSpec(label, fam, i, changes))
    return out, problems


def without_variants(root: Node) -> Node:
    """The document with its ``variants`` block removed (what each variant starts from)."""
    if isinstance(root.value, dict) and "variants" in root.value:
        return replace(root, value={k: v for k, v in root.value.items() if k != "variants"})
    return root


def prefix_problems(err: RecipeError, spec: VariantSpec) -> list[Problem]:
    """A variant's problems, labelled; a problem about a field the variant changed (or the
    entry holding it) points at the line of the change."""
    out = []
    for p in err.problems:
        line = p.line
        for path, _, ch_line in spec.changes:
            if p.path and (path == p.path or path.startswith(p.path + ".")
                           or path.startswith(p.path + "[")):
                line = ch_line
                break
        out.append(replace(p, path=f"[{spec.label}] {p.path}".rstrip(), line=line))
    return out


def merge_problems(problems: list[Problem]) -> list[Problem]:
    """One problem per distinct finding: the same problem in several variants is reported
    once, naming all their labels (``[A, B, C] mold.wal_mm: ...``)."""
    groups: dict[tuple, list[str]] = {}
    firsts: dict[tuple, Problem] = {}
    for p in problems:
        m = re.match(r"^\[([A-Z0-9-]+)\] ?(.*)$", p.path)
        label, rest = (m.group(1), m.group(2)) if m else (None, p.path)
        key = (rest, p.message, p.line, repr(p.value), p.allowed)
        if key not in groups:
            groups[key], firsts[key] = [], replace(p, path=rest)
        if label is not None:
            groups[key].append(label)
    out = []
    for key, labels in groups.items():
        p = firsts[key]
        out.append(replace(p, path=f"[{', '.join(labels)}] {p.path}".rstrip()) if labels else p)
    return out
