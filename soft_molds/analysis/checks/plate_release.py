"""``plate-release``: does each plate of a ring's open groove slide out of the silicone
along its pull?

The groove's cast facets (on the groove's revolved rectangle, found with its exact distance
function) on a plate's side of the plane y = 0 are pulled along that plate's direction with
the demold check (:func:`soft_molds.analysis.demold.pull_report`, rays on the cast's own
mesh): any locked area is an error (the plate would tear the lip or the bore wall), and the
least draft is reported (the groove's walls lie along the pull, draft 0: flat plates slide
off a flat silicone wall). A recipe without an open groove gets no finding.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ...plan.groove import PLATE_PARTS
from ...recipe.primitives import union_sdf
from ..context import CheckContext
from ..demold import PullReport, pull_report
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..wording import point

#: A cast facet is on the groove when its centroid lies this close to the groove's surface
#: (mm): a chord's worth.
ON_GROOVE_MM = 0.05


@dataclass(frozen=True)
class PlateRelease:
    """The pull report of each plate against its half of the groove, in plate order."""

    reports: tuple[PullReport, ...]


@check("plate-release", order=210)
def plate_release(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    if r.groove() is None:
        return CheckOutput(())
    cast = ctx.cast
    on = np.abs(union_sdf(r.outer_primitives(), cast.centroids)) <= ON_GROOVE_MM
    out: list[Finding] = []
    reports = []
    for name in PLATE_PARTS:
        part = ctx.parts[name]
        pull = part.pull
        assert pull is not None
        side = cast.centroids[:, 1] * pull[1] >= -ON_GROOVE_MM
        rep = pull_report(cast, on & side, pull, name, r.checks.min_draft_deg)
        reports.append(rep)
        way = "+y" if pull[1] > 0 else "-y"
        if rep.locked_area_mm2 > 0.0:
            out.append(finding(
                "plate-release", Severity.ERROR, name,
                f"{name} cannot slide out along {way}: {rep.locked_area_mm2:.1f} mm2 of "
                f"the groove locked, {rep.locked_depth_mm:.1f} mm deep, near "
                f"{point(rep.locked_where_mm)}", value=rep.locked_area_mm2, limit=0.0,
                where=rep.locked_where_mm))
        else:
            out.append(finding(
                "plate-release", Severity.INFO, name,
                f"{name} slides out along {way} off {rep.area_mm2:.0f} mm2 of the groove: "
                f"nothing locked; least draft {rep.min_draft_deg:.2f} deg (the groove's "
                "walls lie along the pull)", value=rep.locked_area_mm2, limit=0.0,
                where=rep.min_draft_where_mm))
    return CheckOutput(tuple(out), PlateRelease(tuple(reports)))
