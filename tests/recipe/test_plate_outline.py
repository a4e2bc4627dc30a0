"""Outlines of lines and arcs (``PieceOutline``), the hub outline and the ``Slab`` primitive
against closed forms and brute force.

Sources: the shoelace formula for a polygon's area; a circular segment of turn t holds
r^2 (t - sin t) / 2 (sector less triangle); the part of a strip of half width h about a
diameter that lies in a disc of radius R holds 2 int_0^h sqrt(R^2 - o^2) do =
h sqrt(R^2 - h^2) + R^2 asin(h / R); a square corner rounded by r loses (1 - pi/4) r^2
(elementary plane geometry). Distances: the least distance to the boundary sampled every
0.02 mm (brute force), the sign by the even-odd rule of the densely sampled boundary
(matplotlib's point-in-path, an independent implementation).
"""

from __future__ import annotations

import math

import numpy as np
from matplotlib.path import Path

from soft_molds.recipe.kinds.plate import Plate
from soft_molds.recipe.outline import Arc2, Line2, PieceOutline, hub_pieces
from soft_molds.recipe.primitives import Slab

PI = math.pi

#: A slot with one round end and one bulging side: two lines, a half circle and a flat
#: arc, counter-clockwise.
SLOT = PieceOutline((
    Line2((0.0, 0.0), (20.0, 0.0)),
    Arc2((20.0, 5.0), 5.0, -PI / 2.0, PI),
    Line2((20.0, 10.0), (0.0, 10.0)),
    # A flat arc bulging out to the left through (0, 5) from a circle of radius 13 about
    # (12, 5): it turns by 2 asin(5 / 13).
    Arc2((12.0, 5.0), 13.0, PI - math.asin(5.0 / 13.0), 2.0 * math.asin(5.0 / 13.0)),
))


