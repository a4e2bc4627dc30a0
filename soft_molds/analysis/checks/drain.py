"""``drain``: a lost core's solution or melt leaves the cast (``core.kind: dissolved`` or
``melted``).

Standing inlet-down, every void group must drain to its own socket without climbing
(:mod:`soft_molds.plan.drain`): a pocket whose only way out lies above it keeps the
dissolved core in it, an error naming its lowest point and volume. Nothing for a pulled
core.
"""

from __future__ import annotations

from ...plan.drain import Drainage, drainage
from ...recipe.feeds import core_groups
from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..wording import point

#: Pocket volume below which a sampled pocket is grid noise at a void's rounded edge (mm3):
#: a few cells of the 0.5 mm grid.
NOISE_MM3 = 0.5


@check("drain", order=310)
def drain_check(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    if not r.core.lost:
        return CheckOutput(())
    voids = r.void_primitives()
    out: list[Finding] = []
    results: list[Drainage] = []
    for g in core_groups(r):
        inlet = r.inlets[g.inlet]
        d = drainage([p for i in g.voids for p in voids[i]], r.sockets()[g.inlet],
                     inlet.at_end)
        results.append(d)
        name = "core" if len(r.inlets) == 1 else f"core-{g.inlet + 1}"
        face = "x = 0" if not inlet.at_end else "far"
        if d.pocket_mm3 > NOISE_MM3 and d.where_mm is not None:
            out.append(finding(
                "drain", Severity.ERROR, name,
                f"standing on its {face} face, {d.pocket_mm3:.1f} mm3 of the voids "
                f"{name} forms cannot drain to its socket: the only way out lies above "
                f"the pocket whose lowest point is near {point(d.where_mm)}; give that "
                "pocket a path down to the socket, or a drain hole to plug after",
                value=d.pocket_mm3, limit=0.0, where=d.where_mm))
        else:
            out.append(finding(
                "drain", Severity.INFO, name,
                f"standing on its {face} face, all {d.void_mm3:.0f} mm3 of the voids "
                f"{name} forms drains to its socket: the {r.core.kind} core flushes out",
                value=d.pocket_mm3, limit=0.0))
    return CheckOutput(tuple(out), tuple(results))
