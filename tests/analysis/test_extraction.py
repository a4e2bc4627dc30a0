"""Core extraction through the inlet opening, checked on shapes with known answers.

Cores are built with manifold3d (256 segments: the sections' perimeters are within 1e-4 of
the circles'). Expected numbers are closed form: the hoop stretch of a ring of diameter d
passed over a section of diameter D is the perimeter ratio pi D / pi d; reach and widths are
read off the construction. The acceptance rule k (stretch - 1) <= elongation at break is the
module's own, checked here by hand arithmetic.
"""

from __future__ import annotations

import math

import manifold3d as m3
import pytest
from meshes import from_manifold

from soft_molds.analysis.extraction import Extraction, allowed_stretch, core_extraction
from soft_molds.meshdata import TriMesh

SEGMENTS = 256
PULL = (-1.0, 0.0, 0.0)
OPENING = (0.0, 0.0, 0.0)
D_OPEN = 10.0
PERIMETER = math.pi * D_OPEN


def _rod_x(x0: float, x1: float, diameter: float) -> m3.Manifold:
    """A rod of ``diameter`` along +x from x0 to x1 (the z-axis cylinder turned +90 deg
    about y, which sends +z to +x)."""
    rod = m3.Manifold.cylinder(x1 - x0, diameter / 2.0, circular_segments=SEGMENTS)
    return rod.rotate((0.0, 90.0, 0.0)).translate((x0, 0.0, 0.0))


def _ball_on_rod() -> TriMesh:
    """A 20 mm ball centred at x = 15 on a 10 mm rod from x = -5 to x = 15."""
    ball = m3.Manifold.sphere(10.0, circular_segments=SEGMENTS).translate((15.0, 0.0, 0.0))
    return from_manifold(_rod_x(-5.0, 15.0, 10.0) + ball)


@pytest.fixture(scope="module")
def ball() -> Extraction:
    return core_extraction(_ball_on_rod(), PULL, OPENING, PERIMETER)


def test_ball_twice_the_opening_diameter_stretches_the_ring_by_two(ball: Extraction):
    # Closed form: pi 20 / pi 10 = 2.0.
    assert ball.stretch == pytest.approx(2.0, rel=0.01)
    assert ball.section_perimeter_mm == pytest.approx(math.pi * 20.0, rel=0.01)
    assert ball.opening_perimeter_mm == pytest.approx(PERIMETER)
    assert ball.strain == pytest.approx(1.0, rel=0.02)  # closed form: 2.0 - 1
    # The widest section is the ball's equator (x = 15), to one 0.25 mm section step.
    assert ball.where_mm[0] == pytest.approx(15.0, abs=0.25)


def test_allowed_stretch_is_one_plus_elongation_over_safety_factor():
    assert allowed_stretch(300.0, 2.0) == pytest.approx(2.5)   # hand arithmetic: 1 + 3 / 2
    assert allowed_stretch(150.0, 2.0) == pytest.approx(1.75)  # hand arithmetic: 1 + 1.5 / 2


def test_ball_passes_a_300_pct_grade_and_tears_a_150_pct_grade(ball: Extraction):
    # Passes: stretch 2.0 <= 2.5 (300 % elongation, safety factor 2).
    assert ball.stretch <= allowed_stretch(300.0, 2.0)
    # Fails: stretch 2.0 > 1.75 (150 % elongation, safety factor 2).
    assert ball.stretch > allowed_stretch(150.0, 2.0)


def test_free_length_reaches_the_far_pole_of_the_ball(ball: Extraction):
    # Construction: ball centre 15 + radius 10 = 25 mm behind the opening plane x = 0.
    assert ball.free_length_mm == pytest.approx(25.0, rel=0.005)


def test_least_width_is_the_rod_not_the_balls_tapering_cap(ball: Extraction):
    # Construction: the rod is 10 mm wide; the cap beyond the equator narrows to a point
    # but is excluded.
    assert ball.least_width_mm == pytest.approx(10.0, rel=0.02)
    assert 0.0 <= ball.least_width_where_mm[0] < 15.0 - math.sqrt(10.0**2 - 5.0**2)


