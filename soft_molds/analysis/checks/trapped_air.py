"""``trapped-air``: a high point of the cavity that no opening of the built mold vents.

Checked on the closed mold as built (:mod:`soft_molds.analysis.trapped_air`), with the
same high-point thresholds the opening planner used (:mod:`soft_molds.constants`).
"""

from __future__ import annotations

from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..trapped_air import trapped_air
from ..wording import point


@check("trapped-air", order=500)
def trapped_air_check(ctx: CheckContext) -> CheckOutput:
    air = trapped_air(ctx.cast.mesh, ctx.up, ctx.mold)
    out: list[Finding] = [finding(
        "trapped-air", Severity.ERROR, "shell-upper",
        f"air is trapped under a high point of the cavity at {point(hp.position_mm)} (no "
        "vent or sprue above it)", value=hp.height_mm, limit=None, where=hp.position_mm)
        for hp in air.trapped]
    out.append(finding(
        "trapped-air", Severity.INFO, "shell-upper",
        f"{len(air.high_points)} high point(s) in the cavity, {len(air.trapped)} not vented",
        value=float(len(air.trapped)), limit=0.0))
    return CheckOutput(tuple(out), air)
