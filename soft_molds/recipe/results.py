"""Measured results of a cast family: read and check the file a lab fills in.

One YAML file per family (format in README.md, "Measured results"), read with the same
guarded reader as a recipe (:func:`~soft_molds.recipe.yamlsource.read_yaml_file`), so
every value knows its line::

    family: finger-family                  # the recipe's name (checked against the builds)
    recipe: ../../recipes/finger-family.yaml   # optional: the family recipe, relative to
                                           # this file (for the next generation)
    goal:                                  # optional; the command line may override
      maximise: bend_deg                   # bend_deg or extension_mm
      at_kpa: 60                           # default: the builds' working pressure
      min_burst_margin: 1.5                # burst_kpa / at_kpa must reach this
    variants:
      C:
        rows:                              # one row per pressure step, units in the keys
          - {pressure_kpa: 20, bend_deg: 14.5}
        burst_kpa: 150                     # null or absent: not taken to burst
        leak_kpa: null                     # lowest pressure a leak showed at
        defects: [bubbles]                 # bubbles, tear-at-inlet, delamination, leak, other
        notes: free text

Every problem is one :class:`~soft_molds.errors.Problem` (``file:line: field: ...``); all
are collected and raised together as one :class:`~soft_molds.errors.RecipeError`.
"""

from __future__ import annotations

import math
import os
from collections.abc import Collection
from dataclasses import dataclass
from enum import StrEnum

from ..errors import Problem, RecipeError
from .yamlsource import Node, parse_yaml_text, read_yaml_file


class Quantity(StrEnum):
    """What a row measures besides pressure: the tip angle (degrees) of a bender or the
    extension (mm) of an extender."""

    BEND_DEG = "bend_deg"
    EXTENSION_MM = "extension_mm"


class Defect(StrEnum):
    """The defects a lab ticks off for a cast variant (a fixed set; ``other`` plus the
    notes for anything else)."""

    BUBBLES = "bubbles"
    TEAR_AT_INLET = "tear-at-inlet"
    DELAMINATION = "delamination"
    LEAK = "leak"
    OTHER = "other"


@dataclass(frozen=True)
class MeasuredPoint:
    """One row: gauge pressure (kPa) and the measured value (degrees or mm, see the
    variant's ``quantity``); ``line`` of the row in the file."""

    pressure_kpa: float
    value: float
    line: int


@dataclass(frozen=True)
class MeasuredVariant:
    """What the lab measured on one cast variant. ``quantity`` is None when no row was
    entered yet (a template as written)."""

    label: str
    line: int
    quantity: Quantity | None
    points: tuple[MeasuredPoint, ...]
    burst_kpa: float | None
    leak_kpa: float | None
    defects: tuple[Defect, ...]
    notes: str


@dataclass(frozen=True)
class Goal:
    """How variants are ranked: the ``maximise`` quantity at ``at_kpa`` (None: the
    working pressure of the builds), among those whose burst pressure is at least
    ``min_burst_margin`` times ``at_kpa``. Fields left None take their defaults."""

    maximise: Quantity | None = None
    at_kpa: float | None = None
    min_burst_margin: float | None = None


@dataclass(frozen=True)
class MeasuredResults:
    """A results file as read: ``recipe`` is the family recipe's path as written (None
    when not given), ``source`` the file's path as given."""

    family: str
    recipe: str | None
    goal: Goal
    variants: tuple[MeasuredVariant, ...]
    source: str

    def variant(self, label: str) -> MeasuredVariant | None:
        return next((v for v in self.variants if v.label == label), None)


TOP_KEYS = ("family", "recipe", "goal", "variants")
VARIANT_KEYS = ("rows", "burst_kpa", "leak_kpa", "defects", "notes")
GOAL_KEYS = ("maximise", "at_kpa", "min_burst_margin")
ROW_KEYS = ("pressure_kpa", *(q.value for q in Quantity))
_ROW_FORM = "{pressure_kpa: P, bend_deg: angle} or {pressure_kpa: P, extension_mm: length}"


def read_results(path: str | os.PathLike[str], labels: Collection[str] | None = None
                 ) -> MeasuredResults:
    """The results file at ``path``, checked; ``labels``: the variants built (a label not
    among them is a problem). Raises :class:`RecipeError` listing every problem."""
    root, source = read_yaml_file(path, "results")
    return results_from_node(root, source, labels)


def results_from_text(text: str, source: str = "results",
                      labels: Collection[str] | None = None) -> MeasuredResults:
    return results_from_node(parse_yaml_text(text, source, "results"), source, labels)


