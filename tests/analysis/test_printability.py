"""Print-pose planning, checked on shapes whose answers follow from closed-form geometry.

Meshes come from trimesh.creation and manifold3d (exact booleans); expected areas, heights
and turn angles are hand arithmetic or closed-form roots computed with numpy here. The 45 deg
overhang limit and the 4 x 0.4 mm minimum wall are common practice for FDM printing.
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from meshes import from_manifold, from_trimesh

from soft_molds.analysis.printability import (
    FLAT_MIN_AREA_MM2,
    Printer,
    PrintPlan,
    fit_turn_deg,
    plan_print,
    print_findings,
)
from soft_molds.meshdata import TriMesh

PRINTER = Printer()


def _box(x: float, y: float, z: float) -> TriMesh:
    return from_trimesh(trimesh.creation.box(extents=(x, y, z)))


def _rect(w: float, h: float) -> np.ndarray:
    return np.array([[0.0, 0.0], [w, 0.0], [w, h], [0.0, h]])


def _turned_widths(w: float, h: float, t_deg: float) -> tuple[float, float]:
    # Closed form: a w x h rectangle turned by t (0..90 deg) spans w cos t + h sin t along x
    # and w sin t + h cos t along y.
    t = math.radians(t_deg)
    return w * math.cos(t) + h * math.sin(t), w * math.sin(t) + h * math.cos(t)


def _root_deg(w: float, h: float, limit: float) -> float:
    # Smallest t in [0, 90) with w cos t + h sin t = limit: R cos(t - phi) = limit with
    # R = hypot(w, h), phi = atan(h / w) (harmonic addition, closed form).
    return math.degrees(math.atan2(h, w) + math.acos(limit / math.hypot(w, h)))


def _candidate(plan: PrintPlan, down: tuple[float, float, float]) -> dict:
    (c,) = [c for c in plan.candidates if np.allclose(c["down"], down, atol=1e-9)]
    return c


def _checks(findings, severity: str | None = None) -> list[str]:
    return [f.check for f in findings if severity is None or f.severity == severity]


# --------------------------------------------------------------------------- printer


def test_default_min_wall_is_four_perimeters_of_a_04_nozzle():
    # common practice: 4 perimeters x 0.4 mm nozzle = 1.6 mm watertight wall
    assert PRINTER.min_wall_mm == pytest.approx(1.6)
    assert Printer(nozzle_mm=0.6, perimeters=3).min_wall_mm == pytest.approx(1.8)


# --------------------------------------------------------------------------- fit_turn_deg


def test_fit_turn_is_zero_when_axis_aligned_fits():
    assert fit_turn_deg(_rect(220.0, 40.0), (220.0, 220.0)) == 0.0  # exactly at the bed edge


def test_fit_turn_is_closed_form_root_of_rotated_width():
    expected = _root_deg(230.0, 40.0, 220.0)  # about 29.41 deg
    got = fit_turn_deg(_rect(230.0, 40.0), (220.0, 220.0))
    assert got == pytest.approx(expected, abs=1e-4)
    wx, wy = _turned_widths(230.0, 40.0, got)
    assert wx <= 220.0 + 1e-6 and wy <= 220.0 + 1e-6


def test_no_turn_fits_a_segment_longer_than_the_bed_diagonal():
    # closed form: the longest segment inside a 220 mm square is its diagonal, 311.13 mm
    assert 220.0 * math.sqrt(2.0) < 312.0
    assert fit_turn_deg(_rect(312.0, 1.0), (220.0, 220.0)) is None


def test_non_square_bed_keeps_its_axes_apart():
    # A 250 x 80 rectangle on a bed 100 wide (x) by 300 deep (y): the long side must end up
    # near y. Closed form: smallest t with 250 cos t + 80 sin t <= 100, about 85.35 deg,
    # where the y width 250 sin t + 80 cos t = 255.7 <= 300.
    expected = _root_deg(250.0, 80.0, 100.0)
    got = fit_turn_deg(_rect(250.0, 80.0), (100.0, 300.0))
    assert got == pytest.approx(expected, abs=1e-4)
    assert _turned_widths(250.0, 80.0, got)[1] <= 300.0


def test_non_square_bed_searches_past_a_quarter_turn():
    # A 250 mm segment pointing at -30 deg, on a bed 10 wide by 300 deep, fits only when it
    # points within acos(10/250) of +-y: turned direction u = t - 30 in [87.71, 92.29] deg,
    # so the smallest non-negative turn is 30 + acos(0.04) = 117.71 deg (closed form).
    a = math.radians(-30.0)
    seg = np.array([[0.0, 0.0], [250.0 * math.cos(a), 250.0 * math.sin(a)]])
    expected = 30.0 + math.degrees(math.acos(10.0 / 250.0))
    assert fit_turn_deg(seg, (10.0, 300.0)) == pytest.approx(expected, abs=1e-4)


# --------------------------------------------------------------------------- build volume


def test_230_box_fits_only_turned_by_smallest_root():
    plan = plan_print(_box(230.0, 40.0, 30.0), "box")
    # largest face 230 x 40 = 9200 mm2 down (hand arithmetic): a down vector along +-z
    assert abs(plan.down[2]) == pytest.approx(1.0)
    assert plan.contact_area_mm2 == pytest.approx(9200.0)
    assert plan.fits
    # 230 > 220: axis-aligned does not fit; closed-form root of 230 cos t + 40 sin t = 220
    expected = _root_deg(230.0, 40.0, 220.0)
    assert plan.turn_deg == pytest.approx(expected, abs=0.2)
    wx, wy = _turned_widths(230.0, 40.0, plan.turn_deg)
    assert wx <= 220.0 + 1e-6 and wy <= 220.0 + 1e-6  # the box turned by it fits
    assert plan.size_mm == pytest.approx((wx, wy, 30.0), abs=1e-6)
    fs = print_findings(plan, PRINTER)
    (info,) = [f for f in fs if f.check == "build-volume"]
    assert info.severity == "info" and info.value == pytest.approx(plan.turn_deg)
    assert f"{plan.turn_deg:.1f} deg" in info.message
    assert "error" not in [f.severity for f in fs]


def test_tilted_230_box_still_lies_on_its_largest_face():
    # The same box rotated about an oblique axis: the pose must undo the tilt (general
    # shortest-arc rotation, not the axis-aligned special cases).
    rot = trimesh.transformations.rotation_matrix(0.7, [1.0, 2.0, 3.0])
    t = trimesh.creation.box(extents=(230.0, 40.0, 30.0))
    t.apply_transform(rot)
    plan = plan_print(from_trimesh(t), "box")
    thin_axis = rot[:3, 2]  # the box's 30 mm axis, in the world frame
    assert abs(float(np.dot(plan.down, thin_axis))) == pytest.approx(1.0, abs=1e-9)
    assert plan.size_mm[2] == pytest.approx(30.0, abs=1e-6)
    assert plan.fits
    wx, wy = plan.size_mm[:2]
    assert max(wx, wy) <= 220.0 + 1e-6
    # The footprint is the 230 x 40 rectangle at some in-plane angle t: wx + wy =
    # 270 (|c| + |s|) and wx - wy = 190 (|c| - |s|), so the squares of those ratios sum
    # to 2 (closed form, from _turned_widths).
    assert ((wx + wy) / 270.0) ** 2 + ((wx - wy) / 190.0) ** 2 == pytest.approx(2.0, abs=1e-6)


def test_320_box_fits_in_no_pose():
    # 320 mm exceeds the 311.13 mm bed diagonal lying down and the 250 mm height standing.
    plan = plan_print(_box(320.0, 40.0, 30.0), "box")
    assert not plan.fits
    assert not any(c["fits"] for c in plan.candidates)
    (err,) = [f for f in print_findings(plan, PRINTER) if f.check == "build-volume"]
    assert err.severity == "error"
    # closest pose: on the 320 x 40 side, footprint 320 x 30 turned 45 deg spans
    # (320 + 30) / sqrt 2 = 247.49 mm along each bed side (hand arithmetic)
    assert err.value == pytest.approx(350.0 / math.sqrt(2.0), abs=1e-3)
    assert err.limit == pytest.approx(220.0)


def test_too_tall_box_lies_down_when_the_bed_allows():
    # 100 x 100 x 300: standing is 300 > 250 mm high. Lying down needs a 300 x 100
    # footprint, which no turn fits on 220 x 220 (hand arithmetic: both widths <= 220 need
    # 400 (cos t + sin t) <= 440, i.e. t <= 6.1 or >= 83.9 deg, where the larger width is
    # >= 300 cos 6.1 deg = 298 mm), so a 320 x 320 bed is used: it lies on a side, 100 high.
    box = _box(100.0, 100.0, 300.0)
    assert not plan_print(box, "box").fits
    plan = plan_print(box, "box", Printer(bed_mm=(320.0, 320.0)))
    assert plan.fits
    assert abs(plan.down[2]) == pytest.approx(0.0, abs=1e-12)  # along +-x or +-y
    assert plan.size_mm[2] == pytest.approx(100.0)
    assert plan.turn_deg == 0.0


def test_too_tall_bar_lies_diagonally_on_the_default_bed():
    # 260 x 30 x 30 bar: 260 > 250 mm standing; lying, the 260 x 30 footprint fits turned
    # between the roots of 260 cos t + 30 sin t = 220 (39.4 deg, closed form) and
    # 260 sin t + 30 cos t = 220 (50.6 deg); the smallest is the first.
    plan = plan_print(_box(260.0, 30.0, 30.0), "bar")
    assert plan.fits
    assert plan.size_mm[2] == pytest.approx(30.0)
    assert plan.turn_deg == pytest.approx(_root_deg(260.0, 30.0, 220.0), abs=0.2)


# --------------------------------------------------------------------------- overhang


def _tee() -> TriMesh:
    # Stem 20 x 20 standing 0..31 mm under a 60 x 30 x 10 crossbar at 30..40 mm (1 mm overlap
    # so the union is one solid; the stem shows 30 mm below the bar).
    stem = m3.Manifold.cube([20.0, 20.0, 31.0]).translate([-10.0, -10.0, 0.0])
    bar = m3.Manifold.cube([60.0, 30.0, 10.0]).translate([-30.0, -15.0, 30.0])
    return from_manifold(stem + bar)


def test_tee_stem_down_overhang_is_crossbar_underside_beyond_stem():
    plan = plan_print(_tee(), "tee")
    stem_down = _candidate(plan, (0.0, 0.0, -1.0))
    # hand arithmetic: crossbar underside 60 x 30 minus the stem's 20 x 20 = 1400 mm2
    assert stem_down["overhang_area_mm2"] == pytest.approx(1400.0, rel=0.01)
    assert stem_down["contact_area_mm2"] == pytest.approx(400.0, rel=1e-6)
    # on a crossbar side (y = -15 plane) the stem's own side, 20 x 30, hangs 5 mm above the bed
    assert _candidate(plan, (0.0, -1.0, 0.0))["overhang_area_mm2"] == pytest.approx(
        600.0, rel=0.01)


def test_tee_prefers_crossbar_down_with_no_overhang():
    plan = plan_print(_tee(), "tee")
    assert plan.down == pytest.approx((0.0, 0.0, 1.0))
    assert plan.overhang_area_mm2 == pytest.approx(0.0, abs=1e-9)
    assert plan.contact_area_mm2 == pytest.approx(1800.0, rel=1e-6)  # 60 x 30 top face
    assert plan.size_mm == pytest.approx((60.0, 30.0, 40.0), abs=1e-4)
    assert "overhang" not in _checks(print_findings(plan, PRINTER))


def _flared_prism(slope_deg: float, base: float = 20.0, run: float = 20.0,
                  depth: float = 30.0) -> tuple[TriMesh, float]:
    # Cross-section in x-z, extruded along y: bottom edge (0,0)-(base,0), then a face rising
    # outward at `slope_deg` from horizontal for `run` mm, a flat top back to x = 0 and a
    # vertical left wall. The slanted face looks down at slope_deg from horizontal. The
    # section is convex, so its hull is the prism itself.
    a = math.radians(slope_deg)
    top = run * math.sin(a)
    sec = [(0.0, 0.0), (base, 0.0), (base + run * math.cos(a), top), (0.0, top)]
    pts = [(x, y, z) for x, z in sec for y in (0.0, depth)]
    return from_trimesh(trimesh.convex.convex_hull(np.array(pts))), run * depth


def test_downward_face_30_deg_from_horizontal_needs_support():
    # 45 deg limit (common practice): -n_z = cos 30 = 0.866 > sin 45 = 0.707
    mesh, slanted_area = _flared_prism(30.0)
    c = _candidate(plan_print(mesh, "prism"), (0.0, 0.0, -1.0))
    assert c["overhang_area_mm2"] == pytest.approx(slanted_area, rel=1e-6)  # 20 x 30 = 600


def test_downward_face_60_deg_from_horizontal_needs_no_support():
    # 45 deg limit (common practice): -n_z = cos 60 = 0.5 < sin 45 = 0.707
    mesh, _ = _flared_prism(60.0)
    c = _candidate(plan_print(mesh, "prism"), (0.0, 0.0, -1.0))
    assert c["overhang_area_mm2"] == pytest.approx(0.0, abs=1e-9)


def test_overhang_limit_is_measured_from_vertical():
    # The 60 deg face leans 30 deg from vertical: beyond a 20 deg limit, within a 40 deg one
    # (definition of the limit; a from-horizontal reading would flip both answers).
    mesh, slanted_area = _flared_prism(60.0)
    strict = _candidate(plan_print(mesh, "prism", Printer(overhang_deg=20.0)), (0.0, 0.0, -1.0))
    lax = _candidate(plan_print(mesh, "prism", Printer(overhang_deg=40.0)), (0.0, 0.0, -1.0))
    assert strict["overhang_area_mm2"] == pytest.approx(slanted_area, rel=1e-6)
    assert lax["overhang_area_mm2"] == pytest.approx(0.0, abs=1e-9)


# --------------------------------------------------------------------------- walls


def _hollow_cube(wall: float, side: float = 40.0) -> TriMesh:
    outer = m3.Manifold.cube([side] * 3, center=True)
    inner = m3.Manifold.cube([side - 2.0 * wall] * 3, center=True)
    return from_manifold(outer - inner)


def test_hollow_box_with_12_mm_walls_is_flagged_thin():
    plan = plan_print(_hollow_cube(1.2), "shell")
    assert plan.min_wall_mm == pytest.approx(1.2, abs=0.05)
    # the thinnest spot is on a wall: between the inner (18.8 mm) and outer (20 mm) faces
    assert 18.8 - 1e-3 <= max(abs(c) for c in plan.min_wall_where_mm) <= 20.0 + 1e-3
    # every facet is 1.2 mm from the opposite face: 6 x 40^2 + 6 x 37.6^2 = 18082.56 mm2
    assert plan.thin_wall_area_mm2 == pytest.approx(18082.56, rel=0.01)
    (w,) = [f for f in print_findings(plan, PRINTER) if f.check == "print-wall"]
    assert w.severity == "warning"
    assert w.value == pytest.approx(1.2, abs=0.05)
    assert w.limit == pytest.approx(1.6)  # 4 x 0.4 mm, common practice
    assert w.where_mm == pytest.approx(plan.min_wall_where_mm)
    # the sealed cavity's ceiling must be bridged: 37.6 x 37.6 = 1413.76 mm2
    assert plan.overhang_area_mm2 == pytest.approx(37.6 ** 2, rel=0.01)


def test_hollow_box_with_3_mm_walls_is_not_flagged():
    plan = plan_print(_hollow_cube(3.0), "shell")
    assert plan.min_wall_mm == pytest.approx(3.0, abs=0.05)
    assert plan.thin_wall_area_mm2 == 0.0
    assert "print-wall" not in _checks(print_findings(plan, PRINTER))


# --------------------------------------------------------------------------- fallback, order


def test_part_without_flat_face_falls_back_with_a_warning():
    ball = trimesh.creation.icosphere(subdivisions=2, radius=20.0)
    # precondition from trimesh: no facet reaches 25 mm2 (4 pi 20^2 / 320 = 15.7 mm2 mean)
    assert float(ball.area_faces.max()) < FLAT_MIN_AREA_MM2
    plan = plan_print(from_trimesh(ball), "ball")
    assert len(plan.candidates) == 1
    assert plan.contact_area_mm2 < FLAT_MIN_AREA_MM2
    fs = print_findings(plan, PRINTER)
    (w,) = [f for f in fs if f.check == "flat-face"]
    assert w.severity == "warning" and w.limit == pytest.approx(25.0)


def test_plan_is_deterministic():
    a = plan_print(_tee(), "tee")
    b = plan_print(_tee(), "tee")
    assert a == b
    assert print_findings(a, PRINTER) == print_findings(b, PRINTER)
