"""The void graph: which voids overlap with positive volume, decided from the primitives'
exact cores, against an independent boolean (manifold3d intersecting polygonal solids),
and the groups it makes of a recipe's voids."""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest

from soft_molds.recipe import voidgraph
from soft_molds.recipe.primitives import RoundedBox, RoundedRod

SEGMENTS = 256  # an inscribed 256-gon misses its circle by r (1 - cos(pi/256)) < 1e-4 r


def _solid(p) -> m3.Manifold:
    """The primitive as a manifold3d solid: a box, a hull of eight corner balls (a rounded
    box), a cylinder along x, or a hull of two end balls (a rod rounded by its radius)."""
    if isinstance(p, RoundedBox):
        c, s, r = np.asarray(p.center_mm), np.asarray(p.size_mm), p.radius_mm
        if r == 0.0:
            return m3.Manifold.cube(tuple(s), True).translate(tuple(c))
        ball = m3.Manifold.sphere(r, SEGMENTS)
        h = s / 2.0 - r
        corners = [ball.translate(tuple(c + h * np.array(k))) for k in
                   [(i, j, m) for i in (-1, 1) for j in (-1, 1) for m in (-1, 1)]]
        return m3.Manifold.batch_hull(corners)
    y, z = p.center_mm
    if p.end_radius_mm == 0.0:
        cyl = m3.Manifold.cylinder(p.length_mm, p.radius_mm, p.radius_mm, SEGMENTS)
        return cyl.rotate((0.0, 90.0, 0.0)).translate((p.start_mm, y, z))
    ball = m3.Manifold.sphere(p.radius_mm, SEGMENTS)
    ends = (p.start_mm + p.radius_mm, p.start_mm + p.length_mm - p.radius_mm)
    return m3.Manifold.batch_hull([ball.translate((x, y, z)) for x in ends])


def _random(rng: np.random.Generator):
    kind = rng.integers(4)
    c = rng.uniform(-4.0, 4.0, 3)
    if kind < 2:
        s = rng.uniform(1.0, 6.0, 3)
        r = 0.0 if kind == 0 else float(rng.uniform(0.1, 0.45) * s.min())
        return RoundedBox(tuple(c), tuple(s), r)
    radius, length = float(rng.uniform(0.5, 3.0)), float(rng.uniform(6.0, 10.0))
    f = 0.0 if kind == 2 else radius
    return RoundedRod("x", float(c[0]) - length / 2.0, length, (float(c[1]), float(c[2])),
                      radius, f)


def _depth(a, b) -> float:
    d = voidgraph._depth(voidgraph._core(a), voidgraph._core(b))
    assert d is not None
    return d


def test_overlap_agrees_with_an_independent_boolean_on_random_boxes_and_rods():
    # Pairs within 0.05 mm of touching are left out: there the polygonal solids decide.
    rng = np.random.default_rng(7)
    agreed = joined = 0
    while agreed < 150:
        a, b = _random(rng), _random(rng)
        if abs(_depth(a, b)) < 0.05:
            continue
        common = (_solid(a) ^ _solid(b)).volume()
        assert voidgraph.overlaps(a, b) == (common > 1e-6), (a, b, common)
        agreed += 1
        joined += common > 1e-6
    assert 30 < joined < 120  # both answers were tested often


@pytest.mark.parametrize("a, b", [
    # two boxes sharing the face x = 5 (elementary geometry)
    (RoundedBox((2.5, 0, 0), (5, 4, 4)), RoundedBox((7.5, 0, 0), (5, 4, 4))),
    # a cylinder's end disc on a box face
    (RoundedRod("x", 0.0, 10.0, (0, 0), 1.0), RoundedBox((12.0, 0, 0), (4, 4, 4), 0.5)),
    # two parallel cylinders touching along a line: centres 2 apart, radii 1 and 1
    (RoundedRod("x", 0.0, 10.0, (0, 0), 1.0), RoundedRod("x", 0.0, 10.0, (2, 0), 1.0)),
    # a rounded box's corner ball (centre (2, 2, 2), r 1) touching a ball of r 1 whose
    # centre lies 1 + 1 = 2 further along the diagonal, 2 / sqrt(3) along each axis
    (RoundedBox((0, 0, 0), (6, 6, 6), 1.0),
     RoundedRod("x", 2 + 2 / math.sqrt(3) - 1, 2.0,
                (2 + 2 / math.sqrt(3), 2 + 2 / math.sqrt(3)), 1.0, 1.0)),
])
def test_touching_voids_are_not_joined(a, b):
    assert _depth(a, b) == pytest.approx(0.0, abs=1e-9)
    assert not voidgraph.overlaps(a, b)
    assert not voidgraph.overlaps(b, a)


def test_a_thin_rod_inside_a_wide_one_is_joined_by_its_whole_depth():
    # Feed r 1 at z = 1 inside a bore r 3 on the axis: 3 - (1 + 1) = 1 mm clear of the
    # bore wall, so the overlap is 2 mm deep across (the feed's diameter) and 7 mm along.
    bore = RoundedRod("x", 3.0, 14.0, (0.0, 0.0), 3.0)
    feed = RoundedRod("x", 10.0, 43.5, (0.0, 1.0), 1.0)
    assert _depth(bore, feed) == pytest.approx(3.0)
    assert voidgraph.overlaps(bore, feed)


def test_groups_join_a_row_to_the_bore_it_starts_in_and_keep_apart_rows_that_never_meet():
    bore = (RoundedRod("x", 3.0, 14.0, (0.0, 0.0), 3.0),)
    fed = (RoundedBox((21.5, 0.0, 1.0), (5, 12, 8), 1.0),
           RoundedRod("x", 10.0, 11.5, (0.0, 1.0), 1.0))
    apart = (RoundedBox((21.5, 20.0, 1.0), (5, 12, 8), 1.0),)
    assert voidgraph.groups([bore, fed, apart]) == ((0, 1), (2,))
    assert voidgraph.unreached([bore, fed, apart], lambda i: i == 0) == ((2,),)
    assert voidgraph.unreached([bore, fed, apart], lambda i: i == 1) == ((2,),)
    assert voidgraph.unreached([bore, fed, apart], lambda i: False) == ((0, 1), (2,))
