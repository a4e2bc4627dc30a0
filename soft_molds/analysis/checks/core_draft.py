"""``core-draft``: how much of the void surface faces against the core's pull.

The core leaves along :data:`soft_molds.constants.CORE_PULL` (-x) through the inlet; void
facets leaning into that pull are not a lock (the silicone stretches over them, see
``core-extraction``) but their area is worth knowing.
"""

from __future__ import annotations

from dataclasses import dataclass

from soft_molds.constants import CORE_PULL

from ..context import CheckContext
from ..demold import PullReport, pull_report
from ..findings import Severity, finding
from ..registry import CheckOutput, check


@dataclass(frozen=True)
class CoreDraft:
    """The pull report of the void surface along the core's pull (part ``core``)."""

    report: PullReport


@check("core-draft", order=200)
def core_draft(ctx: CheckContext) -> CheckOutput:
    rep = pull_report(ctx.cast, ctx.void_facets, CORE_PULL, "core",
                      ctx.recipe.checks.min_draft_deg)
    f = finding(
        "core-draft", Severity.INFO, "core",
        f"{rep.locked_area_mm2:.0f} mm2 of the void surface faces against the core's "
        f"pull (-x); least draft {rep.min_draft_deg:.1f} deg; the silicone stretches "
        "over it (see core-extraction)", value=rep.locked_area_mm2, limit=None,
        where=rep.locked_where_mm)
    return CheckOutput((f,), CoreDraft(rep))
