"""``silicone-wall``: the thinnest silicone wall of each kind (outer, between voids).

Measured by rays from the void surface through the silicone
(:mod:`soft_molds.analysis.walls`): an error below ``checks.min_wall_mm`` by more than the
report's resolution, a warning when some area is below it by less, else a figure.
"""

from __future__ import annotations

from soft_molds.recipe.sanity import wall_keys_at

from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..walls import RESOLUTION_MM, wall_map
from ..wording import point


@check("silicone-wall", order=400)
def silicone_wall(ctx: CheckContext) -> CheckOutput:
    limit = ctx.recipe.checks.min_wall_mm
    walls = wall_map(ctx.cast, ctx.void_facets, limit)
    out: list[Finding] = []
    for wk in (walls.outer, walls.between):
        if wk.samples == 0:
            continue
        if wk.min_mm < limit - RESOLUTION_MM + 1e-9:
            sev = Severity.ERROR
        elif wk.thin_area_mm2 > 0.0 and wk.min_mm < limit - 1e-9:
            sev = Severity.WARNING
        else:
            sev = Severity.INFO
        # An error names the keys that set the wall (notes and warnings keep their words).
        keys = ""
        if sev is Severity.ERROR and wk.where_mm is not None:
            keys = ("; change " + wall_keys_at(ctx.recipe, wk.where_mm, wk is walls.between))
        out.append(finding(
            "silicone-wall", sev, "cast",
            f"thinnest {wk.kind} wall {wk.min_mm:.2f} mm at {point(wk.where_mm)}; "
            f"{wk.thin_area_mm2:.1f} mm2 below checks.min_wall_mm = {limit:g} mm"
            + (" (thin walls balloon and burst)" if sev is not Severity.INFO else "") + keys,
            value=wk.min_mm, limit=limit, where=wk.where_mm))
    return CheckOutput(tuple(out), walls)
