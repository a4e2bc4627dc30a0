"""Silicone wall thickness around voids, checked on shapes with known answers.

Parts are built with manifold3d (exact booleans; 512 segments on the round parts, chord
error 10 (1 - cos(pi / 512)) < 2e-4 mm). Expected walls are closed form (the distance between
two offset circles) or elementary geometry (gaps between boxes).
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
from meshes import box, from_manifold

from soft_molds.analysis.demold import Surface
from soft_molds.analysis.walls import RESOLUTION_MM, WallMap, wall_map

SEGMENTS = 512
ROD_R = 10.0     # rod of diameter 20 along z, z = 0..40
BORE_R = 9.0     # bore of diameter 18, z = 5..35 (closed inside the rod)
BORE_Z = (5.0, 35.0)
OFFSET = 0.5     # bore axis moved this far along +x


def _bored_rod(offset: float) -> tuple[Surface, np.ndarray]:
    rod = m3.Manifold.cylinder(40.0, ROD_R, circular_segments=SEGMENTS)
    bore = m3.Manifold.cylinder(BORE_Z[1] - BORE_Z[0], BORE_R, circular_segments=SEGMENTS)
    s = Surface(from_manifold(rod - bore.translate((offset, 0.0, BORE_Z[0]))))
    c = s.centroids
    # Bore facets: within the bore's radius of its axis and its height band; the rod's own
    # side is at least 9.5 mm from the bore axis and its end caps lie outside the band.
    radial = np.hypot(c[:, 0] - offset, c[:, 1])
    void = (radial < BORE_R + 0.01) & (c[:, 2] > BORE_Z[0] - 0.01) & (c[:, 2] < BORE_Z[1] + 0.01)
    return s, void


@pytest.fixture(scope="module")
def offset_bore() -> WallMap:
    s, void = _bored_rod(OFFSET)
    return wall_map(s, void, min_wall_mm=1.0)


def test_offset_bore_thinnest_wall_is_the_radius_gap_minus_the_offset(offset_bore: WallMap):
    # Closed form: 20 / 2 - 18 / 2 - 0.5 = 0.5 mm on the +x side.
    assert offset_bore.outer.min_mm == pytest.approx(0.5, abs=0.05)
    assert offset_bore.min_mm == pytest.approx(0.5, abs=0.05)
    # The bore never meets another void: no wall between voids.
    assert offset_bore.between.samples == 0
    assert offset_bore.between.min_mm == math.inf


def test_offset_bore_thinnest_wall_is_located_midway_on_the_thin_side(offset_bore: WallMap):
    where = offset_bore.outer.where_mm
    assert where is not None
    # Closed form: halfway between the bore (x = 9.5) and the rod's surface (x = 10).
    assert where[0] == pytest.approx(9.75, abs=0.05)
    assert where[1] == pytest.approx(0.0, abs=0.1)
    assert BORE_Z[0] < where[2] < BORE_Z[1]


def test_offset_bore_thin_area_is_the_arc_of_the_bore_where_the_wall_is_under_1_mm(
        offset_bore: WallMap):
    # Closed form: along the bore's normal at angle phi from +x the wall is
    # sqrt(R^2 - e^2 sin^2 phi) - e cos phi - r (R = 10, r = 9, e = 0.5). With the limit
    # equal to R - r it is below the limit exactly where cos phi > -e / (2 R) = -0.025;
    # that arc times the bore's radius and 30 mm height is the thin area.
    arc = 2.0 * math.acos(-OFFSET / (2.0 * ROD_R))
    expected = arc * BORE_R * (BORE_Z[1] - BORE_Z[0])
    assert offset_bore.outer.thin_area_mm2 > 0.0
    assert offset_bore.outer.thin_area_mm2 == pytest.approx(expected, rel=0.01)


def test_end_walls_are_the_5_mm_between_the_bore_ends_and_the_rod_ends(offset_bore: WallMap):
    t = offset_bore.thickness_mm
    # Construction: the bore stops 5 mm short of each rod end; the thickest wall sampled is
    # there, and every other wall (the side, 0.5 to 1.5 mm) is thinner.
    assert float(t.max()) == pytest.approx(5.0, abs=RESOLUTION_MM)
    side = t[t < 4.0]
    assert float(side.max()) == pytest.approx(1.5, abs=0.05)  # closed form: 1 + 0.5
    assert float(side.min()) == pytest.approx(0.5, abs=0.05)  # closed form: 1 - 0.5


def test_centred_bore_wall_is_the_radius_difference():
    s, void = _bored_rod(0.0)
    wm = wall_map(s, void, min_wall_mm=1.0)
    assert wm.outer.min_mm == pytest.approx(1.0, abs=0.05)  # closed form: 10 - 9


# --- two box voids side by side in a block ----------------------------------------------

BLOCK = ((0.0, 0.0, 0.0), (30.0, 20.0, 20.0))
VOID_A = ((3.0, 3.0, 3.0), (13.25, 17.0, 17.0))
VOID_B = ((14.75, 3.0, 3.0), (27.0, 17.0, 17.0))   # 14.75 - 13.25 = 1.5 mm web


def _two_voids() -> tuple[Surface, np.ndarray]:
    part = box(*BLOCK) - box(*VOID_A) - box(*VOID_B)
    s = Surface(from_manifold(part))
    c = s.centroids
    lo, hi = np.asarray(BLOCK[0]), np.asarray(BLOCK[1])
    on_block = (np.isclose(c, lo) | np.isclose(c, hi)).any(axis=1)
    return s, ~on_block


def test_web_between_two_voids_is_reported_as_a_between_wall():
    s, void = _two_voids()
    wm = wall_map(s, void, min_wall_mm=2.0)
    assert wm.between.min_mm == pytest.approx(1.5, abs=0.05)  # elementary geometry: the gap
    where = wm.between.where_mm
    assert where is not None
    assert where[0] == pytest.approx(14.0, abs=0.05)  # elementary: mid-web, (13.25 + 14.75) / 2
    # Elementary geometry: both faces of the web, 14 x 14 mm each, are below 2 mm.
    assert wm.between.thin_area_mm2 == pytest.approx(2 * 14.0 * 14.0, rel=0.01)


def test_block_around_two_voids_has_its_3_mm_outer_walls():
    s, void = _two_voids()
    wm = wall_map(s, void, min_wall_mm=3.5)
    assert wm.outer.min_mm == pytest.approx(3.0, abs=0.05)  # construction: 3 mm all round
    assert wm.min_mm == pytest.approx(1.5, abs=0.05)
    # Elementary geometry: every void face except the web's two is an outer wall of 3 mm:
    # A: 14 x 14 + 4 x 10.25 x 14 = 770; B: 14 x 14 + 4 x 12.25 x 14 = 882 (mm2).
    assert wm.outer.thin_area_mm2 == pytest.approx(770.0 + 882.0, rel=0.01)
    relaxed = wall_map(s, void, min_wall_mm=1.0)
    assert relaxed.outer.thin_area_mm2 == 0.0
    assert relaxed.between.thin_area_mm2 == 0.0
