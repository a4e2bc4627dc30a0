"""Whether a mold part can lie on the printer at all, known from the plan before anything is
built: a box of the part's size must fit under the printer's height on its bed in some
orientation, turned in the bed plane if that helps. Mm.

The part is taken as its block (the shells' keys and funnel are left out), so a part this
refuses cannot be printed in any orientation the print planner would choose; the planner
itself still decides the orientation of parts that pass.
"""

from __future__ import annotations

import math


def rectangle_fits(p: float, q: float, a: float, b: float) -> bool:
    """Does a p x q rectangle fit in an a x b rectangle, turned as needed? (The closed-form
    condition of J. E. Wetzel, "Rectangles in rectangles", Math. Magazine 73(3), 2000.)"""
    p, q = max(p, q), min(p, q)
    a, b = max(a, b), min(a, b)
    if p <= a and q <= b:
        return True
    if q > b:  # any placement spans at least q across the short side
        return False
    need = (2.0 * p * q * a + (p * p - q * q) * math.sqrt(p * p + q * q - a * a)) / (p * p + q * q)
    return b >= need


def box_fits(size_mm: tuple[float, float, float], bed_mm: tuple[float, float],
             height_mm: float) -> bool:
    """Does a box of ``size_mm`` fit the printer on one of its faces, turned in the bed plane
    as needed?"""
    for up, a, b in ((2, 0, 1), (1, 0, 2), (0, 1, 2)):
        if size_mm[up] <= height_mm and rectangle_fits(size_mm[a], size_mm[b], *bed_mm):
            return True
    return False
