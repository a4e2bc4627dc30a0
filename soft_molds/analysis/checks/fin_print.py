"""``fin-print``: can the upper shell's fins, which form the recipe's slits, be printed?

A fin stands ``depth_mm`` out of the shell's cavity ceiling and is thinnest at its tip
(the slit's bottom width, before the rounding). Its thickness is compared with the
printability check's watertight wall (``perimeters`` x ``nozzle_mm``, the same printer
values the ``print-wall`` check uses): thinner is a warning (fewer lines per side than
every other wall; the fin may print weak or with gaps), thinner than two extrusion lines
an error (a slicer leaves it out or prints one line that breaks off). A fin much taller
than it is thick wobbles under the nozzle and its top layers print out of place: height
over tip thickness above FIN_ASPECT_WARN is a warning, above FIN_ASPECT_ERROR an error.
``fin-opening``: a sprue or vent whose mouth reaches over a slit is cut down through the
fin beside it (the opening starts at the lowest ceiling under its mouth, the slit's bottom):
the fin loses a notch and the cast gets a flap of silicone in the slit; an error.
A recipe without slits gets no finding.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from ...recipe.cuts import SlitCut
from ..context import CheckContext, MoldOpening
from ..findings import Finding, Severity, finding
from ..printability import Printer
from ..registry import CheckOutput, check

#: Height over thickness above which a free-standing printed fin starts to wobble under
#: the nozzle (from memory: ~8-10 for thin FDM fins).
FIN_ASPECT_WARN = 8.0
#: Height over thickness above which the fin's top is not worth printing (from memory).
FIN_ASPECT_ERROR = 12.0

PART = "shell-upper"


def fin_print_findings(cuts: Sequence[SlitCut], printer: Printer) -> list[Finding]:
    """The findings for the fins filling ``cuts`` on ``printer`` (none without cuts): the
    worst fin's tip thickness and height-to-thickness ratio (mm)."""
    if not cuts:
        return []
    thin = min(cuts, key=lambda c: c.width_bottom_mm)
    t = thin.width_bottom_mm
    tall = max(cuts, key=lambda c: c.depth_mm / c.width_bottom_mm)
    ratio = tall.depth_mm / tall.width_bottom_mm
    wall = printer.min_wall_mm
    least = 2.0 * printer.nozzle_mm
    at = (thin.center_x_mm, thin.center_y_mm, thin.bottom_z_mm)
    out = []
    if t < least:
        out.append(finding(
            "fin-print", Severity.ERROR, PART,
            f"fin tip {t:.2f} mm thick is under two {printer.nozzle_mm:g} mm extrusion "
            f"lines ({least:.2f} mm): the slicer drops it or prints one line that breaks "
            "off; widen the slits (width_mm) or lessen their draft", value=t, limit=least,
            where=at))
    elif t < wall:
        out.append(finding(
            "fin-print", Severity.WARNING, PART,
            f"fin tip {t:.2f} mm thick is under the {wall:.2f} mm printed wall "
            f"({printer.perimeters} x {printer.nozzle_mm:g} mm perimeters): it prints with "
            "fewer lines per side and may come out weak", value=t, limit=wall, where=at))
    sev = (Severity.ERROR if ratio > FIN_ASPECT_ERROR else
           Severity.WARNING if ratio > FIN_ASPECT_WARN else None)
    if sev is not None:
        limit = FIN_ASPECT_ERROR if sev is Severity.ERROR else FIN_ASPECT_WARN
        out.append(finding(
            "fin-print", sev, PART,
            f"fin {tall.depth_mm:g} mm tall over a {tall.width_bottom_mm:.2f} mm tip "
            f"(ratio {ratio:.1f}, above {limit:g}) wobbles under the nozzle; make the slits "
            "shallower or wider", value=ratio, limit=limit,
            where=(tall.center_x_mm, tall.center_y_mm, tall.bottom_z_mm)))
    if not out:
        out.append(finding(
            "fin-print", Severity.INFO, PART,
            f"{len(cuts)} fin(s), thinnest tip {t:.2f} mm (printed wall {wall:.2f} mm), "
            f"height over tip thickness at most {ratio:.1f} (limit {FIN_ASPECT_WARN:g})",
            value=t, limit=wall, where=at))
    return out


def fin_opening_findings(cuts: Sequence[SlitCut], openings: Sequence[MoldOpening]
                         ) -> list[Finding]:
    """An error for each opening whose mouth (a disc in the top face's plane) overlaps a
    slit's outline at the top face (a rectangle in x and y), mm."""
    out = []
    for op in openings:
        x, y, z = op.center_mm
        for c in cuts:
            half = c.width_top_mm / 2.0
            dx = max(abs(x - c.center_x_mm) - half, 0.0)
            dy = max(abs(y - c.center_y_mm) - c.span_mm / 2.0, 0.0)
            reach = op.radius_mm - math.hypot(dx, dy)
            if reach > 1e-6:
                out.append(finding(
                    "fin-opening", Severity.ERROR, PART,
                    f"an opening of {2 * op.radius_mm:g} mm at ({x:.1f}, {y:.1f}) mm reaches "
                    f"{reach:.2f} mm over the slit at x = {c.center_x_mm:.1f} mm: it is cut "
                    "through the fin there", value=reach, limit=0.0, where=(x, y, z)))
                break
    return out


@check("fin-print", "fin-opening", order=620)
def fin_print(ctx: CheckContext) -> CheckOutput:
    cuts = ctx.recipe.outer_cuts()
    return CheckOutput(tuple(fin_print_findings(cuts, ctx.printer)
                             + fin_opening_findings(cuts, ctx.openings)))