def test_the_ball_holds_the_rod_where_its_section_is_half_again_as_wide(ball: Extraction):
    # Supports are sections at least 1.5 x the narrowest (10 mm): the ball's sections
    # 2 sqrt(10^2 - (x - 15)^2) >= 15 for |x - 15| <= sqrt(100 - 56.25) (closed form). The
    # longest unsupported span runs from the opening plane to there: 15 - 6.614 = 8.386 mm
    # (the cap beyond the ball, 25 - 21.614 = 3.386 mm, is shorter).
    edge = 15.0 - math.sqrt(10.0**2 - 7.5**2)
    assert ball.span_mm == pytest.approx(edge, abs=0.02)
    assert 0.0 < ball.span_where_mm[0] < edge
    assert ball.slenderness == pytest.approx(edge / 10.0, rel=0.03)


def _box(x0: float, x1: float, dy: float, dz: float) -> m3.Manifold:
    return m3.Manifold.cube((x1 - x0, dy, dz), center=True).translate(((x0 + x1) / 2, 0, 0))


def test_chambers_brace_a_thin_feed_channel_so_the_span_is_the_longest_gap():
    # A 2 mm channel from the opening through three 4 x 8 x 6 mm chambers at x in [4, 8],
    # [14, 18] and [21, 25], ending in the last: chamber sections are 6 mm wide (the
    # smaller side), 3 x the channel, so they hold it. Gaps between supports (read off the
    # construction): 4 - 0 = 4 (opening plane to the first chamber), 14 - 8 = 6, 21 - 18
    # = 3; the longest is 6 mm, between the first and second chamber.
    core = _rod_x(-5.0, 23.0, 2.0)
    for x0, x1 in ((4.0, 8.0), (14.0, 18.0), (21.0, 25.0)):
        core = core + _box(x0, x1, 8.0, 6.0)
    ext = core_extraction(from_manifold(core), PULL, OPENING, PERIMETER)
    assert ext.free_length_mm == pytest.approx(25.0, abs=1e-6)  # the last chamber's face
    assert ext.least_width_mm == pytest.approx(2.0, rel=0.001)
    assert ext.span_mm == pytest.approx(6.0, abs=0.02)
    assert 8.0 < ext.span_where_mm[0] < 14.0
    assert ext.slenderness == pytest.approx(3.0, rel=0.01)  # hand arithmetic: 6 / 2
    # The whole reach over the width would have been 25 / 2 = 12.5.


def test_a_bare_thin_channel_spans_its_whole_reach_past_its_socket_plug():
    # A 2 mm channel to x = 40 with a round end (a 2 mm ball), behind a 4 mm socket plug to
    # x = 6: the plug (2 x the channel) holds it, nothing else does. Span: from the plug's
    # end to the far pole, 41 - 6 = 35 mm; width 2 mm (the rounded end excluded):
    # slenderness 17.5 (hand arithmetic), above the default limit of 15.
    core = (_rod_x(-5.0, 6.0, 4.0) + _rod_x(-5.0, 40.0, 2.0)
            + m3.Manifold.sphere(1.0, circular_segments=SEGMENTS).translate((40.0, 0.0, 0.0)))
    ext = core_extraction(from_manifold(core), PULL, OPENING, PERIMETER)
    assert ext.free_length_mm == pytest.approx(41.0, abs=1e-6)
    assert ext.least_width_mm == pytest.approx(2.0, rel=0.001)
    assert ext.span_mm == pytest.approx(35.0, abs=0.02)
    assert 6.0 < ext.span_where_mm[0] < 40.0
    assert ext.slenderness == pytest.approx(17.5, rel=0.01)
    assert ext.slenderness > 15.0


def test_rod_of_the_opening_diameter_needs_no_stretch():
    core = from_manifold(_rod_x(-5.0, 20.0, D_OPEN))
    ext = core_extraction(core, PULL, OPENING, PERIMETER)
    assert ext.stretch == pytest.approx(1.0, rel=0.01)  # closed form: pi 10 / pi 10
    assert ext.strain == pytest.approx(0.0, abs=0.01)
    assert ext.free_length_mm == pytest.approx(20.0, rel=0.005)  # construction: rod end
