"""The plate body's solid (an outline of lines and arcs pushed along z) against closed forms.

Sources: the hub's area by elementary plane geometry (disc, plus per arm its strip w x L
less the strip's part in the disc, h sqrt(R^2 - h^2) + R^2 asin(h/R), less the two tip
spandrels (1 - pi/4) r^2); the rounded rectangle w h - (4 - pi) r^2. Tolerance 0.1 % on
the BRep (the kernel's own volume integration). Bounds against the outline's extremes.
"""

from __future__ import annotations

import math

import pytest

from soft_molds.recipe.kinds.plate import Plate

PI = math.pi


def hub_area(radius: float, n: int, length: float, width: float, tip: float) -> float:
    h = width / 2.0
    in_disc = h * math.sqrt(radius ** 2 - h * h) + radius ** 2 * math.asin(h / radius)
    return PI * radius ** 2 + n * (width * length - in_disc - 2.0 * (1.0 - PI / 4.0) * tip ** 2)


@pytest.mark.parametrize("plate, area", [
    (Plate(6.0, None, None, 30.0, 4, 45.0, 14.0, 3.0, None), hub_area(15.0, 4, 45.0, 14.0, 3.0)),
    # A round tip (half the width) and three arms at uneven angles.
    (Plate(6.0, None, None, 24.0, 3, 40.0, 10.0, 5.0, (180.0, 60.0, 280.0)),
     hub_area(12.0, 3, 40.0, 10.0, 5.0)),
    # The default tip rounding: a quarter of the width.
    (Plate(6.0, None, None, 24.0, 2, 40.0, 10.0, None, None), hub_area(12.0, 2, 40.0, 10.0, 2.5)),
    # One arm: the hub arc turns by more than half a turn (built as two halves).
    (Plate(5.0, None, None, 20.0, 1, 30.0, 8.0, 1.0, None), hub_area(10.0, 1, 30.0, 8.0, 1.0)),
    (Plate(4.0, ((0.0, 0.0), (30.0, 0.0), (30.0, 20.0), (0.0, 20.0)), 3.0, None, None, None,
           None, None, None), 600.0 - (4.0 - PI) * 9.0),
])
def test_the_plate_solid_holds_its_closed_form_volume(plate, area):
    from soft_molds.geometry.kernel import build_primitive, volume

    solid = build_primitive(plate.solid(), "body")
    want = area * plate.thickness_mm
    assert abs(volume(solid) - want) <= 1e-3 * want
    bb = solid.BoundingBox()
    lo, hi = plate.solid().bounds()
    assert abs(bb.xmin - lo[0]) < 1e-3 and abs(bb.xmax - hi[0]) < 1e-3
    assert abs(bb.zmin + plate.thickness_mm / 2.0) < 1e-6


def test_a_turned_post_is_built_turned_with_its_closed_form_volume():
    # The post's volume: Simpson's rule on its drafted sections (plan/model.Post, checked
    # in tests/plan/test_post_angle.py); turned by 90 deg its x extent is its y size.
    from soft_molds.geometry.kernel import volume
    from soft_molds.geometry.layered import post_solid
    from soft_molds.plan.model import Post

    p = Post("p", (20.0, 5.0), (10.0, 4.0), 1.0, -3.0, 6.0, 1.0, 90.0)
    solid = post_solid(p)
    assert abs(volume(solid) - p.volume_mm3()) <= 1e-6 * p.volume_mm3()
    bb = solid.BoundingBox()
    assert (bb.xmin, bb.xmax) == pytest.approx((18.0, 22.0), abs=1e-6)
    assert (bb.ymin, bb.ymax) == pytest.approx((0.0, 10.0), abs=1e-6)
