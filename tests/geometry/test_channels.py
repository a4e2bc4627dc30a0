"""The ``channels`` void's solids against closed forms and the kernel, on small networks
(no mold is built).

Closed forms: a rounded box is Steiner's formula of its inner box grown by a ball (V = abc
+ 2r(ab + bc + ca) + pi r^2 (a + b + c) + 4/3 pi r^3); a straight sweep of a plane section
is its area times its length; the section is a rectangle less its four corners' spandrels,
w h - (4 - pi) r^2. Where grooves of half width h(z) meet at a joint, every overlap is a
plane figure scaling with h^2, so its volume is the figure's area for h = 1 times K = the
integral of h(z)^2 over the height, and the round joint post (radius h(z), a solid of
revolution) is pi K (Pappus). For two grooves at a right angle the overlap is an h by h
square and the post adds the quarter no groove covers: V = A (L1 + L2) + K (pi / 4 - 1);
for a branch leaving a straight groove square to it the overlap is a 2h by h rectangle
and the post lies inside the groove: V = A (Lp + Lb) - 2K. K by hand: with a = w/2 - r,
h(t) = a + sqrt(r^2 - t^2) over each rounding of height r, w/2 between.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate

from soft_molds.recipe.kinds.channels import Channels
from soft_molds.recipe.primitives import TurnedBar

W, H, R = 2.0, 3.0, 0.5


def network(paths) -> Channels:
    return Channels(W, H, R, -2.0, tuple(tuple(map(tuple, p)) for p in paths), ())


def k_by_hand() -> float:
    a = W / 2.0 - R
    rounding = a * a * R + a * math.pi * R * R / 2.0 + 2.0 * R ** 3 / 3.0
    return (W / 2.0) ** 2 * (H - 2.0 * R) + 2.0 * rounding


def section_area() -> float:
    return W * H - (4.0 - math.pi) * R * R


def test_k_is_the_integral_of_the_squared_half_width():
    # Reference: scipy's adaptive quadrature of h(z)^2 over the section's height.
    def h(z):
        t = max(abs(z - H / 2.0) - (H / 2.0 - R), 0.0)
        return W / 2.0 - R + math.sqrt(R * R - t * t)

    quad, _ = integrate.quad(lambda z: h(z) ** 2, 0.0, H, points=[R, H - R], epsabs=1e-13)
    assert network([[[0, 0], [10, 0]]]).half_width_square_integral_mm3() == \
        pytest.approx(quad, rel=1e-10)
    assert k_by_hand() == pytest.approx(quad, rel=1e-10)


def test_a_right_angle_bend_is_two_sweeps_a_square_off_and_a_quarter_post_on():
    net = network([[[0, 0], [20, 0], [20, 15]]])
    want = section_area() * 35.0 + k_by_hand() * (math.pi / 4.0 - 1.0)
    assert net.channel_volume_mm3() == pytest.approx(want, rel=1e-9)


def test_a_square_branch_off_a_straight_groove_takes_a_2h_by_h_rectangle_off():
    net = network([[[0, 0], [30, 0]], [[12, 0], [12, 10]]])
    want = section_area() * 40.0 - 2.0 * k_by_hand()
    assert net.channel_volume_mm3() == pytest.approx(want, rel=1e-9)


def test_the_hub_joint_of_a_feed_and_four_diagonal_branches_takes_cot_half_gap_off():
    # The hub gripper's joint: a feed along +x ending at the hub's centre and four branches
    # leaving it along the diagonals (45, 135, 225, 315 deg), so the grooves leave the
    # point at 45, 135, 180, 225 and 315 deg. Plane geometry, by hand: in the sector
    # between neighbouring directions g <= 90 deg apart, the union of two unit half strips
    # is their two half bands less the triangle of each outside the sector (cot g / 2
    # each) and less the quadrilateral they share (the origin, the far corner where both
    # inner edges meet, and the two points of the rays 1 / sin g out: area 1 / sin g);
    # cot g + 1 / sin g = cot(g / 2). No gap exceeds 180 deg, so the round post is covered.
    # Gaps 90, 45, 45, 90, 90 deg: figure = -3 cot 45 - 2 cot 22.5 = -5 - 2 sqrt 2
    # (cot 22.5 deg = 1 + sqrt 2).
    c, d = 15.0, 42.0 / math.sqrt(2.0)
    net = network([[[0, 0], [c, 0]]] + [[[c, 0], [c + sx * d, sy * d]]
                                          for sx, sy in ((1, 1), (-1, 1), (-1, -1), (1, -1))])
    want = section_area() * (15.0 + 4.0 * 42.0) + k_by_hand() * (-5.0 - 2.0 * math.sqrt(2.0))
    assert net.channel_volume_mm3() == pytest.approx(want, rel=1e-9)


def test_a_cross_of_four_grooves_takes_four_h_by_h_squares_off():
    # Neighbouring half strips at a right angle overlap in an h by h square, the opposite
    # ones only along a line, and together they cover the round post.
    net = network([[[0, 0], [45, 0]], [[45, 0], [45, -42]], [[45, 0], [87, 0]],
                   [[45, 0], [45, 42]]])
    want = section_area() * 171.0 - 4.0 * k_by_hand()
    assert net.channel_volume_mm3() == pytest.approx(want, rel=1e-9)


def test_a_straight_run_through_a_joint_is_one_sweep():
    net = network([[[0, 0], [10, 0], [25, 0]]])
    assert net.channel_volume_mm3() == pytest.approx(section_area() * 25.0, rel=1e-12)


@pytest.mark.parametrize("round_ends", [True, False])
def test_a_turned_bar_built_by_the_kernel_has_its_closed_form_volume(round_ends):
    from soft_molds.geometry.kernel import build_primitive

    b = TurnedBar((10.0, 5.0, 2.0), 20.0, 6.0, 4.0, 30.0, 1.0, round_ends)
    a, w, h = 20.0 - 2.0, 6.0 - 2.0, 4.0 - 2.0
    steiner = (a * w * h + 2.0 * (a * w + w * h + h * a) + math.pi * (a + w + h)
               + 4.0 / 3.0 * math.pi)
    sweep = 20.0 * (6.0 * 4.0 - (4.0 - math.pi))
    want = steiner if round_ends else sweep
    assert b.volume_mm3() == pytest.approx(want, rel=1e-12)
    solid = build_primitive(b, "bar")
    assert solid.Volume() == pytest.approx(want, rel=1e-6)
    # Its bounds are the solid's: the kernel's bounding box of the built shape.
    bb = solid.BoundingBox()
    lo, hi = b.bounds()
    assert np.allclose(lo, (bb.xmin, bb.ymin, bb.zmin), atol=1e-3)
    assert np.allclose(hi, (bb.xmax, bb.ymax, bb.zmax), atol=1e-3)


@pytest.mark.parametrize("round_ends", [True, False])
def test_a_turned_bars_sections_are_those_of_its_distance_function(round_ends):
    """section_extent against a fine grid on each plane, kept where the exact distance
    is negative (the grid's spacing bounds the difference)."""
    b = TurnedBar((10.0, 5.0, 2.0), 20.0, 6.0, 4.0, 30.0, 1.0, round_ends)
    lo, hi = b.bounds()
    step = 0.02
    for v, w, t in ((0, 2, 3.7), (1, 2, 0.3), (0, 1, 9.0), (2, 1, 11.5), (1, 0, 1.0),
                    (2, 0, 17.0)):
        third = 3 - v - w
        gv = np.arange(lo[v] - 0.1, hi[v] + 0.1, step)
        gt = np.arange(lo[third] - 0.1, hi[third] + 0.1, step)
        mv, mt = np.meshgrid(gv, gt, indexing="ij")
        p = np.zeros((mv.size, 3))
        p[:, v], p[:, third], p[:, w] = mv.ravel(), mt.ravel(), t
        inside = (b.sdf(p) < 0.0).reshape(mv.shape).any(axis=1)
        got = b.section_extent(v, w, t)
        assert got is not None
        assert gv[inside].min() == pytest.approx(got[0], abs=2 * step), (v, w, t)
        assert gv[inside].max() == pytest.approx(got[1], abs=2 * step), (v, w, t)


def test_a_networks_fused_solids_have_its_closed_form_volume():
    # Reference: the kernel's volume of the fused solids (BRep) against the closed form,
    # on a bend, a branch square off a straight run and one leaving a bend's joint at 45
    # degrees (no hand formula: the joint's figure by inclusion and exclusion).
    from soft_molds.geometry.kernel import build_primitive, fuse

    net = network([[[0, 0], [20, 0], [20, 15]], [[10, 0], [10, 10]],
                   [[20, 0], [30, -10]]])
    solids = [build_primitive(p, "net") for p in net.primitives(40.0)]
    fused = fuse(solids, "net", "channels")
    assert fused.Volume() == pytest.approx(net.channel_volume_mm3(), rel=1e-3)
