"""The grip tab at the outer end of a core print, which carries the core's label, as
numbers (world mm): where it goes and how large it is. The geometry stage builds it; the
plan needs its extent too, for the mold of a core cast in its own mold (a melted core),
whose cavity includes the tab.
"""

from __future__ import annotations

from collections.abc import Sequence

from ..recipe.model import Recipe
from .model import CoreSupport, PartingPlane

#: Least gap between the grip tabs of two core prints in one face (mm).
TAB_GAP_MM = 1.0

#: Least land kept between a label and the edges of the face it is cut into (mm); never
#: less than a printed wall (perimeters x nozzle) beyond the strokes' round ends.
LABEL_MARGIN_MM = 1.5


def label_margin(r: Recipe) -> float:
    wall = r.printer.perimeters * r.printer.nozzle_mm
    return max(LABEL_MARGIN_MM, wall + r.label_settings.stroke_mm / 2.0 + 0.1)


def core_label_text(r: Recipe, support: CoreSupport) -> str:
    """The label of a core: the recipe's, followed by the core's number when there are
    several (``core-2`` carries "... 2"), so each core goes back to its own socket."""
    number = support.part.removeprefix("core").removeprefix("-")
    return f"{r.label_text} {number}" if number else r.label_text


def core_tag(r: Recipe, support: CoreSupport, parting: PartingPlane,
             others: Sequence[CoreSupport] = ()
             ) -> tuple[tuple[float, float, float], tuple[float, float, float]] | None:
    """The flat grip tab at the outer end of the core print that carries the label: a box
    (lo, hi) in the parting plane's directions, thick enough for the cut and a printed wall
    below it; no wider across than keeps TAB_GAP_MM to the tabs of the ``others`` prints in
    the same face (each takes at most half the distance between centres). None when labels
    are off."""
    from ..recipe.strokefont import text_width_mm

    ls = r.label_settings
    if ls.mode == "none":
        return None
    wa = parting.w_axis
    va = 3 - wa
    cy, cz = support.inlet.center_mm
    c = (0.0, cy, cz)
    length = text_width_mm(core_label_text(r, support), ls.height_mm) + 2.0 * label_margin(r)
    across = ls.height_mm + 2.0 * label_margin(r)
    for o in others:
        if o.part != support.part and o.outward == support.outward:
            apart = abs(o.inlet.center_mm[va - 1] - support.inlet.center_mm[va - 1])
            across = min(across, apart - TAB_GAP_MM)
    thick = max(2.5, ls.depth_mm + r.printer.perimeters * r.printer.nozzle_mm)
    lo, hi = [0.0] * 3, [0.0] * 3
    # The tab continues the print outward, away from the block.
    if support.outward > 0:
        lo[0], hi[0] = support.start_x_mm, support.start_x_mm + length
    else:
        lo[0], hi[0] = support.start_x_mm - length, support.start_x_mm
    lo[va], hi[va] = c[va] - across / 2.0, c[va] + across / 2.0
    lo[wa], hi[wa] = c[wa] - thick / 2.0, c[wa] + thick / 2.0
    return tuple(lo), tuple(hi)  # type: ignore[return-value]