def shoelace(pts: np.ndarray) -> float:
    x, y = pts[:, 0], pts[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def segments_area(outline: PieceOutline) -> float:
    """Shoelace of the chord polygon plus each arc's circular segment (signed by its turn)."""
    total = shoelace(np.asarray([p.start for p in outline.pieces()]))
    for p in outline.pieces():
        if isinstance(p, Arc2):
            t = abs(p.sweep_rad)
            total += math.copysign(p.radius ** 2 * (t - math.sin(t)) / 2.0, p.sweep_rad)
    return total


def hub_closed_form(radius: float, n: int, length: float, width: float, tip: float) -> float:
    """Disc plus, for each arm, its strip w x L less the strip's part in the disc less the
    two tip spandrels (module docstring)."""
    h = width / 2.0
    in_disc = h * math.sqrt(radius ** 2 - h * h) + radius ** 2 * math.asin(h / radius)
    return PI * radius ** 2 + n * (width * length - in_disc - 2.0 * (1.0 - PI / 4.0) * tip ** 2)


def test_area_of_lines_and_arcs_matches_the_chord_polygon_and_its_segments():
    assert abs(SLOT.area_mm2() - segments_area(SLOT)) < 1e-9
    # Hand check: 20 x 10 rectangle, half disc of radius 5, segment of the flat arc.
    t = 2.0 * math.asin(5.0 / 13.0)
    want = 200.0 + PI * 25.0 / 2.0 + 169.0 * (t - math.sin(t)) / 2.0
    assert abs(SLOT.area_mm2() - want) < 1e-9


def test_area_is_the_same_either_way_round():
    back = PieceOutline(tuple(
        Line2(p.end, p.start) if isinstance(p, Line2)
        else Arc2(p.center, p.radius, p.start_rad + p.sweep_rad, -p.sweep_rad)
        for p in reversed(SLOT.pieces())))
    assert abs(back.area_mm2() - SLOT.area_mm2()) < 1e-9


def test_hub_area_matches_the_closed_form_and_a_dense_polygon():
    for n, tip in ((4, 3.0), (3, 7.0), (5, 0.0)):
        angles = tuple(PI + k * 2.0 * PI / n for k in range(n))
        angles = tuple(sorted(a % (2.0 * PI) for a in angles))
        hub = PieceOutline(hub_pieces((2.0, -1.0), 15.0, angles, 45.0, 14.0, tip))
        assert abs(hub.area_mm2() - hub_closed_form(15.0, n, 45.0, 14.0, tip)) < 1e-9
        assert abs(hub.area_mm2() - segments_area(hub)) < 1e-9
        dense = hub.boundary(0.005)
        # A polygon inscribed in the arcs falls short by about perimeter x chord sag.
        assert abs(abs(shoelace(dense)) - hub.area_mm2()) < 1e-4 * hub.area_mm2()


def brute_sdf(outline: PieceOutline, q: np.ndarray) -> np.ndarray:
    ring = outline.boundary(0.02)
    d = np.min(np.linalg.norm(q[:, None, :] - ring[None, :, :], axis=2), axis=1)
    inside = Path(outline.boundary(0.02)).contains_points(q)
    return np.where(inside, -d, d)


def test_signed_distance_matches_brute_force():
    rng = np.random.default_rng(7)
    hub = PieceOutline(hub_pieces((0.0, 0.0), 15.0, (0.0, PI / 2, PI, 3 * PI / 2), 40.0,
                                  12.0, 2.0))
    for outline in (SLOT, hub):
        (x0, y0), (x1, y1) = outline.bounds()
        q = rng.uniform((x0 - 5, y0 - 5), (x1 + 5, y1 + 5), size=(200, 2))
        got, want = outline.sdf(q), brute_sdf(outline, q)
        # The sampled boundary is at most 0.01 mm from the true one.
        assert np.all(np.sign(got) == np.sign(want))
        assert np.max(np.abs(got - want)) < 0.011


def test_bounds_and_chords_of_the_slot():
    (x0, y0), (x1, y1) = SLOT.bounds()
    # Leftmost point of the flat arc: 12 - 13 = -1; the round end reaches 25.
    assert np.allclose((x0, y0, x1, y1), (-1.0, 0.0, 25.0, 10.0), atol=1e-12)
    lo, hi = SLOT.chords(0, np.array([5.0, 2.0, 11.0]))
    assert abs(lo[0] + 1.0) < 1e-12 and abs(hi[0] - 25.0) < 1e-12
    # At y = 2 the round end reaches 20 + sqrt(25 - 9) = 24, the arc 12 - sqrt(169 - 9).
    assert abs(hi[1] - 24.0) < 1e-12 and abs(lo[1] - (12.0 - math.sqrt(160.0))) < 1e-12
    assert np.isnan(lo[2])


def test_slab_volume_distance_and_sections():
    s = Slab(SLOT, -3.0, 6.0)
    assert abs(s.volume_mm3() - 6.0 * segments_area(SLOT)) < 1e-9
    lo, hi = s.bounds()
    assert np.allclose(lo, [-1.0, 0.0, -3.0], atol=1e-12)
    assert np.allclose(hi, [25.0, 10.0, 3.0], atol=1e-12)
    p = np.array([[10.0, 5.0, 0.0], [10.0, 5.0, 5.0], [10.0, 12.0, 7.0], [10.0, 9.0, 2.5]])
    # Inside: 3 mm to either face (5 to the sides); above the top by 2; off an edge by
    # (2, 4) -> sqrt(20); near the top edge: 0.5 to the face, 1 to the side.
    want = [-3.0, 2.0, math.sqrt(20.0), -0.5]
    assert np.allclose(s.sdf(p), want, atol=1e-12)
    assert np.allclose(s.section_extent(0, 2, 0.0), (-1.0, 25.0), atol=1e-12)
    assert s.section_extent(2, 1, 5.0) == (-3.0, 3.0)
    assert abs(s.section_extent(0, 1, 2.0)[1] - 24.0) < 1e-12
    assert s.section_extent(2, 2, 4.0) is None
    on = s.surface_samples(1.0)
    assert np.max(np.abs(s.sdf(on))) < 1e-9


def test_plate_hub_touches_the_inlet_plane_and_centres_on_y():
    p = Plate(8.0, None, None, 30.0, 4, 45.0, 14.0, 3.0, None)
    lo, hi = p.solid().bounds()
    # The first arm points along -x: its flat tip is the leftmost point, 45 mm from the
    # hub's centre; the opposite arm's tip is 45 mm beyond.
    assert abs(lo[0]) < 1e-12 and abs(hi[0] - 90.0) < 1e-12
    assert abs(lo[1] + 45.0) < 1e-12 and abs(hi[1] - 45.0) < 1e-12
    assert (lo[2], hi[2]) == (-4.0, 4.0)
    assert np.allclose(p.hub_center_mm(), (45.0, 0.0), atol=1e-12)
    assert abs(p.solid().volume_mm3() - 8.0 * hub_closed_form(15.0, 4, 45.0, 14.0, 3.0)) < 1e-9


def test_plate_polygon_moves_to_the_inlet_plane():
    p = Plate(5.0, ((10.0, -5.0), (30.0, -5.0), (30.0, 5.0), (10.0, 5.0)), 2.0, None, None,
              None, None, None, None)
    lo, hi = p.solid().bounds()
    assert np.allclose(lo, [0.0, -5.0, -2.5], atol=1e-12)
    assert np.allclose(hi, [20.0, 5.0, 2.5], atol=1e-12)
    assert abs(p.solid().volume_mm3() - 5.0 * (200.0 - (4.0 - PI) * 4.0)) < 1e-9


def test_offset_of_a_rounded_rectangle_is_the_rounded_rectangle_of_changed_radius():
    from soft_molds.recipe.outline import RoundedPolygon, offset_outline

    # The parallel curve of a rounded rectangle w x h (radius r) at distance d inside is
    # the rounded rectangle (w - 2d) x (h - 2d) of radius max(r - d, 0) (elementary plane
    # geometry): area (w - 2d)(h - 2d) - (4 - pi) max(r - d, 0)^2.
    rect = RoundedPolygon(((0.0, 0.0), (40.0, 0.0), (40.0, 20.0), (0.0, 20.0)), (3.0,) * 4)
    for d in (1.0, 3.0, 5.0, -2.0):
        got = offset_outline(rect, d)
        assert got is not None
        rr = max(3.0 - d, 0.0)
        want = (40.0 - 2 * d) * (20.0 - 2 * d) - (4.0 - PI) * rr * rr
        assert abs(got.area_mm2() - want) < 1e-9


def test_offset_is_the_set_at_that_distance_from_the_outline():
    from soft_molds.recipe.outline import RoundedPolygon, offset_outline

    rng = np.random.default_rng(11)
    notched = RoundedPolygon(((0.0, 0.0), (30.0, 0.0), (30.0, 20.0), (15.0, 8.0),
                              (0.0, 20.0)), (2.0, 2.0, 2.0, 3.0, 0.0))
    hub = PieceOutline(hub_pieces((0.0, 0.0), 15.0, (0.0, PI / 2, PI, 3 * PI / 2), 40.0,
                                  12.0, 2.0))
    for outline, d in ((notched, 1.0), (notched, 2.5), (notched, -1.5), (hub, 3.0),
                       (hub, -2.0)):
        moved = offset_outline(outline, d)
        assert moved is not None
        # Its edge lies d inside (outside) the outline everywhere (the exact distance,
        # itself checked against brute force above).
        assert np.allclose(outline.sdf(moved.boundary(0.2)), -d, atol=1e-9)
        # And inside it is exactly where the outline's distance is beyond d: the inner
        # (outer) parallel set, tested at random points away from its edge.
        (x0, y0), (x1, y1) = outline.bounds()
        q = rng.uniform((x0 - 4, y0 - 4), (x1 + 4, y1 + 4), size=(3000, 2))
        s = outline.sdf(q) + d
        q, s = q[np.abs(s) > 0.01], s[np.abs(s) > 0.01]
        inside = Path(moved.boundary(0.02)).contains_points(q)
        assert np.array_equal(inside, s < 0.0)


def test_an_offset_that_does_not_fit_is_none():
    from soft_molds.recipe.outline import RoundedPolygon, offset_outline

    rect = RoundedPolygon(((0.0, 0.0), (40.0, 0.0), (40.0, 20.0), (0.0, 20.0)), (3.0,) * 4)
    assert offset_outline(rect, 10.0) is None     # the short sides vanish
    assert offset_outline(rect, 9.9) is not None
    hub = PieceOutline(hub_pieces((0.0, 0.0), 15.0, (0.0, PI / 2, PI, 3 * PI / 2), 40.0,
                                  12.0, 6.0))
    assert offset_outline(hub, 6.0) is None       # the round tips shrink to nothing
