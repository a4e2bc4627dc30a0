"""``fin-draft``: do the upper shell's fins leave the slits along the shell's pull?

Measured on the upper shell's mesh: the facets of each fin's two side walls (centroid
inside the slit's section and inside the body's extent along y, normal mostly along x).
A facet's draft against the pull p is asin(-n . p) with n its outward normal (it points
into the silicone): positive when the wall moves away from the silicone as the shell
rises, zero for a wall along the pull, negative for a fin wider at its tip than at its
root, which tears the silicone between slit and chamber. The least draft is an error
below 0, a warning below ``checks.min_draft_deg`` (zero included), else a figure. A recipe
without slits gets no finding.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from ...meshdata import TriMesh
from ...recipe.cuts import SlitCut
from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..rays import face_normals
from ..registry import CheckOutput, check

PART = "shell-upper"

#: A fin wall facet's normal is at least this much along x (cos 45 deg): the rounded tip
#: and the faces the fin meets beside the body are left out.
WALL_NORMAL_X = math.cos(math.radians(45.0))
#: Round-off of a draft measured on tessellated planar walls (deg): a wall drafted exactly
#: at the limit is not under it.
DRAFT_TOL_DEG = 1e-3
#: Tolerance on the slit's section when picking facets (mm): a mesh chord's worth.
PICK_TOL_MM = 0.05


def fin_drafts(mesh: TriMesh, cuts: Sequence[SlitCut], pull: Sequence[float],
               y_range_mm: tuple[float, float] | None, inside_span_mm: float = 0.0
               ) -> tuple[float, tuple[float, float, float]]:
    """Least draft (deg) over the side-wall facets of every fin, and where (mm); (nan,
    origin) when no facet is found. Facets are picked in each slit's own frame (a turned
    slit's x runs along its row): within ``y_range_mm`` of world y (the body's extent), or
    without it within each slit's span less ``inside_span_mm`` at either end."""
    c, n, _ = face_normals(mesh)
    p = np.asarray(pull, dtype=np.float64)
    pick = np.zeros(len(c), dtype=bool)
    for cut in cuts:
        local = cut.to_local(c)
        z = local[:, 2]
        inside_z = (z > cut.bottom_z_mm + cut.round_mm) & (z < cut.top_z_mm - PICK_TOL_MM)
        half = cut.width_bottom_mm / 2.0 + (z - cut.bottom_z_mm) * cut.lean
        inside_x = np.abs(local[:, 0] - cut.center_x_mm) <= half + PICK_TOL_MM
        t = math.radians(cut.angle_deg)
        across = np.abs(n[:, 0] * math.cos(t) + n[:, 1] * math.sin(t)) >= WALL_NORMAL_X
        here = inside_z & inside_x & across
        if y_range_mm is None:
            here &= (np.abs(local[:, 1] - cut.center_y_mm)
                     < cut.span_mm / 2.0 - inside_span_mm)
        pick |= here
    if y_range_mm is not None:
        pick &= (c[:, 1] > y_range_mm[0]) & (c[:, 1] < y_range_mm[1])
    if not pick.any():
        return math.nan, (0.0, 0.0, 0.0)
    draft = np.degrees(np.arcsin(np.clip(-(n[pick] @ p), -1.0, 1.0)))
    i = int(np.argmin(draft))
    w = c[pick][i]
    return float(draft[i]), (float(w[0]), float(w[1]), float(w[2]))


def fin_draft_findings(least_deg: float, where: tuple[float, float, float],
                       min_draft_deg: float) -> list[Finding]:
    """The finding for the fins' least draft (deg) against ``checks.min_draft_deg``."""
    if math.isnan(least_deg):
        return []
    if abs(least_deg) < DRAFT_TOL_DEG:
        least_deg = 0.0  # a straight wall, not -0.00 deg of round-off
    if least_deg < -DRAFT_TOL_DEG:
        return [finding("fin-draft", Severity.ERROR, PART,
                        f"a fin is wider at its tip than at its root (draft {least_deg:.2f} "
                        "deg): pulling the shell tears the silicone beside the slit",
                        value=least_deg, limit=0.0, where=where)]
    if least_deg < min_draft_deg - DRAFT_TOL_DEG:
        return [finding("fin-draft", Severity.WARNING, PART,
                        f"least fin draft {least_deg:.2f} deg is under checks.min_draft_deg "
                        f"= {min_draft_deg:g} deg: the fins drag on the slit walls as the "
                        "shell comes off; give the slits draft_deg", value=least_deg,
                        limit=min_draft_deg, where=where)]
    return [finding("fin-draft", Severity.INFO, PART,
                    f"least fin draft {least_deg:.2f} deg along the pull (checks.min_draft_deg "
                    f"= {min_draft_deg:g} deg)", value=least_deg, limit=min_draft_deg,
                    where=where)]


@check("fin-draft", order=630)
def fin_draft(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    cuts = r.outer_cuts()
    if not cuts or "shell-upper" not in ctx.parts:
        return CheckOutput(())
    lo, hi = r.body_bounds()
    part = ctx.parts["shell-upper"]
    least, where = fin_drafts(part.surface.mesh, cuts, part.pull or ctx.up,
                              (lo[1], hi[1]))
    return CheckOutput(tuple(fin_draft_findings(least, where, r.checks.min_draft_deg)))
