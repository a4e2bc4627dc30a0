"""The table of casting silicone grades and the silicone a recipe actually casts.

The shipped table (``silicone_grades.yaml``) holds typical data-sheet figures, from memory;
they are editable defaults for checks and quantities, never guarantees. A recipe may name
a file of its own grades in the same format (``material.table_file``), which adds to the
shipped grades and overrides same-named ones, give measured values for the grade it uses,
or blend two compatible grades to a target hardness.

Blending (common practice: compatible platinum-cure grades of one family are mixed to land
between their hardnesses): the blend's Young's modulus is taken as the volume-weighted
mean of the two grades' moduli from Gent's relation (interpolating in modulus, not in Shore
numbers); the other properties are volume-weighted means too. It is an approximation: cast
a test piece and measure it.
"""

from __future__ import annotations

import math
import os
import re
from collections.abc import Callable
from dataclasses import dataclass, fields, replace
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

from ..errors import Problem, RecipeError
from .fields import Field, MapReader, choice, join_path, number, suggest, text
from .yamlsource import FileProblem, Node, UnreadableFile, parse_yaml_text, read_text_file


@dataclass(frozen=True)
class Grade:
    """One silicone grade: hardness on a durometer ``scale`` ("A" or "00"), ``cure``
    chemistry (only grades of the same cure mix), density (g/cm3), elongation at break (%),
    tensile strength (MPa), mix ratio A:B (``mix_by`` weight or volume), pot life (min) and
    demold time (h). ``modulus_mpa`` is a measured Young's modulus, if known (else it is
    estimated from a Shore A hardness)."""

    name: str
    scale: str
    hardness: float
    cure: str
    density_g_cm3: float
    elongation_pct: float
    tensile_mpa: float
    mix_ratio: tuple[float, float]
    mix_by: str
    pot_life_min: float
    demold_h: float
    note: str = ""
    modulus_mpa: float | None = None

    @property
    def shore_a(self) -> float | None:
        return self.hardness if self.scale == "A" else None

    def youngs_modulus_mpa(self) -> float | None:
        """Measured modulus, else Gent's estimate from Shore A; None on the 00 scale (no
        closed-form conversion to Shore A exists)."""
        if self.modulus_mpa is not None:
            return self.modulus_mpa
        if self.shore_a is None:
            return None
        return gent_modulus_mpa(self.shore_a)


def gent_modulus_mpa(shore_a: float) -> float:
    """Young's modulus (MPa) from Shore A by Gent's relation (A. N. Gent, Rubber Chem.
    Technol. 31:896, 1958): E = 0.0981 (56 + 7.62336 S) / (0.137505 (254 - 2.54 S))."""
    if not 0.0 < shore_a < 100.0:
        raise ValueError(f"Gent's relation needs 0 < Shore A < 100, got {shore_a!r}")
    return 0.0981 * (56.0 + 7.62336 * shore_a) / (0.137505 * (254.0 - 2.54 * shore_a))


def shore_a_from_modulus(e_mpa: float) -> float:
    """Inverse of :func:`gent_modulus_mpa` (closed form: a ratio of linear functions)."""
    a = e_mpa * 0.137505
    s = (a * 254.0 - 0.0981 * 56.0) / (0.0981 * 7.62336 + a * 2.54)
    if not 0.0 < s < 100.0:
        raise ValueError(f"{e_mpa!r} MPa is outside the range of Gent's relation")
    return s


# Ranges shared by a grades table and a recipe's measured values (schema.MATERIAL_FIELDS),
# so a value refused in one is refused in the other. Typical silicones (casting-facts.md,
# from memory) sit well inside each range; the bounds stop typos and non-physical values.
DENSITY_G_CM3 = (0.5, 3.0)
ELONGATION_PCT = (10.0, 2000.0)
MODULUS_MPA = (0.005, 50.0)
SHORE = (1.0, 99.0)  # durometer readings are reproducible roughly 10-90 (ASTM D2240 use)

