"""``motion``: says when no motion curve is predicted because the body (or a void) has no
long axis.

The motion models (:mod:`soft_molds.analysis.motion`) cut the cast into sections along x
and treat it as a beam along that axis; a body kind without one (a ``ring``, whose
``LONG_AXIS`` is False) gets no curve, and this note says so instead of leaving it out
silently; so does a void kind without one (a ``channels`` network, whose chambers turn
with their paths). Nothing when every one has a long axis.
"""

from __future__ import annotations

from ...recipe.model import Recipe
from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check


@check("motion", order=710)
def motion_scope(ctx: CheckContext) -> CheckOutput:
    body = ctx.recipe.body
    if getattr(type(body), "LONG_AXIS", True):
        return CheckOutput(network_motion_notes(ctx.recipe))
    return CheckOutput((finding(
        "motion", Severity.INFO, "cast",
        f"no motion curve: the motion models treat the cast as a beam along x, and a "
        f"{type(body).KIND} body has no long axis; the pressure check's balloon limits "
        "still apply"),))


def network_motion_notes(r: Recipe) -> tuple[Finding, ...]:
    """The note for a void without a long axis (a channel network with turned arms)."""
    kinds = sorted({type(v).KIND for v in r.voids
                    if not getattr(type(v), "LONG_AXIS", True)})
    if not kinds:
        return ()
    return (finding(
        "motion", Severity.INFO, "cast",
        f"no motion curve: the motion models treat the cast as a beam along x, and a "
        f"{kinds[0]} void turns its chambers with its paths; the pressure check's balloon "
        "limits still apply"),)
