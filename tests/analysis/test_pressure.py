"""Wall thickness of the pressure check: measured through the silicone along each wall's
own outward normal. Expected figures are closed-form geometry of the primitives and the
bundled recipes' numbers (demo scenario), worked beside each check."""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import recipe_path

from soft_molds import load_recipe
from soft_molds.analysis.pressure import thickness_along, wall_pressures
from soft_molds.recipe.primitives import RoundedBox, RoundedRod

BOX = (RoundedBox((0.0, 0.0, 0.0), (20.0, 10.0, 10.0), 0.0),)


def test_the_march_meets_the_face_the_ray_crosses_not_the_nearest_one():
    # 20 x 10 x 10 box at the origin. From (5, 0, 0) along +x the ray leaves at x = 10:
    # 5 mm, although the faces y = +-5 and z = +-5 are as near (closed form). Along
    # (1, 1, 0)/sqrt 2 from the centre it leaves through y = 5 at 5 sqrt 2 = 7.071 mm.
    at = np.array([[5.0, 0.0, 0.0], [0.0, 0.0, 0.0], [0.0, 0.0, 0.0]])
    n = np.array([[1.0, 0.0, 0.0], [1.0, 1.0, 0.0], [0.0, 0.0, -1.0]])
    t = thickness_along(BOX, at, n)
    np.testing.assert_allclose(t, [5.0, 5.0 * math.sqrt(2.0), 5.0], atol=1e-5)


def test_the_march_follows_a_round_body_and_gives_zero_outside():
    # A rod of radius 7 along x: from its axis, any radial ray leaves after 7 mm; from a
    # point 3 mm off the axis along the ray's own direction, after 7 - 3 = 4 mm (closed
    # form). A point outside the body has no wall: 0.
    rod = (RoundedRod("x", 0.0, 60.0, (0.0, 0.0), 7.0, 2.0),)
    d = np.array([0.0, 1.0, 1.0]) / math.sqrt(2.0)
    at = np.array([[30.0, 0.0, 0.0], 30.0 * np.eye(3)[0] + 3.0 * d, [30.0, 8.0, 0.0]])
    t = thickness_along(rod, at, np.array([d, d, [0.0, 1.0, 0.0]]))
    np.testing.assert_allclose(t, [7.0, 4.0, 0.0], atol=1e-5)


def _walls(name: str) -> dict:
    _, walls = wall_pressures(load_recipe(recipe_path(name)))
    return {w.group: w for w in walls}


def test_the_finger_end_wall_is_the_chamber_start_not_the_nearer_top_face():
    # seedling-finger: 7 chambers, pitch 8, depth 5 -> a row 6 x 8 + 5 = 53 mm long,
    # centred on the 70 mm bar: the first chamber starts at (70 - 53) / 2 = 8.5 mm, so its
    # end wall, from x = 8.5 out along -x to the inlet face x = 0, is 8.5 - 0 = 8.5 mm (the
    # last one's, 70 - (8.5 + 53) = 8.5 mm too). The top face is nearer to that wall's
    # middle (7 - 1 = 6 mm, the figure the nearest-surface distance gave) but is not the
    # way the wall bulges.
    walls = _walls("seedling-finger")
    end = walls["end wall"]
    assert end.thickness_mm == pytest.approx(8.5, abs=1e-5)
    assert end.at_mm == pytest.approx((8.5, 0.0, 1.0))
    # Walls square to their faces: top 7 - (1 + 4) = 2, bottom 7 - (4 - 1) = 4,
    # sides 8 - 6 = 2 mm (the bar is 16 wide, 14 high; chambers 12 x 8 centred 1 mm up).
    assert walls["top wall"].thickness_mm == pytest.approx(2.0, abs=1e-5)
    assert walls["bottom wall"].thickness_mm == pytest.approx(4.0, abs=1e-5)
    assert walls["side wall"].thickness_mm == pytest.approx(2.0, abs=1e-5)


def test_the_pusher_end_cap_is_measured_along_the_bore_to_the_far_face():
    # tray-pusher: a 6 mm bore from x = 0 to 50 in a 14 mm rod 60 mm long: the end cap,
    # from x = 50 along +x, is 60 - 50 = 10 mm (the rod's side, 7 - 0 = 7 mm from the cap's
    # middle, is nearer but not along the cap); the bore wall is 7 - 3 = 4 mm all round.
    walls = _walls("tray-pusher")
    assert walls["end cap"].thickness_mm == pytest.approx(10.0, abs=1e-5)
    assert walls["bore wall"].thickness_mm == pytest.approx(4.0, abs=1e-5)
