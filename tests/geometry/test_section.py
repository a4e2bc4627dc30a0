"""The section body (an outline swept along x, optionally tapered) against closed forms.

Sources: the shoelace formula for a polygon's area; each rounding of radius r at a corner
turning by theta takes off (convex) or adds (concave) the corner's spandrel, the kite of
two right triangles r x r tan(theta/2) less the circular sector r^2 theta / 2, so
r^2 (tan(theta/2) - theta/2); the rounded rectangle w h - (4 - pi) r^2; the disc pi r^2,
the half disc pi r^2 / 2 and the ellipse pi a b (elementary plane geometry); a frustum of
similar sections whose linear scale runs from 1 to s over the length L holds
L A0 (1 + s + s^2) / 3 (the integral of A0 s(x)^2). Tolerances: 0.1 % on the BRep, 0.5 %
on the mesh. Section extents: circle chords and the linear shrink of the bounds (elementary
geometry); trimesh's plane sections of the tessellated solid. Distances: trimesh's signed
distance on the tessellated solid (an independent library).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

PI = math.pi
L = 60.0


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


def polygon_area(points, rounds):
    """Shoelace area of the sharp polygon, each rounding's spandrel taken off a convex
    corner and added at a concave one (module docstring)."""
    v = np.asarray(points, dtype=float)
    y, z = v[:, 0], v[:, 1]
    area = 0.5 * float(np.sum(y * np.roll(z, -1) - np.roll(y, -1) * z))
    sign = 1.0 if area > 0 else -1.0
    area = abs(area)
    n = len(v)
    for i, r in enumerate(rounds):
        a = v[i] - v[i - 1]
        b = v[(i + 1) % n] - v[i]
        cross = sign * (a[0] * b[1] - a[1] * b[0])
        theta = math.acos(max(-1.0, min(1.0, float(a @ b) / (np.linalg.norm(a) *
                                                            np.linalg.norm(b)))))
        spandrel = r * r * (math.tan(theta / 2.0) - theta / 2.0)
        area += -spandrel if cross > 0 else spandrel
    return area


def frustum(a0: float, s: float, length: float = L) -> float:
    return length * a0 * (1.0 + s + s * s) / 3.0


# A six-sided section with a notch: point 3 is a concave corner (seedling-stem groove).
NOTCHED = ((-9.0, 0.0), (9.0, 0.0), (9.0, 10.0), (0.0, 6.0), (-9.0, 10.0))
NOTCHED_ROUNDS = (1.0, 1.0, 2.0, 3.0, 2.0)


def outlines():
    """(name, outline, closed-form area) for every outline the kind offers."""
    from soft_molds.recipe.outline import Ellipse, RoundedPolygon

    r = 7.5
    return [
        ("rounded-rectangle", RoundedPolygon(((-10.0, -6.0), (10.0, -6.0), (10.0, 6.0),
                                              (-10.0, 6.0)), (2.5,) * 4),
         20.0 * 12.0 - (4.0 - PI) * 2.5 ** 2),
        ("circle", RoundedPolygon(((-r, -r), (r, -r), (r, r), (-r, r)), (r,) * 4), PI * r * r),
        ("half-round", RoundedPolygon(((-r, 0.0), (r, 0.0), (r, r), (-r, r)),
                                      (0.0, 0.0, r, r)), PI * r * r / 2.0),
        ("ellipse", Ellipse((0.0, 0.0), 9.0, 5.0), PI * 9.0 * 5.0),
        ("tall-ellipse", Ellipse((0.0, 0.0), 4.0, 9.0), PI * 4.0 * 9.0),
        ("polygon", RoundedPolygon(NOTCHED, NOTCHED_ROUNDS),
         polygon_area(NOTCHED, NOTCHED_ROUNDS)),
    ]


CASES = [(name, s) for name, _, _ in outlines() for s in (1.0, 0.6)]


def _case(name: str, s: float):
    from soft_molds.recipe.primitives import Extruded

    o, area = next((o, a) for n, o, a in outlines() if n == name)
    (y0, z0), (y1, _) = o.bounds()
    return Extruded(o, L, s, ((y0 + y1) / 2.0, z0)), area


@pytest.fixture(scope="module")
def kernel():
    from soft_molds.geometry import kernel as k
    from soft_molds.geometry.tessellate import tessellate

    return k, tessellate


@pytest.fixture(scope="module")
def meshes(kernel):
    """Each case built and meshed once (chord 0.01 mm, facets 5 deg apart)."""
    k, tessellate = kernel
    out = {}
    for name, s in CASES:
        e, _ = _case(name, s)
        solid = k.build_primitive(e, "body")
        out[name, s] = (solid, tessellate(solid, 0.01, 5.0, "body").to_trimesh())
    return out


def test_the_closed_forms_agree_with_each_other():
    # the rounded rectangle and the half disc by the spandrel formula
    assert polygon_area(((0, 0), (20, 0), (20, 12), (0, 12)), (2.5,) * 4) == pytest.approx(
        240.0 - (4 - PI) * 6.25, rel=1e-12)
    assert polygon_area(((-3, 0), (3, 0), (3, 3), (-3, 3)), (0, 0, 3, 3)) == pytest.approx(
        PI * 4.5, rel=1e-12)
    # a frustum of discs is the cone frustum pi h (R^2 + R r + r^2) / 3
    assert frustum(PI * 16.0, 0.5, 9.0) == pytest.approx(PI * 9.0 * (16 + 8 + 4) / 3.0)


@pytest.mark.parametrize(("name", "s"), CASES)
def test_the_volume_is_the_closed_form_exactly_on_the_brep_and_the_mesh(meshes, name, s):
    e, area = _case(name, s)
    want = frustum(area, s)
    assert e.volume_mm3() == pytest.approx(want, rel=1e-12)
    solid, mesh = meshes[name, s]
    assert close(solid.Volume(), want, 1e-3), (solid.Volume(), want)
    assert mesh.is_volume and close(mesh.volume, want, 5e-3), (mesh.volume, want)


@pytest.mark.parametrize(("name", "s"), CASES)
def test_the_bounds_are_those_of_the_mesh(meshes, name, s):
    e, _ = _case(name, s)
    lo, hi = e.bounds()
    _, mesh = meshes[name, s]
    # the mesh's vertices lie on the surface; chords lie within 0.01 mm of it
    assert np.allclose(mesh.bounds[0], lo, atol=0.011) and np.allclose(mesh.bounds[1], hi,
                                                                        atol=0.011)


@pytest.mark.parametrize(("name", "s"), CASES)
def test_the_distance_is_exact_for_prisms_and_never_too_large_when_tapered(meshes, name, s):
    import trimesh

    e, _ = _case(name, s)
    _, mesh = meshes[name, s]
    lo, hi = e.bounds()
    rng = np.random.default_rng(3)
    p = rng.uniform(lo - 3.0, hi + 3.0, (400, 3))
    theirs = -trimesh.proximity.signed_distance(mesh, p)  # trimesh: positive inside
    ours = e.sdf(p)
    far = np.abs(theirs) > 0.05  # the sign of a point on the surface is a toss-up
    assert np.all(np.sign(ours[far]) == np.sign(theirs[far]))
    if s == 1.0:
        assert np.abs(ours - theirs).max() < 0.02
    else:
        # a lower bound of the distance, by at most the slope factor (module docstring of
        # Extruded.sdf), the mesh within 0.01 mm of the surface
        assert np.all(np.abs(ours) <= np.abs(theirs) + 0.02)
        assert np.all(np.abs(ours) >= e.slope_factor() * np.abs(theirs) - 0.02)


def test_the_half_round_sections_are_circle_chords_shrinking_along_x():
    e, _ = _case("half-round", 0.6)
    r = 7.5
    for t in (0.0, 1.0, 5.0, 7.4):
        # across x at x = t: the D scaled by s(t) about the flat side's middle
        s = 1.0 - 0.4 * t / L
        assert e.section_extent(1, 0, t) == pytest.approx((-s * r, s * r), abs=1e-12)
        assert e.section_extent(2, 0, t) == pytest.approx((0.0, s * r), abs=1e-12)
        # upright planes y = t: the z extent is the widest chord, at the inlet face
        assert e.section_extent(2, 1, t) == pytest.approx((0.0, math.sqrt(r * r - t * t)),
                                                          abs=1e-9)
        # along x at height z = t: as far as s(x) r >= t, x <= L (1 - t / r) / 0.4
        far = min(L, L * (1.0 - t / r) / 0.4)
        assert e.section_extent(0, 2, t) == pytest.approx((0.0, far), abs=1e-9)
    assert e.section_extent(0, 2, 7.6) is None and e.section_extent(1, 0, -0.1) is None


@pytest.mark.parametrize(("name", "s"), [("polygon", 0.6), ("ellipse", 0.6), ("tall-ellipse", 0.6),
                                         ("polygon", 1.0), ("half-round", 0.6)])
def test_cross_sections_match_trimesh_sections_of_the_mesh(meshes, name, s):
    e, _ = _case(name, s)
    _, mesh = meshes[name, s]
    lo, hi = e.bounds()
    for w in (1, 2):
        v = 3 - w
        for f in (0.1, 0.3, 0.5, 0.77, 0.9):
            t = lo[w] + f * (hi[w] - lo[w])
            normal = np.eye(3)[w]
            cut = mesh.section(plane_origin=normal * t, plane_normal=normal)
            got = e.section_extent(v, w, t)
            assert cut is not None and got is not None
            pts = cut.vertices
            # the mesh lies within 0.01 mm inside the surface (chords)
            assert got[0] == pytest.approx(pts[:, v].min(), abs=0.02)
            assert got[1] == pytest.approx(pts[:, v].max(), abs=0.02)


def test_the_plan_finds_the_tapered_ds_widest_upright_section_on_its_axis():
    from soft_molds.plan.sections import widest_offset

    e, _ = _case("half-round", 0.6)
    offset, width = widest_offset((e,), 2, 1)
    assert offset == 0.0 and width == pytest.approx(7.5, abs=1e-9)
    offset, width = widest_offset((e,), 1, 2)
    assert offset == 0.0 and width == pytest.approx(15.0, abs=1e-9)  # the flat side


def _valid_polygons(n: int, seed: int = 1):
    """Polygons of 5 to 8 corners on a 1 mm grid with random roundings, kept when the
    kind's checks pass (most random point lists cross themselves)."""
    from soft_molds.recipe.outline import polygon_problems

    rng = np.random.default_rng(seed)
    out = []
    while len(out) < n:
        k = int(rng.integers(5, 9))
        pts = tuple((float(rng.integers(0, 12)), float(rng.integers(0, 12))) for _ in range(k))
        rr = tuple(float(x) for x in rng.choice([0.0, 1.0, 2.0, 3.0, 5.0], k))
        if not polygon_problems(pts, rr, 0.05):
            out.append((pts, rr))
    return out


