"""``motion``: says when no motion curve is predicted because the body has no long axis.

The motion models (:mod:`soft_molds.analysis.motion`) cut the cast into sections along x
and treat it as a beam along that axis; a body kind without one (a ``ring``, whose
``LONG_AXIS`` is False) gets no curve, and this note says so instead of leaving it out
silently. Nothing for a body with a long axis.
"""

from __future__ import annotations

from ..context import CheckContext
from ..findings import Severity, finding
from ..registry import CheckOutput, check


@check("motion", order=710)
def motion_scope(ctx: CheckContext) -> CheckOutput:
    body = ctx.recipe.body
    if getattr(type(body), "LONG_AXIS", True):
        return CheckOutput(())
    return CheckOutput((finding(
        "motion", Severity.INFO, "cast",
        f"no motion curve: the motion models treat the cast as a beam along x, and a "
        f"{type(body).KIND} body has no long axis; the pressure check's balloon limits "
        "still apply"),))
