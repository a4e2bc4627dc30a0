"""What to weigh out for a cast, and roughly what each mold part costs to print.

Silicone: the cast part plus what stands in the sprue, funnel and vents when the mold is
filled to its top face, plus a waste allowance (cup, stirrer, spills; default 15 %).
Parts A and B follow the grade's mix ratio, by weight or by volume as its data sheet
says; weights are rounded up to the scale's resolution so a cast never runs short.
Volumes mm3 (reported as cm3 = ml), masses g, densities g/cm3.

Print estimate: a printed part is walls (its surface times the wall thickness, capped at
its volume) plus infill of the rest, at the filament's density. It is an estimate; the
slicer's figure for the actual settings wins.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from soft_molds.meshdata import TriMesh
from soft_molds.recipe.materials import Blend, Grade
from soft_molds.recipe.model import Recipe
from soft_molds.units import mm3_to_cm3

from .rays import face_normals


def round_up(x: float, step: float) -> float:
    """``x`` rounded up to a multiple of ``step`` (6 decimals, so float noise does not add
    a step)."""
    return round(math.ceil(round(x / step, 6)) * step, 6)


@dataclass(frozen=True)
class Portion:
    """One component to weigh out: ``what`` (e.g. "A10 part A"), ``grams`` and ``ml``
    (both given; ``by`` says which one the data sheet mixes by)."""

    what: str
    grams: float
    ml: float
    by: str


@dataclass(frozen=True)
class Quantities:
    cast_mm3: float
    fill_mm3: float
    waste_pct: float
    mixed_mm3: float              # (cast + fill) x (1 + waste)
    density_g_cm3: float
    mixed_g: float
    portions: tuple[Portion, ...]  # rounded up to the scale's resolution


def silicone_quantities(cast_mm3: float, fill_mm3: float, grade: Grade, waste_pct: float,
                        resolution_g: float, blend: Blend | None = None) -> Quantities:
    """Quantities for one cast of ``cast_mm3`` plus ``fill_mm3`` of silicone."""
    mixed = (cast_mm3 + fill_mm3) * (1.0 + waste_pct / 100.0)
    mass = mm3_to_cm3(mixed) * grade.density_g_cm3
    portions: list[Portion] = []
    parts = ([(blend.first, blend.weight_fraction_first),
              (blend.second, 1.0 - blend.weight_fraction_first)] if blend else [(grade, 1.0)])
    for g, share in parts:
        a, b = g.mix_ratio
        for part, frac in (("A", a / (a + b)), ("B", b / (a + b))):
            grams = mass * share * frac
            portions.append(Portion(f"{g.name} part {part}", round_up(grams, resolution_g),
                                    round(grams / g.density_g_cm3, 3), g.mix_by))
    return Quantities(cast_mm3, fill_mm3, waste_pct, mixed, grade.density_g_cm3, mass,
                      tuple(portions))


def hollow_cylinder_mm3(outer_mm: float, inner_mm: float, length_mm: float) -> float:
    """Closed form pi/4 (D^2 - d^2) L (mm3)."""
    return math.pi / 4.0 * (outer_mm ** 2 - inner_mm ** 2) * length_mm


@dataclass(frozen=True)
class PrintEstimate:
    part: str
    volume_mm3: float
    wall_mm: float
    infill_pct: float
    mass_g: float


def print_estimate(part: str, mesh: TriMesh, volume_mm3: float, wall_mm: float,
                   infill_pct: float, filament_density_g_cm3: float) -> PrintEstimate:
    """Filament for one printed part: walls (surface x ``wall_mm``, at most the volume) solid,
    the rest at ``infill_pct``."""
    area = float(face_normals(mesh)[2].sum())
    walls = min(volume_mm3, area * wall_mm)
    solid = walls + (volume_mm3 - walls) * infill_pct / 100.0
    return PrintEstimate(part, volume_mm3, wall_mm, infill_pct,
                         mm3_to_cm3(solid) * filament_density_g_cm3)


@dataclass(frozen=True)
class CastingPlan:
    grade: Grade
    blend: Blend | None
    quantities: Quantities
    prints: tuple[PrintEstimate, ...]


def plan_casting(r: Recipe, cast_mm3: float, fill_mm3: float,
                 printed: Sequence[tuple[str, TriMesh, float]]) -> CastingPlan:
    """The casting plan of one mold set: silicone quantities and a print estimate for each
    ``(name, mesh, volume_mm3)`` printed part."""
    m, c, p = r.material, r.casting, r.printer
    q = silicone_quantities(cast_mm3, fill_mm3, m.silicone, c.waste_pct, c.scale_resolution_g,
                            m.blend)
    wall = p.perimeters * p.nozzle_mm
    # Every core is estimated solid: a hollow core flexes while pulled and may take on
    # silicone through a pin hole in its skin.
    prints = tuple(print_estimate(name, mesh, vol, wall,
                                  100.0 if name.startswith("core") else c.infill_pct,
                                  c.filament_density_g_cm3)
                   for name, mesh, vol in printed)
    return CastingPlan(m.silicone, m.blend, q, prints)