GRADE_FIELDS: tuple[Field, ...] = (
    choice("scale", "durometer scale of the hardness", ("A", "00")),
    number("hardness", "durometer reading on that scale", unit="", lo=SHORE[0],
           hi=SHORE[1], lo_open=False),
    text("cure", "cure chemistry (only grades of the same cure mix)"),
    number("density_g_cm3", "density of the mixed silicone", unit="g/cm3",
           lo=DENSITY_G_CM3[0], hi=DENSITY_G_CM3[1]),
    number("elongation_pct", "elongation at break", unit="%", lo=ELONGATION_PCT[0],
           hi=ELONGATION_PCT[1]),
    number("tensile_mpa", "tensile strength", unit="MPa", lo=0.0, hi=100.0),
    Field("mix_ratio", "pair", "mix ratio of part A to part B", unit="", lo=0.0, hi=1000.0,
          lo_open=True),
    choice("mix_by", "how the ratio is measured", ("weight", "volume")),
    number("pot_life_min", "working time after mixing", unit="min", lo=0.0, hi=1440.0),
    number("demold_h", "cure time before demolding at room temperature", unit="h", lo=0.0,
           hi=720.0),
    number("modulus_mpa", "measured Young's modulus (else from Shore A by Gent's relation)",
           None, unit="MPa", lo=MODULUS_MPA[0], hi=MODULUS_MPA[1]),
)
"""Keys of one grade in a table file, with what each accepts (``note`` is free text)."""


def parse_table(text: str, source: str) -> tuple[dict[str, Grade], list[Problem]]:
    """Grades from the text of a table file (``source`` labels it), and one problem per
    mistake in it, each located in that file (:class:`FileProblem`)."""
    try:
        root = parse_yaml_text(text, source, "grades table")
    except RecipeError as exc:
        return {}, _located(exc.problems, source)
    problems: list[Problem] = []
    top = MapReader(root, "", problems, 1, what="a mapping with one key, grades")
    table = top.node("grades")
    top.finish()
    out: dict[str, Grade] = {}
    if table is None:
        top.problem("grades", "is required", root.line, None, "grades: {name: {scale: ..., "
                    "hardness: ...}, ...}")
    elif not isinstance(table.value, dict) or not table.value:
        top.problem("grades", "must map grade names to their values", table.key_line,
                    table.plain(), "grades: {name: {scale: ..., hardness: ...}, ...}")
    else:
        for name, node in table.value.items():
            grade = _read_grade(name, node, problems)
            if grade is not None:
                out[name] = grade
    return out, _located(problems, source)


def _read_grade(name: str, node: Node, problems: list[Problem]) -> Grade | None:
    r = MapReader(node, join_path("grades", name), problems, node.key_line,
                  what="a mapping of " + ", ".join(f.name for f in GRADE_FIELDS))
    if not isinstance(node.value, dict):
        return None
    values = r.take_all(GRADE_FIELDS)
    note = r.node("note")
    if note is not None and not isinstance(note.value, str):
        r.problem(join_path(r.path, "note"), "must be text", note.key_line, note.plain(),
                  "text (quote it)")
    r.finish()
    if not r.ok:
        return None
    return Grade(name=name, note="" if note is None else str(note.value), **values)


def _located(problems, source: str) -> list[Problem]:
    kept = {f.name for f in fields(Problem)}
    return [FileProblem(**{k: getattr(p, k) for k in kept}, file=source) for p in problems]


def read_table_file(path: str | os.PathLike) -> tuple[dict[str, Grade], list[Problem]]:
    """Grades of a table file and the problems in it (located in that file). Raises
    :class:`UnreadableFile` when it cannot be read at all (missing, a directory, FIFO or
    device, too big)."""
    text, label = read_text_file(path, "grades table")
    return _parse_cached(text, label)