@pytest.mark.parametrize("poly", _valid_polygons(24))
def test_every_polygon_the_checks_pass_builds_to_its_closed_form_volume(kernel, poly):
    from soft_molds.recipe.outline import RoundedPolygon
    from soft_molds.recipe.primitives import Extruded

    k, _ = kernel
    pts, rr = poly
    for s in (1.0, 0.5):
        want = frustum(polygon_area(pts, rr), s, 10.0)
        solid = k.build_primitive(Extruded(RoundedPolygon(pts, rr), 10.0, s), "body")
        assert close(solid.Volume(), want, 1e-3), (solid.Volume(), want)


# ---- the demo --------------------------------------------------------------------------

R_DEMO, L_DEMO, S_DEMO = 11.0, 80.0, 0.7


@pytest.mark.parametrize(("stem", "radius", "length", "tip"),
                         [("seedling-taper-finger", R_DEMO, L_DEMO, S_DEMO),
                          ("stem-d-finger", 9.0, 54.0, 1.0)])
def test_the_demo_bodies_are_frustums_of_half_discs(bundled, stem, radius, length, tip):
    ms = bundled(stem)
    want = frustum(PI * radius ** 2 / 2.0, tip, length)  # tip 1: the prism L pi r^2 / 2
    assert close(ms.volumes_mm3["body"], want, 1e-3), (ms.volumes_mm3["body"], want)
    # the cast is the body less the voids (measured by the kernel), on the mesh
    got = ms.part("cast").mesh.to_trimesh().volume
    assert close(got, want - ms.volumes_mm3["void_set"], 5e-3)


