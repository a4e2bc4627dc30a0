"""The revolved body and the bellows cavity against closed forms.

Sources: Pappus's centroid theorem (Pappus-Guldinus), V = 2 pi A r_bar, with the profile
polygon's area and first moment about the axis by the shoelace formula (the polygon
centroid formula C_y = sum (y_i + y_i+1)(x_i y_i+1 - x_i+1 y_i) / 6A); each rounding
changes the region by the spandrel between its two tangent points and the corner (a kite
of two right triangles less a circular sector of the turn angle, the sector's centroid at
4 r sin(theta/2) / (3 theta) from its centre); the hemisphere 2/3 pi r^3. Tolerances:
0.1 % on the BRep, 0.5 % on the mesh (issue acceptance). Section extents: circle chords
and straight flanks (elementary geometry). Independent library: trimesh's signed
distance on the tessellated solid.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

PI = math.pi


def pappus(points, rounds):
    """Volume of the region under ``points`` ((x, radius), from x = points[0][0]) turned
    about the axis: shoelace area and first moment, then each rounding's spandrel taken
    off (a convex corner) or added (a concave one)."""
    poly = [(points[0][0], 0.0), *points]
    if points[-1][1] > 0.0:
        poly.append((points[-1][0], 0.0))
    area = moment = 0.0
    for (x0, y0), (x1, y1) in zip(poly, poly[1:] + poly[:1]):
        cross = x0 * y1 - x1 * y0
        area += cross / 2.0
        moment += (y0 + y1) * cross / 6.0
    sign = -1.0 if area < 0 else 1.0  # the outline runs clockwise: make both positive
    area, moment = abs(area), sign * moment
    for k, r in enumerate(rounds):
        if r == 0.0:
            continue
        v = np.array(poly[k + 1])
        a = v - np.array(poly[k])
        b = np.array(poly[k + 2]) - v
        a, b = a / np.linalg.norm(a), b / np.linalg.norm(b)
        theta = math.acos(max(-1.0, min(1.0, float(a @ b))))  # the turn
        t = r * math.tan(theta / 2.0)
        t1, t2 = v - a * t, v + b * t
        u = (-a + b) / np.linalg.norm(-a + b)
        c = v + u * math.hypot(t, r)
        kite_a = r * t
        kite_m = (r * t / 2.0) * ((v[1] + t1[1] + c[1]) / 3.0 + (v[1] + c[1] + t2[1]) / 3.0)
        sector_a = r * r * theta / 2.0
        sector_m = sector_a * (c[1] - u[1] * 4.0 * r * math.sin(theta / 2.0) / (3.0 * theta))
        convex = a[0] * b[1] - a[1] * b[0] < 0.0  # a right turn of the clockwise outline
        s = -1.0 if convex else 1.0
        area += s * (kite_a - sector_a)
        moment += s * (kite_m - sector_m)
    return 2.0 * PI * moment, area, moment / area


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


# ---- the closed form itself --------------------------------------------------------------

def test_pappus_closed_form_gives_the_cylinder_and_the_hemisphere():
    # pi r^2 h and 2/3 pi r^3 (elementary solid geometry)
    assert pappus(((0.0, 3.0), (10.0, 3.0)), (0.0, 0.0))[0] == pytest.approx(
        PI * 9 * 10, rel=1e-12)
    assert pappus(((0.0, 5.0), (5.0, 5.0)), (0.0, 5.0))[0] == pytest.approx(
        2.0 / 3.0 * PI * 125, rel=1e-12)
    # a cone of radius 4, height 6: pi r^2 h / 3
    assert pappus(((0.0, 4.0), (6.0, 0.0)), (0.0, 0.0))[0] == pytest.approx(
        PI * 16 * 6 / 3, rel=1e-12)


# ---- the demo bellows, written out by hand ------------------------------------------------

# plug-bellows: neck 10 mm at r 7, five V pleats of pitch 8 to r 13, tip 8 mm; rounding 2.
BODY = ((0.0, 7.0), (10.0, 7.0), *[p for k in range(5) for p in
                                   ((14.0 + 8 * k, 13.0), (18.0 + 8 * k, 7.0))], (58.0, 7.0))
BODY_ROUNDS = (2.0,) * len(BODY)
WALL = 1.5
SOCKET_R, SOCKET_DEPTH = 3.0, 8.0


def cavity_by_symmetry(w: float):
    """The cavity of the demo: a flank of slope tan(alpha) = 6/4 moved w along its normal
    drops w / cos(alpha) vertically, so crests and roots keep their x and drop by that;
    the neck and tip drop by w and meet the flanks where the dropped lines cross; the end
    faces move in by w. Outer corners keep their centre (radius - w), inner ones (the
    roots, the neck's and tip's joints) grow to radius + w."""
    alpha = math.atan2(6.0, 4.0)
    drop = w / math.cos(alpha)
    join = (drop - w) / math.tan(alpha)  # the flank, dropped, meets rho = 7 - w this far out
    pts = [(w, 7.0 - w), (10.0 + join, 7.0 - w)]
    for k in range(5):
        pts.append((14.0 + 8 * k, 13.0 - drop))
        if k < 4:
            pts.append((18.0 + 8 * k, 7.0 - drop))
    pts += [(50.0 - join, 7.0 - w), (58.0 - w, 7.0 - w)]
    rounds = [2.0 - w, 2.0 + w] + [2.0 - w, 2.0 + w] * 4 + [2.0 - w, 2.0 + w, 2.0 - w]
    return tuple(pts), tuple(rounds)


def test_the_bellows_body_brep_matches_pappus(bundled):
    ms = bundled("plug-bellows")
    want, _, _ = pappus(BODY, BODY_ROUNDS)
    assert close(ms.volumes_mm3["body"], want, 1e-3), (ms.volumes_mm3["body"], want)


def test_the_bellows_cavity_brep_matches_pappus(bundled):
    ms = bundled("plug-bellows")
    pts, rr = cavity_by_symmetry(WALL)
    cavity, _, _ = pappus(pts, rr)
    # The socket (r 3, 8 deep) lies inside the cavity beyond the 1.5 mm inlet wall.
    want = cavity + PI * SOCKET_R ** 2 * WALL
    assert close(ms.volumes_mm3["void_set"], want, 1e-3), (ms.volumes_mm3["void_set"], want)


def test_the_bellows_cast_mesh_matches_pappus(bundled):
    ms = bundled("plug-bellows")
    pts, rr = cavity_by_symmetry(WALL)
    want = pappus(BODY, BODY_ROUNDS)[0] - pappus(pts, rr)[0] - PI * SOCKET_R ** 2 * WALL
    got = ms.part("cast").mesh.to_trimesh().volume
    assert close(got, want, 5e-3), (got, want)


def test_the_cavity_kind_derives_the_same_profile_as_the_symmetry_argument(bundled):
    cav = bundled("plug-bellows").recipe.voids[0].cavity()
    pts, rr = cavity_by_symmetry(WALL)
    assert np.allclose(cav.points, pts, atol=1e-9) and np.allclose(cav.rounds_mm, rr)


def test_every_bellows_wall_is_the_recipe_wall_thick_along_its_normal(bundled):
    from soft_molds.analysis.pressure import thickness_along

    r = bundled("plug-bellows").recipe
    walls = r.voids[0].membranes(r.body_length_mm)
    groups = sorted(m.group for m in walls)
    # 5 pleats, 2 sloped walls each; the neck and the tip; the inlet wall; the far end
    assert groups == ["end cap", "inlet wall"] + ["pleat wall"] * 10 + ["tube wall"] * 2
    h = thickness_along(r.body_primitives(), np.array([m.at_mm for m in walls]),
                        np.array([m.normal for m in walls]))
    assert np.allclose(h, WALL, atol=1e-5), h
    # The pleat walls bulge over their whole slant: (4^2 + 6^2)^0.5 between a crest and a
    # root; the first and last run from the neck's and tip's joints, shorter.
    pts, _ = cavity_by_symmetry(WALL)
    end_flank = math.dist(pts[1], pts[2])
    radii = sorted(m.radius_mm for m in walls if m.group == "pleat wall")
    assert radii == pytest.approx(sorted([end_flank / 2.0] * 2
                                         + [math.hypot(4.0, 6.0) / 2.0] * 8), rel=1e-12)


def test_the_core_stretches_the_inlet_to_the_cavitys_widest_circle(bundled):
    from soft_molds.analysis.extraction import Extraction

    ext = bundled("plug-bellows").review.result(Extraction)
    # The cavity's crest: vertex at 13 - w / cos(alpha), rounded by 0.5, its top 0.5 /
    # sin(phi / 2) - 0.5 lower (phi the crest's inner angle, pi - 2 alpha): a circle whose
    # perimeter over the 6 mm socket's is that radius over 3.
    alpha = math.atan2(6.0, 4.0)
    phi = PI - 2.0 * alpha
    top = 13.0 - WALL / math.cos(alpha) - 0.5 / math.sin(phi / 2.0) + 0.5
    # The check cuts sections at most 0.5 mm apart, so its widest lies within 0.25 mm of
    # the crest's top, on the crest's 0.5 mm arc (which spans 0.5 sin(alpha) = 0.42 mm
    # either side): at least 0.5 - (0.5^2 - 0.25^2)^0.5 = 0.067 mm below the top.
    # The mesh's section is a polygon within chord_mm = 0.02 mm inside that circle.
    low = top - (0.5 - math.sqrt(0.25 - 0.0625)) - 0.02
    assert low / SOCKET_R <= ext.stretch <= top / SOCKET_R + 1e-9
    assert ext.stretch < 1.0 + 10.0 / 2.0  # elongation 1000 % (Shore A10), safety factor 2


# ---- a dome and a domed cup ------------------------------------------------------------

@pytest.fixture(scope="module")
def kernel():
    from soft_molds.geometry import kernel as k
    from soft_molds.geometry.tessellate import tessellate

    return k, tessellate


@pytest.mark.parametrize("radius", [5.0, 12.5])
def test_a_hemisphere_is_two_thirds_pi_r_cubed_on_brep_and_mesh(kernel, radius):
    from soft_molds.recipe.primitives import Revolved

    k, tessellate = kernel
    dome = Revolved(((0.0, radius), (radius, radius)), (0.0, radius))
    want = 2.0 / 3.0 * PI * radius ** 3
    solid = k.build_primitive(dome, "body")
    assert close(solid.Volume(), want, 1e-3)
    assert close(dome.volume_mm3(), want, 1e-12)
    # A sphere meshed with facets 5 deg apart loses about (5 deg)^2 / 8 ~ 0.1 % of it.
    mesh = tessellate(solid, 0.02, 5.0, "body").to_trimesh()
    assert mesh.is_volume and close(mesh.volume, want, 5e-3)


CUP = ((0.0, 8.0), (12.0, 8.0), (20.0, 12.0), (40.0, 12.0), (46.0, 0.0))
CUP_ROUNDS = (1.0, 2.0, 2.0, 3.0, 0.0)


def test_a_cup_closing_on_its_axis_matches_pappus_on_brep_and_mesh(kernel):
    from soft_molds.recipe.primitives import Revolved

    k, tessellate = kernel
    cup = Revolved(CUP, CUP_ROUNDS)
    want = pappus(CUP, CUP_ROUNDS)[0]
    solid = k.build_primitive(cup, "body")
    assert close(solid.Volume(), want, 1e-3)
    mesh = tessellate(solid, 0.02, 10.0, "body").to_trimesh()
    assert mesh.is_volume and close(mesh.volume, want, 5e-3)


def test_the_exact_distance_agrees_with_trimesh_on_the_tessellated_cup(kernel):
    import trimesh

    from soft_molds.recipe.primitives import Revolved

    k, tessellate = kernel
    cup = Revolved(CUP, CUP_ROUNDS)
    mesh = tessellate(k.build_primitive(cup, "body"), 0.01, 5.0, "body").to_trimesh()
    rng = np.random.default_rng(7)
    p = rng.uniform([-3.0, -15.0, -15.0], [49.0, 15.0, 15.0], (400, 3))
    # trimesh's signed distance is positive inside; ours negative inside
    theirs = -trimesh.proximity.signed_distance(mesh, p)
    assert np.abs(cup.sdf(p) - theirs).max() < 0.02


# ---- sections ------------------------------------------------------------------------------

@pytest.mark.parametrize("t", [0.0, 1.5, 3.99, -2.5])
def test_hemisphere_sections_are_circle_chords(t):
    from soft_molds.recipe.primitives import Revolved

    r = 4.0
    dome = Revolved(((0.0, r), (r, r)), (0.0, r))
    h = math.sqrt(r * r - t * t)
    assert dome.section_extent(0, 2, t) == pytest.approx((0.0, h), abs=1e-9)
    assert dome.section_extent(1, 2, t) == pytest.approx((-h, h), abs=1e-9)
    if t >= 0.0:
        assert dome.section_extent(2, 0, t) == pytest.approx((-h, h), abs=1e-9)
    assert dome.section_extent(0, 1, 4.01) is None
    assert dome.section_extent(1, 0, -0.01) is None


@pytest.mark.parametrize("a", [3.0, 7.0, 9.0, 12.5])
def test_sharp_pleats_section_along_the_axis_spans_the_outermost_flanks(a):
    from soft_molds.recipe.primitives import Revolved

    sharp = Revolved(BODY, (0.0,) * len(BODY))
    # flanks rise 6 over 4: radius a is reached (a - 7) * 4/6 past the neck's end and
    # left as far before the last root
    lo, hi = (0.0, 58.0) if a <= 7.0 else (10.0 + (a - 7.0) * 4.0 / 6.0,
                                            50.0 - (a - 7.0) * 4.0 / 6.0)
    assert sharp.section_extent(0, 2, a) == pytest.approx((lo, hi), abs=1e-9)
    assert sharp.section_extent(0, 1, -a) == pytest.approx((lo, hi), abs=1e-9)


def test_rounded_crests_set_the_bounds_and_the_plan_parts_through_the_axis():
    from soft_molds.plan.sections import widest_offset
    from soft_molds.recipe.primitives import Revolved

    body = Revolved(BODY, BODY_ROUNDS)
    alpha = math.atan2(6.0, 4.0)
    top = 13.0 - 2.0 / math.sin((PI - 2.0 * alpha) / 2.0) + 2.0  # the crest arc's top
    lo, hi = body.bounds()
    assert np.allclose(lo, (0.0, -top, -top)) and np.allclose(hi, (58.0, top, top))
    offset, width = widest_offset((body,), 1, 2)
    assert offset == 0.0 and width == pytest.approx(2.0 * top, rel=1e-9)


# ---- any valid profile ---------------------------------------------------------------------

def _random_profiles(n: int, seed: int = 11):
    from soft_molds.recipe.primitives import profile_problems

    rng = np.random.default_rng(seed)
    out = []
    while len(out) < n:
        k = int(rng.integers(2, 9))
        xs = np.concatenate([[0.0], np.cumsum(rng.uniform(3.0, 10.0, k - 1))])
        rs = rng.uniform(3.0, 15.0, k)
        if rng.random() < 0.3:
            rs[-1] = 0.0
        rr = rng.uniform(0.0, 3.0, k) * (rs > 0)
        pts = tuple((float(x), float(r)) for x, r in zip(xs, rs))
        if not profile_problems(pts, tuple(float(x) for x in rr)):
            out.append((pts, tuple(float(x) for x in rr)))
    return out


@pytest.mark.parametrize("profile", _random_profiles(40))
def test_the_volume_by_discs_equals_pappus_for_any_valid_profile(profile):
    from soft_molds.recipe.primitives import Revolved

    pts, rr = profile
    assert Revolved(pts, rr).volume_mm3() == pytest.approx(pappus(pts, rr)[0], rel=1e-9)


def test_one_random_profile_builds_to_its_pappus_volume(kernel):
    from soft_molds.recipe.primitives import Revolved

    k, _ = kernel
    pts, rr = _random_profiles(1, seed=5)[0]
    solid = k.build_primitive(Revolved(pts, rr), "body")
    assert close(solid.Volume(), pappus(pts, rr)[0], 1e-3)


@pytest.mark.parametrize("rise", [0.0, 1e-7])
def test_a_rounded_point_on_a_straight_edge_is_a_plain_point(kernel, rise):
    # The kernel finds no arc through three collinear points ("GC_MakeArcOfCircle: no
    # result"); the rounding of a corner that turns by nothing (or by 1.3e-8 rad) would
    # pass within 1e-6 mm of it, so the point is kept sharp and the solid is the one
    # without it: a cylinder with rounded rims, by Pappus with spandrels.
    from soft_molds.recipe.primitives import PROFILE_FLAT_MM, Revolved, _rounding_standoff_mm

    k, _ = kernel
    points = ((0.0, 10.0), (15.0, 10.0 + rise), (30.0, 10.0))
    middle = np.array(points)
    assert _rounding_standoff_mm(middle[0], middle[1], middle[2], 1.0) < PROFILE_FLAT_MM
    solid = k.build_primitive(Revolved(points, (1.0, 1.0, 1.0)), "body")
    want = pappus(((0.0, 10.0), (30.0, 10.0)), (1.0, 1.0))[0]
    assert close(solid.Volume(), want, 1e-6)


@pytest.mark.parametrize("length,radius", [(1.0, 1.0), (15.0, 10.0), (300.0, 100.0)])
def test_the_slightest_cone_a_profile_may_hold_is_built_as_a_cone(kernel, length, radius):
    # Revolving an edge whose radius changes by less than about 4.5e-4 sqrt(dx) mm gave a
    # cylinder (15 mm edge, 0.001 mm rise: 3e-5 of the volume missing). The recipe refuses
    # rises below 1e-3 sqrt(dx); from there on the solid holds Pappus's volume.
    from soft_molds.recipe.primitives import Revolved, least_radius_change_mm, profile_problems

    k, _ = kernel
    rise = least_radius_change_mm(length) * (1.0 + 1e-6)  # clear of float rounding
    assert rise == pytest.approx(1e-3 * math.sqrt(length), rel=1e-5)
    points = ((0.0, radius), (length, radius + rise), (2 * length, radius))
    assert profile_problems(points, (0.0, 0.0, 0.0)) == []
    lower = ((0.0, radius), (length, radius + 0.99 * rise), (2 * length, radius))
    assert [i for i, *_ in profile_problems(lower, (0.0, 0.0, 0.0))] == [1, 2]
    solid = k.build_primitive(Revolved(points, (0.0, 0.0, 0.0)), "body")
    assert close(solid.Volume(), pappus(points, (0.0, 0.0, 0.0))[0], 1e-9)
