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
from dataclasses import dataclass, replace
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

import yaml

from ..errors import Problem


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


_KEYS = {
    "scale": str, "hardness": float, "cure": str, "density_g_cm3": float,
    "elongation_pct": float, "tensile_mpa": float, "mix_ratio": list, "mix_by": str,
    "pot_life_min": float, "demold_h": float,
}


def parse_table(text: str, source: str) -> tuple[dict[str, Grade], list[str]]:
    """Grades from the text of a table file, and one message per problem in it."""
    try:
        data = yaml.safe_load(text)
    except yaml.YAMLError as exc:
        return {}, [f"{source}: not valid YAML ({str(exc).splitlines()[0]})"]
    if not isinstance(data, dict) or not isinstance(data.get("grades"), dict):
        return {}, [f"{source}: needs a top-level mapping 'grades: {{name: {{...}}}}'"]
    out: dict[str, Grade] = {}
    bad: list[str] = []
    for name, g in data["grades"].items():
        where = f"{source}: grades.{name}"
        if not isinstance(g, dict):
            bad.append(f"{where}: must be a mapping of {', '.join(_KEYS)}")
            continue
        missing = [k for k in _KEYS if k not in g]
        if missing:
            bad.append(f"{where}: missing {', '.join(missing)}")
            continue
        try:
            ratio = tuple(float(x) for x in g["mix_ratio"])
            grade = Grade(
                name=str(name), scale=str(g["scale"]), hardness=float(g["hardness"]),
                cure=str(g["cure"]), density_g_cm3=float(g["density_g_cm3"]),
                elongation_pct=float(g["elongation_pct"]), tensile_mpa=float(g["tensile_mpa"]),
                mix_ratio=ratio, mix_by=str(g["mix_by"]),  # type: ignore[arg-type]
                pot_life_min=float(g["pot_life_min"]), demold_h=float(g["demold_h"]),
                note=str(g.get("note", "")),
                modulus_mpa=None if g.get("modulus_mpa") is None else float(g["modulus_mpa"]))
        except (TypeError, ValueError):
            bad.append(f"{where}: every value must be a number except scale, cure, mix_by, "
                       "note; mix_ratio is [A, B]")
            continue
        checks = [
            (grade.scale in ("A", "00"), "scale must be A or 00"),
            (0.0 < grade.hardness < 100.0, "hardness must lie between 0 and 100"),
            (grade.mix_by in ("weight", "volume"), "mix_by must be weight or volume"),
            (len(ratio) == 2 and all(x > 0 for x in ratio), "mix_ratio must be two numbers > 0"),
            (grade.density_g_cm3 > 0 and grade.elongation_pct > 0 and grade.tensile_mpa > 0
             and grade.pot_life_min > 0 and grade.demold_h > 0,
             "density, elongation, tensile, pot life and demold time must be > 0"),
        ]
        errs = [msg for ok, msg in checks if not ok]
        if errs:
            bad.append(f"{where}: " + "; ".join(errs))
            continue
        out[str(name)] = grade
    return out, bad


@lru_cache(maxsize=1)
def grades() -> dict[str, Grade]:
    """The shipped grades, name -> :class:`Grade`, in the file's order."""
    text = resources.files("soft_molds.recipe").joinpath("silicone_grades.yaml").read_text()
    table, bad = parse_table(text, "silicone_grades.yaml")
    assert not bad, bad
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
    phi = (et - e2) / (e1 - e2)  # type: ignore[operator]
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


def resolve(values: dict[str, Any], base_dir: Path | None, line) -> tuple[
        Grade | None, Blend | None, list[Problem]]:
    """The grade a recipe's ``material`` block casts, with problems naming its fields."""
    problems: list[Problem] = []
    table = dict(grades())
    tf = values.get("table_file")
    if tf:
        path = Path(tf) if Path(tf).is_absolute() or base_dir is None else base_dir / tf
        try:
            text = path.read_text(encoding="utf-8")
        except OSError as exc:
            problems.append(Problem("material.table_file", "cannot be read",
                                    line("material.table_file"), tf,
                                    f"a readable grades file ({exc.strerror or exc})"))
            return None, None, problems
        extra, bad = parse_table(text, str(path))
        for msg in bad:
            problems.append(Problem("material.table_file", msg, line("material.table_file"),
                                    None, "see recipe/silicone_grades.yaml for the format"))
        table.update(extra)
    names = ", ".join(table)
    g = table.get(values["grade"])
    if g is None:
        problems.append(Problem("material.grade", "is not a grade of the table",
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
    elif other is not None:
        g2 = table.get(other)
        if g2 is None:
            problems.append(Problem("material.blend_with", "is not a grade of the table",
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
