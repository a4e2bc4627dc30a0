"""Sections of a body by a plane, from its primitives, against closed forms: a rounded
rectangle narrows across its rounding by r - sqrt(r^2 - d^2) per side (circle, closed form);
a cylinder cut parallel to its axis at distance t gives a chord 2 sqrt(R^2 - t^2)."""

from __future__ import annotations

import math

import pytest

from soft_molds.plan.sections import widest_offset, width_at
from soft_molds.recipe.primitives import RoundedBox, RoundedRod

BAR = (RoundedBox((35.0, 0.0, 0.0), (70.0, 16.0, 14.0), 2.0),)
ROD = (RoundedRod("x", 0.0, 60.0, (0.0, 0.0), 10.0, 1.0),)


def test_a_bar_is_full_width_across_its_flat_sides():
    # |z| <= 7 - 2 lies on the flat sides: the full 16 mm width along y.
    assert width_at(BAR, 1, 2, 0.0) == pytest.approx(16.0, abs=1e-12)
    assert width_at(BAR, 1, 2, 4.99) == pytest.approx(16.0, abs=1e-12)


@pytest.mark.parametrize("z", [5.5, 6.0, 6.9])
def test_a_bar_narrows_across_its_edge_rounding_like_a_circle(z):
    d = z - 5.0
    want = 16.0 - 2.0 * (2.0 - math.sqrt(4.0 - d * d))
    assert width_at(BAR, 1, 2, z) == pytest.approx(want, rel=1e-12)


def test_a_plane_past_the_body_has_no_section():
    assert width_at(BAR, 1, 2, 7.01) == 0.0


@pytest.mark.parametrize("t", [0.0, 3.0, 9.5])
def test_a_rod_cut_along_its_axis_gives_the_chord(t):
    assert width_at(ROD, 1, 2, t) == pytest.approx(2.0 * math.sqrt(100.0 - t * t), rel=1e-12)


def test_a_rod_cut_lengthwise_loses_its_end_rounding_near_the_rim():
    # At 9.5 mm from the axis the rim rounding (1 mm) is 0.5 mm deep: each end is short by
    # 1 - sqrt(1 - 0.5^2) (circle, closed form).
    short = 1.0 - math.sqrt(1.0 - 0.25)
    assert width_at(ROD, 0, 2, 9.5) == pytest.approx(60.0 - 2 * short, rel=1e-12)


def test_the_widest_section_of_a_centred_bar_and_rod_is_the_mid_plane():
    assert widest_offset(BAR, 1, 2) == (0.0, pytest.approx(16.0))
    assert widest_offset(ROD, 1, 2) == (0.0, pytest.approx(20.0))


def test_the_widest_section_of_an_off_axis_body_is_found_where_it_is():
    # A rod whose axis lies at y = 4, z = -3: widest along z at z = -3, not at 0.
    rod = (RoundedRod("x", 0.0, 40.0, (4.0, -3.0), 6.0, 0.0),)
    off, width = widest_offset(rod, 1, 2)
    assert off == pytest.approx(-3.0, abs=1e-6)
    assert width == pytest.approx(12.0, rel=1e-9)
