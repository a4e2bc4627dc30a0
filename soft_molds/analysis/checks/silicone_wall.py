"""``silicone-wall``: the thinnest silicone wall of each kind (outer, between voids).

Measured by rays from the void surface through the silicone
(:mod:`soft_molds.analysis.walls`): an error below ``checks.min_wall_mm`` by more than the
report's resolution, a warning when some area is below it by less, else a figure.

On a curved inlet face (a ring's outer face) the socket's side meets the face at a feather
edge round its mouth: the socket facets within the mouth's depth
(:func:`soft_molds.recipe.sanity.mouth_depth_mm`, the face's standback at the rim plus the
least wall) are left out, as the flat inlet face is on other bodies, and the finding says
so.
"""

from __future__ import annotations

from functools import partial

import numpy as np

from soft_molds.recipe.model import Recipe
from soft_molds.recipe.sanity import mouth_depth_mm, wall_keys_at

from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..walls import RESOLUTION_MM, wall_map
from ..wording import point


@check("silicone-wall", order=400)
def silicone_wall(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    limit = r.checks.min_wall_mm
    curved = bool(getattr(type(r.body), "CURVED_INLET_FACE", False)) and bool(r.inlets)
    walls = wall_map(ctx.cast, ctx.void_facets, limit,
                     skip=partial(_in_curved_mouth, r) if curved else None)
    left_out = ("; the socket's mouth on the curved inlet face (a feather edge, checked "
                "when the recipe is read) left out" if curved else "")
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
            + (" (thin walls balloon and burst)" if sev is not Severity.INFO else "") + keys
            + left_out,
            value=wk.min_mm, limit=limit, where=wk.where_mm))
    return CheckOutput(tuple(out), walls)


def _in_curved_mouth(r: Recipe, p: np.ndarray) -> np.ndarray:
    """Points ``p`` (n, 3) on a socket's side within its mouth depth on a curved inlet
    face."""
    tol = min(0.1, r.checks.min_wall_mm / 3.0)
    out = np.zeros(len(p), dtype=bool)
    for j, (inlet, sock) in enumerate(zip(r.inlets, r.sockets())):
        face = inlet.face_x_mm(r.body_length_mm)
        depth_in = (face - p[:, 0]) if inlet.at_end else (p[:, 0] - face)
        out |= (np.abs(sock.sdf(p)) <= tol) & (depth_in < mouth_depth_mm(r, j))
    return out