@lru_cache(maxsize=8)
def _parse_cached(text: str, label: str) -> tuple[dict[str, Grade], list[Problem]]:
    # Every variant of a family reads the same table: parse its text once.
    return parse_table(text, label)


@lru_cache(maxsize=1)
def grades() -> dict[str, Grade]:
    """The shipped grades, name -> :class:`Grade`, in the file's order."""
    shipped = resources.files("soft_molds.recipe").joinpath("silicone_grades.yaml")
    table, bad = parse_table(shipped.read_text(encoding="utf-8"), "silicone_grades.yaml")
    assert not bad, [b.format() for b in bad]
    return table


GRADE_NAMES: tuple[str, ...] = ("00-10", "00-30", "00-50", "A10", "A20", "A30", "A40")
"""The shipped grades (kept in step with the data file by a test)."""


@dataclass(frozen=True)
class Blend:
    """Two grades mixed to a target Shore A: volume and weight fraction of ``first``."""

    first: Grade
    second: Grade
    target_shore_a: float
    volume_fraction_first: float
    weight_fraction_first: float
    modulus_mpa: float


def blend(first: Grade, second: Grade, target_shore_a: float) -> Blend:
    """The mix of ``first`` and ``second`` whose modulus (volume-weighted mean of their
    Gent moduli) matches ``target_shore_a``. Raises ValueError when they cannot be mixed
    (different cure chemistry), are not both on the Shore A scale, or the target is not
    between them."""
    if first.cure != second.cure:
        raise ValueError(f"{first.name} ({first.cure}-cure) and {second.name} "
                         f"({second.cure}-cure) cannot be mixed: different cure chemistry")
    if first.shore_a is None or second.shore_a is None:
        raise ValueError("blending by Gent's relation needs two Shore A grades")
    lo, hi = sorted((first.shore_a, second.shore_a))
    if math.isclose(lo, hi) or not lo <= target_shore_a <= hi:
        raise ValueError(f"target Shore A {target_shore_a:g} is not between "
                         f"{first.name} and {second.name}")
    e1, e2 = first.youngs_modulus_mpa(), second.youngs_modulus_mpa()
    et = gent_modulus_mpa(target_shore_a)
    # Measured moduli may not follow the Shore numbers: the target must lie between the
    # moduli that are mixed, or the fractions leave 0..1.
    if e1 is None or e2 is None or math.isclose(e1, e2) or not min(e1, e2) <= et <= max(e1, e2):
        raise ValueError(f"the modulus for Shore A{target_shore_a:g} ({et:.3f} MPa) is not "
                         f"between {first.name}'s and {second.name}'s")
    phi = (et - e2) / (e1 - e2)
    m1, m2 = phi * first.density_g_cm3, (1.0 - phi) * second.density_g_cm3
    return Blend(first, second, target_shore_a, phi, m1 / (m1 + m2), et)


def blended_grade(b: Blend) -> Grade:
    """The blend as one grade (volume-weighted properties; shortest pot life, longest
    demold time of the two)."""
    phi = b.volume_fraction_first
    f, s = b.first, b.second

    def mix(x: float, y: float) -> float:
        return phi * x + (1.0 - phi) * y

    return Grade(
        name=f"{f.name}+{s.name}", scale="A", hardness=b.target_shore_a, cure=f.cure,
        density_g_cm3=mix(f.density_g_cm3, s.density_g_cm3),
        elongation_pct=mix(f.elongation_pct, s.elongation_pct),
        tensile_mpa=mix(f.tensile_mpa, s.tensile_mpa), mix_ratio=f.mix_ratio, mix_by=f.mix_by,
        pot_life_min=min(f.pot_life_min, s.pot_life_min),
        demold_h=max(f.demold_h, s.demold_h),
        note=f"blend: {phi * 100:.0f} % {f.name} by volume (an approximation; cast a test "
             "piece and measure it)",
        modulus_mpa=b.modulus_mpa)


