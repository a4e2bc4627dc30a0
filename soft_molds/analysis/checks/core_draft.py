"""``core-draft``: how much of the void surface faces against the core's pull.

Each core leaves through its inlet (:data:`soft_molds.constants.CORE_PULL`, -x, from the
start face; +x from the end face); void facets leaning into that pull are not a lock (the
silicone stretches over them, see ``core-extraction``) but their area is worth knowing.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..context import CheckContext
from ..demold import PullReport, pull_report
from ..findings import Severity, finding
from ..registry import CheckOutput, check


@dataclass(frozen=True)
class CoreDraft:
    """The pull report of the void surface along the core's pull (part ``core``, or
    ``core-1``), and those of the other cores (``core-2``, ...) in plan order."""

    report: PullReport
    others: tuple[PullReport, ...] = ()


@check("core-draft", order=200)
def core_draft(ctx: CheckContext) -> CheckOutput:
    """Each core's voids against its own pull; the first core's report rides on the
    output."""
    out = []
    reports = []
    for view in ctx.cores:
        name = view.part.name
        rep = pull_report(ctx.cast, view.void_facets, view.pull, name,
                          ctx.recipe.checks.min_draft_deg)
        sign = "+x" if view.pull[0] > 0 else "-x"
        whose = "the core's" if name == "core" else f"{name}'s"
        out.append(finding(
            "core-draft", Severity.INFO, name,
            f"{rep.locked_area_mm2:.0f} mm2 of the void surface faces against {whose} "
            f"pull ({sign}); least draft {rep.min_draft_deg:.1f} deg; "
            + (f"no matter: the core is {ctx.recipe.core.kind}, not pulled"
               if ctx.recipe.core.lost else
               "the silicone stretches over it (see core-extraction)"),
            value=rep.locked_area_mm2, limit=None,
            where=rep.locked_where_mm))
        reports.append(rep)
    if not reports:  # no core (an open groove's plates: see plate-release)
        return CheckOutput(())
    return CheckOutput(tuple(out), CoreDraft(reports[0], tuple(reports[1:])))
