"""``draft``, ``undercut`` and ``core-lock``: can each shell be pulled off the cast, and off
the core print it holds?

Each shell pulls along its side of the parting plane (the lower along -up, the upper along
+up; :func:`soft_molds.analysis.demold.score_plane`). Against the silicone a locked
undercut is a warning with its depth (silicone flexes); against the core print, rigid
against rigid, it is an error. Rays that leave through a sprue or vent do not lock the
upper shell.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..context import CheckContext
from ..demold import PullReport, score_plane
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..wording import axis, point


@dataclass(frozen=True)
class ShellRelease:
    """Pull reports of shell-lower and shell-upper against the cast, then of each against
    the core print (parts named ``shell-lower/core``, ``shell-upper/core``)."""

    reports: tuple[PullReport, ...]


@check("draft", "undercut", "core-lock", order=100)
def shell_release(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    if r.parting.offset_mm is None:
        raise ValueError("the review needs the parting plane chosen (parting.offset_mm)")
    # No core (an open groove's plates): the shells meet only the cast.
    _, pulls = score_plane(ctx.cast, ctx.outer_facets, r.parting.axis,
                           float(r.parting.offset_mm),
                           ctx.core.surface if ctx.has_core else None,
                           ctx.core_contact if ctx.has_core else None,
                           r.checks.min_draft_deg, ctx.openings)
    out: list[Finding] = []
    for rep in pulls:
        if rep.area_mm2 == 0.0:
            continue
        if "/core" in rep.part:
            out.extend(_core_lock(rep))
        else:
            out.extend(_against_cast(rep))
    return CheckOutput(tuple(out), ShellRelease(tuple(pulls)))


def _core_lock(rep: PullReport) -> list[Finding]:
    part = rep.part.split("/")[0]
    if rep.locked_area_mm2 <= 0.0:
        return []
    return [finding(
        "core-lock", Severity.ERROR, part,
        f"{part} cannot be pulled {axis(rep.pull)} off the core print: "
        f"{rep.locked_area_mm2:.1f} mm2 locked, {rep.locked_depth_mm:.1f} mm deep, "
        f"near {point(rep.locked_where_mm)}; put the parting plane through the "
        "socket axis", value=rep.locked_area_mm2, limit=0.0, where=rep.locked_where_mm)]


def _against_cast(rep: PullReport) -> list[Finding]:
    part = rep.part
    out = []
    if rep.locked_area_mm2 > 0.0:
        out.append(finding(
            "undercut", Severity.WARNING, part,
            f"{rep.locked_area_mm2:.1f} mm2 of the cast is locked in an undercut when "
            f"{part} pulls {axis(rep.pull)} ({rep.locked_regions} region(s), deepest "
            f"{rep.locked_depth_mm:.1f} mm, near {point(rep.locked_where_mm)}); the "
            "silicone must flex that far to release", value=rep.locked_depth_mm,
            limit=0.0, where=rep.locked_where_mm))
    out.append(finding(
        "draft", Severity.INFO, part,
        f"least draft {rep.min_draft_deg:.2f} deg at {point(rep.min_draft_where_mm)}; "
        f"{rep.low_draft_area_mm2:.0f} of {rep.area_mm2:.0f} mm2 below "
        f"{rep.min_draft_limit_deg:g} deg (silicone flexes off undrafted walls; stiff "
        "grades release more easily with draft)", value=rep.min_draft_deg,
        limit=rep.min_draft_limit_deg, where=rep.min_draft_where_mm))
    return out
