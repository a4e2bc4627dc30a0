"""The table of casting silicone grades (a data file shipped with the package).

Values are typical data-sheet figures, from memory (see ``silicone_grades.yaml``); they
are editable defaults for checks and quantities, never guarantees.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import yaml


@dataclass(frozen=True)
class Grade:
    """One silicone grade: hardness on a durometer ``scale`` ("A" or "00"), density
    (g/cm3), elongation at break (%), tensile strength (MPa), mix ratio A:B, pot life (min)
    and demold time (h)."""

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


@lru_cache(maxsize=1)
def grades() -> dict[str, Grade]:
    """Grade name -> :class:`Grade`, in the file's order."""
    text = resources.files("soft_molds.recipe").joinpath("silicone_grades.yaml").read_text()
    data = yaml.safe_load(text)["grades"]
    out = {}
    for name, g in data.items():
        out[str(name)] = Grade(name=str(name), scale=str(g["scale"]),
                               hardness=float(g["hardness"]), cure=str(g["cure"]),
                               density_g_cm3=float(g["density_g_cm3"]),
                               elongation_pct=float(g["elongation_pct"]),
                               tensile_mpa=float(g["tensile_mpa"]),
                               mix_ratio=(float(g["mix_ratio"][0]), float(g["mix_ratio"][1])),
                               mix_by=str(g["mix_by"]), pot_life_min=float(g["pot_life_min"]),
                               demold_h=float(g["demold_h"]), note=str(g.get("note", "")))
    return out


GRADE_NAMES: tuple[str, ...] = ("00-10", "00-30", "00-50", "A10", "A20", "A30", "A40")
"""The shipped grades (kept in step with the data file by a test)."""