def test_the_demo_keeps_its_flat_side_on_the_bottom_plane(bundled):
    cast = bundled("seedling-taper-finger").part("cast").mesh.to_trimesh()
    assert cast.bounds[0][2] == pytest.approx(0.0, abs=1e-6)
    # the far end: a D of 0.7 x 22 mm across
    tip = cast.vertices[np.abs(cast.vertices[:, 0] - L_DEMO) < 1e-6]
    assert np.ptp(tip[:, 1]) == pytest.approx(2 * R_DEMO * S_DEMO, abs=0.02)


def test_the_demo_chamber_walls_are_the_closed_form_thickness_along_their_normals(bundled):
    from soft_molds.analysis.pressure import thickness_along

    r = bundled("seedling-taper-finger").recipe
    walls = r.voids[0].membranes(r.body_length_mm)
    h = thickness_along(r.body_primitives(), np.array([m.at_mm for m in walls]),
                        np.array([m.normal for m in walls]))
    for m, got in zip(walls, h):
        x, y, z = m.at_mm
        radius = R_DEMO * (1.0 - (1.0 - S_DEMO) * x / L_DEMO)  # the D's radius at x
        if m.normal == (0.0, 0.0, -1.0):
            want = z  # the floor down to the flat side
        elif m.normal == (0.0, 0.0, 1.0):
            want = radius - z  # up to the arc's top (the ray runs along x = const)
        elif m.normal[0] == 0.0:
            want = math.sqrt(radius ** 2 - z ** 2) - abs(y)  # across to the arc
        else:
            want = x if m.normal[0] < 0 else L_DEMO - x  # to the end faces
        assert got == pytest.approx(want, abs=1e-5), (m, got, want)
    # the thinnest: the side walls of the last chamber, still above checks.min_wall_mm
    assert min(h) >= r.checks.min_wall_mm
