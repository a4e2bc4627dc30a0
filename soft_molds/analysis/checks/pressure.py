"""``pressure``: the limit pressure of each group of pressurised walls against the working
pressure (an estimate for choosing sweep ranges, see :mod:`soft_molds.analysis.pressure`)."""

from __future__ import annotations

from dataclasses import dataclass

from ..context import CheckContext
from ..pressure import WallPressure, pressure_findings, wall_pressures
from ..registry import CheckOutput, check


@dataclass(frozen=True)
class Pressures:
    """Young's modulus used (MPa; ``None`` when the grade's scale gives none) and the
    weakest wall of each group."""

    modulus_mpa: float | None
    walls: tuple[WallPressure, ...]


@check("pressure", order=700)
def pressure(ctx: CheckContext) -> CheckOutput:
    e_mpa, walls = wall_pressures(ctx.recipe)
    return CheckOutput(tuple(pressure_findings(ctx.recipe, e_mpa, walls)),
                       Pressures(e_mpa, walls))
