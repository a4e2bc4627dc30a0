"""The next generation of a swept family: the same recipe, its sweep narrowed around the
variant that did best.

Rule (documented in README.md, "Measured results"): the family must sweep one field
(``variants: {vary: {path: [values] or {from, to, count}}}``). With ``best`` the winning
value and ``step`` the distance from it to its nearest neighbour in the sweep, the next
generation sweeps five evenly spaced values from ``best - step/2`` to ``best + step/2``
(so ``best`` sits in the middle, and each new value lies nearer to ``best`` than to any
value of the previous sweep). Values are rounded to 1e-6 of the field's unit.

The recipe text is kept as written (comments included) except for two edits: the
``variants`` block is replaced and the ``name`` becomes ``<family>-gen<N>`` (``N`` one more
than the family's own generation, 1 for a family without the suffix), so the next builds
land in their own folder and never overwrite the measured generation's.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import Problem, RecipeError
from .variants import expand
from .yamlsource import Node, parse_recipe_text

#: Values of the next generation's sweep.
NEXT_COUNT = 5
_GEN_RE = re.compile(r"^(.*)-gen(\d+)$")


@dataclass(frozen=True)
class SweptField:
    """The one field a family sweeps: its path, its values in sweep order and the label
    of each value's variant."""

    path: str
    values: tuple[float, ...]
    labels: tuple[str, ...]

    def value_of(self, label: str) -> float | None:
        return next((v for v, lb in zip(self.values, self.labels) if lb == label), None)


@dataclass(frozen=True)
class NextGeneration:
    """The next recipe: its ``name``, ``generation`` number, swept ``values`` and text."""

    name: str
    generation: int
    path: str
    values: tuple[float, ...]
    text: str


def swept_field(root: Node, source: str) -> SweptField:
    """The single numeric field the recipe's ``variants`` block sweeps; a
    :class:`RecipeError` when it sweeps none, several, or values that are not numbers."""
    specs, problems = expand(root)
    if problems:
        raise RecipeError(problems, source)
    paths = {p for s in specs for p, _, _ in s.changes}
    top = root.value if isinstance(root.value, dict) else {}
    block = top.get("variants")
    line = None if block is None else block.key_line
    vary = block.value.get("vary") if block is not None and isinstance(block.value, dict) else None
    if vary is None or len(paths) != 1:
        raise RecipeError([Problem("variants", "does not sweep exactly one field", line,
                                   sorted(paths) or None,
                                   "variants: {vary: {one.field_path: [values]}}")], source)
    (path,) = paths
    values = [s.changed()[path] for s in specs]
    if not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values):
        raise RecipeError([Problem(f"variants.vary.{path}", "sweeps values that are not "
                                   "numbers", line, values, "numbers")], source)
    return SweptField(path, tuple(float(v) for v in values),  # type: ignore[arg-type]
                      tuple(s.label for s in specs))


def narrowed_values(values: tuple[float, ...], best: float) -> tuple[float, ...]:
    """Five values from ``best - step/2`` to ``best + step/2``, ``step`` the distance to
    ``best``'s nearest other value in ``values``. ValueError with a single value."""
    others = [abs(v - best) for v in values if v != best]
    if not others:
        raise ValueError("a sweep of one value cannot be narrowed")
    half = min(others) / 2
    n = NEXT_COUNT - 1
    return tuple(round(best - half + 2 * half * k / n, 6) + 0.0 for k in range(NEXT_COUNT))


def next_generation(text: str, source: str, default_name: str, best: float
                    ) -> NextGeneration:
    """The next recipe for the family recipe ``text`` (its name defaulting to
    ``default_name``, the file stem) whose best swept value was ``best``."""
    root = parse_recipe_text(text, source)
    field = swept_field(root, source)
    values = narrowed_values(field.values, best)
    top = root.value if isinstance(root.value, dict) else {}
    name_node = top.get("name")
    name = name_node.value if name_node is not None and isinstance(name_node.value, str) \
        else default_name
    m = _GEN_RE.match(name)
    base, gen = (m.group(1), int(m.group(2)) + 1) if m else (name, 2)
    new_name = f"{base}-gen{gen}"
    lines = text.splitlines()
    block_line = top["variants"].key_line or top["variants"].line
    start = block_line - 1
    end = start + 1
    while end < len(lines) and (not lines[end].strip() or lines[end][:1] in (" ", "#")):
        end += 1
    shown = ", ".join(f"{v:g}" for v in values)
    new_block = [
        "variants:",
        "  vary:",
        f"    {field.path}: [{shown}]   # generation {gen}: best {best:g} +- half the "
        "previous step",
    ]
    lines[start:end] = new_block
    if name_node is not None and name_node.key_line is not None:
        i = name_node.key_line - 1
        lines[i] = f"name: {new_name}"
    else:
        first = next((i for i, ln in enumerate(lines) if ln.strip()
                      and not ln.lstrip().startswith("#")), 0)
        lines.insert(first, f"name: {new_name}")
    return NextGeneration(new_name, gen, field.path, values, "\n".join(lines) + "\n")