def results_from_node(root: Node, source: str, labels: Collection[str] | None = None
                      ) -> MeasuredResults:
    problems: list[Problem] = []
    if not isinstance(root.value, dict):
        raise RecipeError([Problem("", "must be a mapping", root.line, _shown(root),
                                   ", ".join(TOP_KEYS))], source)
    top = root.value
    _unknown_keys(top, "", TOP_KEYS, problems)
    family = _text(top.get("family"), "family", problems, required=True, line=root.line)
    recipe = _text(top.get("recipe"), "recipe", problems)
    goal = _goal(top.get("goal"), problems)
    variants: list[MeasuredVariant] = []
    block = top.get("variants")
    if block is None:
        problems.append(Problem("variants", "is missing", root.line, None,
                                "a mapping of variant label to its measurements"))
    elif not isinstance(block.value, dict):
        problems.append(Problem("variants", "must map labels to measurements",
                                _at(block), _shown(block), "{A: {rows: [...]}, ...}"))
    else:
        for label, node in block.value.items():
            if labels is not None and label not in labels:
                problems.append(Problem(f"variants.{label}", "is not a variant of the family",
                                        _at(node), label, ", ".join(sorted(labels))))
                continue
            v = _variant(label, node, problems)
            if v is not None:
                variants.append(v)
    if problems:
        raise RecipeError(problems, source)
    return MeasuredResults(family or "", recipe, goal, tuple(variants), source)


def _at(node: Node) -> int:
    return node.key_line or node.line


def _shown(node: Node) -> object:
    plain = node.plain()
    return plain if plain is not None else "null"


def _unknown_keys(entries: dict[str, Node], where: str, allowed: tuple[str, ...],
                  problems: list[Problem]) -> None:
    for key, node in entries.items():
        if key not in allowed:
            path = f"{where}.{key}" if where else key
            problems.append(Problem(path, "is not a known key", _at(node), None,
                                    ", ".join(allowed)))


def _text(node: Node | None, path: str, problems: list[Problem], required: bool = False,
          line: int | None = None) -> str | None:
    if node is None:
        if required:
            problems.append(Problem(path, "is missing", line, None, "text"))
        return None
    if not isinstance(node.value, str) or not node.value.strip():
        problems.append(Problem(path, "must be text", _at(node), _shown(node), "text"))
        return None
    return node.value


def _number(node: Node | None, path: str, problems: list[Problem], minimum: float = 0.0,
            nullable: bool = True, above: bool = False) -> float | None:
    """A finite number >= ``minimum`` (> with ``above``), or None (absent or null, when
    ``nullable``; else a problem is added)."""
    if node is None or (node.value is None and nullable):
        return None
    v = node.value
    bound = "" if minimum == -math.inf else f" {'>' if above else '>='} {minimum:g}"
    if not isinstance(v, (int, float)) or isinstance(v, bool) or not math.isfinite(float(v)):
        problems.append(Problem(path, "must be a number", _at(node), _shown(node),
                                f"a finite number{bound}" + (" or null" if nullable else "")))
        return None
    x = float(v)
    if x < minimum or (above and x == minimum):
        word = "negative" if minimum == 0.0 and x < 0 else "out of range"
        problems.append(Problem(path, f"is {word}", _at(node), v, f"a number{bound}"))
        return None
    return x


def _goal(node: Node | None, problems: list[Problem]) -> Goal:
    if node is None:
        return Goal()
    if not isinstance(node.value, dict):
        problems.append(Problem("goal", "must be a mapping", _at(node), _shown(node),
                                ", ".join(GOAL_KEYS)))
        return Goal()
    g = node.value
    _unknown_keys(g, "goal", GOAL_KEYS, problems)
    maximise = None
    if "maximise" in g:
        m = g["maximise"]
        if m.value in tuple(q.value for q in Quantity):
            maximise = Quantity(m.value)
        else:
            problems.append(Problem("goal.maximise", "is not a measured quantity", _at(m),
                                    _shown(m), ", ".join(q.value for q in Quantity)))
    return Goal(maximise, _number(g.get("at_kpa"), "goal.at_kpa", problems, above=True),
                _number(g.get("min_burst_margin"), "goal.min_burst_margin", problems,
                        minimum=1.0))