def resolve(values: dict[str, Any], base_dir: Path | None,
            line: Callable[[str], int | None]) -> tuple[Grade | None, Blend | None,
                                                        list[Problem]]:
    """The grade a recipe's ``material`` block casts, with problems naming its fields (and,
    for a table file, the file, line and key)."""
    problems: list[Problem] = []
    table = dict(grades())
    tf = values.get("table_file")
    if tf:
        path = Path(tf) if Path(tf).is_absolute() or base_dir is None else base_dir / tf
        try:
            extra, bad = read_table_file(path)
        except UnreadableFile as exc:
            (why,) = exc.problems
            problems.append(Problem("material.table_file", f"cannot be read: {why.message}",
                                    line("material.table_file"), tf,
                                    why.allowed or "a readable grades file (a regular file "
                                    "in the shipped table's format)"))
            return None, None, problems
        if bad:
            return None, None, [*problems, *bad]
        table.update(extra)
    names = ", ".join(table)
    g = table.get(values["grade"])
    if g is None:
        problems.append(Problem("material.grade", "is not a grade of the table"
                                + grade_hint(values["grade"], table),
                                line("material.grade"), values["grade"], names))
        return None, None, problems
    over = {k: values[k] for k in ("density_g_cm3", "elongation_pct") if values.get(k)}
    if values.get("shore_a") is not None:
        over.update(scale="A", hardness=values["shore_a"])
    if values.get("youngs_modulus_mpa") is not None:
        over["modulus_mpa"] = values["youngs_modulus_mpa"]
    if over:
        g = replace(g, **over, note=(g.note + "; " if g.note else "") + "measured values: "
                    + ", ".join(sorted(over)))
    b = None
    other, target = values.get("blend_with"), values.get("target_shore_a")
    if (other is None) != (target is None):
        problems.append(Problem("material.blend_with" if other is None else
                                "material.target_shore_a", "is missing",
                                line("material"), None,
                                "give blend_with and target_shore_a together"))
    elif other is not None and target is not None:
        g2 = table.get(other)
        if g2 is None:
            problems.append(Problem("material.blend_with", "is not a grade of the table"
                                    + grade_hint(other, table),
                                    line("material.blend_with"), other, names))
        else:
            try:
                b = blend(g, g2, target)
            except ValueError as exc:
                problems.append(Problem("material.blend_with", f"cannot be blended: {exc}",
                                        line("material.blend_with"), other,
                                        "a Shore A grade of the same cure chemistry, with "
                                        "target_shore_a between the two"))
            else:
                g = blended_grade(b)
    return g, b, problems


_GRADE_RE = re.compile(r"^(?:shore\s*)?(a|00)[\s-]*(\d+(?:\.\d+)?)$")


def grade_hint(name: str, table: dict[str, Grade]) -> str:
    """`` (did you mean 'A10'?)`` for an unknown grade name, or ""; a Shore hardness
    between two grades of the table also names the blend that reaches it."""
    m = _GRADE_RE.match(" ".join(name.lower().split()))
    if m is None:
        return suggest(name, table)
    scale, hardness = m.group(1).upper(), float(m.group(2))
    same = sorted((g for g in table.values() if g.scale == scale),
                  key=lambda g: (abs(g.hardness - hardness), g.hardness))
    if not same:
        return ""
    nearest = same[0]
    if math.isclose(nearest.hardness, hardness):
        return f" (did you mean '{nearest.name}'?)"
    below = [g for g in same if g.hardness < hardness]
    above = [g for g in same if g.hardness > hardness]
    if scale == "A" and below and above:
        lo = max(below, key=lambda g: g.hardness)
        hi = min(above, key=lambda g: g.hardness)
        if lo.cure == hi.cure:
            return (f" (did you mean '{nearest.name}'? For Shore A{hardness:g} blend two "
                    f"grades: grade: {lo.name}, blend_with: {hi.name}, target_shore_a: "
                    f"{hardness:g})")
    return f" (did you mean '{nearest.name}'?)"