def _variant(label: str, node: Node, problems: list[Problem]) -> MeasuredVariant | None:
    where = f"variants.{label}"
    if node.value is None:
        return MeasuredVariant(label, _at(node), None, (), None, None, (), "")
    if not isinstance(node.value, dict):
        problems.append(Problem(where, "must be a mapping", _at(node), _shown(node),
                                ", ".join(VARIANT_KEYS)))
        return None
    v = node.value
    _unknown_keys(v, where, VARIANT_KEYS, problems)
    quantity, points = _rows(v.get("rows"), where, problems)
    notes = v.get("notes")
    text = ""
    if notes is not None and notes.value not in (None, ""):
        text = _text(notes, f"{where}.notes", problems) or ""
    return MeasuredVariant(label, _at(node), quantity, points,
                           _number(v.get("burst_kpa"), f"{where}.burst_kpa", problems),
                           _number(v.get("leak_kpa"), f"{where}.leak_kpa", problems),
                           _defects(v.get("defects"), where, problems), text)


def _defects(node: Node | None, where: str, problems: list[Problem]) -> tuple[Defect, ...]:
    allowed = ", ".join(d.value for d in Defect)
    if node is None or node.value is None:
        return ()
    if not isinstance(node.value, list):
        problems.append(Problem(f"{where}.defects", "must be a list", _at(node), _shown(node),
                                f"a list of: {allowed}"))
        return ()
    out: list[Defect] = []
    for i, item in enumerate(node.value):
        path = f"{where}.defects[{i}]"
        if item.value not in tuple(d.value for d in Defect):
            problems.append(Problem(path, "is not a known defect", item.line, _shown(item),
                                    f"{allowed} (describe anything else in notes)"))
        elif Defect(item.value) in out:
            problems.append(Problem(path, "is listed twice", item.line, item.value,
                                    "each defect once"))
        else:
            out.append(Defect(item.value))
    return tuple(out)


def _rows(node: Node | None, where: str, problems: list[Problem]
          ) -> tuple[Quantity | None, tuple[MeasuredPoint, ...]]:
    if node is None or node.value is None:
        return None, ()
    if not isinstance(node.value, list):
        problems.append(Problem(f"{where}.rows", "must be a list of rows", _at(node),
                                _shown(node), f"[{_ROW_FORM}, ...]"))
        return None, ()
    quantity: Quantity | None = None
    points: list[MeasuredPoint] = []
    seen: dict[float, int] = {}
    for i, row in enumerate(node.value):
        path = f"{where}.rows[{i}]"
        got = _row(row, path, problems)
        if got is None:
            continue
        q, point = got
        if quantity is None:
            quantity = q
        elif q is not quantity:
            problems.append(Problem(f"{path}.{q.value}", "mixes quantities in one variant",
                                    row.line, q.value, f"{quantity.value} in every row"))
            continue
        if point.pressure_kpa in seen:
            problems.append(Problem(f"{path}.pressure_kpa", "duplicates the row at line "
                                    f"{seen[point.pressure_kpa]}", row.line, point.pressure_kpa,
                                    "one row per pressure"))
            continue
        seen[point.pressure_kpa] = row.line
        points.append(point)
    return quantity, tuple(sorted(points, key=lambda p: p.pressure_kpa))


def _row(row: Node, path: str, problems: list[Problem]
         ) -> tuple[Quantity, MeasuredPoint] | None:
    if not isinstance(row.value, dict):
        problems.append(Problem(path, "is not a row with unit keys", row.line, _shown(row),
                                _ROW_FORM))
        return None
    r = row.value
    before = len(problems)
    _unknown_keys(r, path, ROW_KEYS, problems)
    measured = [q for q in Quantity if q.value in r]
    if "pressure_kpa" not in r:
        shown = ", ".join(q.value for q in measured) or "no value"
        problems.append(Problem(path, f"has {shown} without pressure_kpa", row.line,
                                _shown(row), _ROW_FORM))
    if not measured and len(problems) == before:
        problems.append(Problem(path, "has pressure_kpa without a measured value", row.line,
                                _shown(row), _ROW_FORM))
    if len(measured) > 1:
        problems.append(Problem(path, "has both bend_deg and extension_mm", row.line,
                                _shown(row), "one of them per row"))
    if len(problems) > before:
        return None
    q = measured[0]
    p = _number(r["pressure_kpa"], f"{path}.pressure_kpa", problems, nullable=False)
    x = _number(r[q.value], f"{path}.{q.value}", problems, minimum=-math.inf, nullable=False)
    if p is None or x is None:
        return None
    return q, MeasuredPoint(p, x, row.line)
