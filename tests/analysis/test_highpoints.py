"""Air-trap (high point) search and sprue/vent placement, checked on shapes with known answers.

Shapes come from manifold3d (exact booleans) and trimesh.creation; expected heights are closed
form. The persistence rule is checked against a brute-force evaluation of its published
definition (0-dimensional persistence, "elder rule": H. Edelsbrunner & J. Harer,
Computational Topology, AMS 2010, ch. VII). Venting every high spot and "fill at one end, vent
at the other" are common practice.
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from meshes import from_manifold, from_trimesh

from soft_molds.analysis.highpoints import (
    FIT_STEP,
    MOUTH_RIM_BAND_MM,
    HighPoint,
    Opening,
    find_high_points,
    plan_openings,
    serves,
    unserved,
)
from soft_molds.meshdata import TriMesh

UP = (0.0, 0.0, 1.0)


# Two round bosses on a block: tops at 10 + 6 = 16 mm and 10 + 3 = 13 mm (closed form).
BLOCK = (40.0, 20.0, 10.0)
TALL = dict(axis=(10.0, 10.0), height=6.0, radius=4.0)
SHORT = dict(axis=(30.0, 10.0), height=3.0, radius=4.0)


def _two_bumps() -> TriMesh:
    body = m3.Manifold.cube(BLOCK)
    for b in (TALL, SHORT):
        cyl = m3.Manifold.cylinder(b["height"], b["radius"], circular_segments=24)
        body = body + cyl.translate([b["axis"][0], b["axis"][1], BLOCK[2]])
    return from_manifold(body)


def _radial(p, axis) -> float:
    return math.hypot(p[0] - axis[0], p[1] - axis[1])


def test_flat_box_has_one_high_point_at_top_face():
    mesh = from_trimesh(trimesh.creation.box(extents=(30.0, 20.0, 6.0)))
    (hp,) = find_high_points(mesh, UP)
    assert isinstance(hp, HighPoint)
    assert hp.height_mm == pytest.approx(3.0)  # closed form: half the 6 mm height
    assert hp.position_mm[2] == pytest.approx(3.0)
    assert hp.persistence_mm == math.inf
    # plateau = the four top corners
    assert sorted(map(tuple, hp.plateau_mm)) == sorted(
        (x, y, 3.0) for x in (-15.0, 15.0) for y in (-10.0, 10.0)
    )
    assert not hp.plateau_mm.flags.writeable


def test_two_bumps_give_two_high_points_higher_first_at_bump_tops():
    hps = find_high_points(_two_bumps(), UP)
    assert len(hps) == 2
    hi, lo = hps
    assert hi.height_mm == pytest.approx(16.0, abs=1e-5)  # 10 + 6, closed form
    assert lo.height_mm == pytest.approx(13.0, abs=1e-5)  # 10 + 3, closed form
    assert _radial(hi.position_mm, TALL["axis"]) <= TALL["radius"] + 1e-5
    assert _radial(lo.position_mm, SHORT["axis"]) <= SHORT["radius"] + 1e-5
    assert hi.persistence_mm == math.inf
    # the short boss's region joins the tall one's at the block top: 13 - 10 = 3 mm
    assert lo.persistence_mm == pytest.approx(3.0, abs=1e-5)
    # plateaus are the whole flat boss tops (24-gon rims, no centre vertex) and nothing else
    assert len(hi.plateau_mm) == 24 and len(lo.plateau_mm) == 24
    np.testing.assert_allclose([_radial(p, SHORT["axis"]) for p in lo.plateau_mm], 4.0,
                               atol=1e-5)


def test_low_persistence_bump_is_ignored():
    # A 0.3 mm boss stands less than persistence_mm = 0.5 above the block top around it.
    body = m3.Manifold.cube(BLOCK)
    for h, x in ((6.0, 10.0), (0.3, 30.0)):
        body = body + m3.Manifold.cylinder(h, 4.0, circular_segments=24).translate([x, 10, 10])
    hps = find_high_points(from_manifold(body), UP)
    assert [round(h.height_mm, 4) for h in hps] == [16.0]
    hps_fine = find_high_points(from_manifold(body), UP, persistence_mm=0.2)
    assert [round(h.height_mm, 4) for h in hps_fine] == [16.0, 10.3]


def test_internal_void_rim_is_not_a_high_point():
    # Cavity normals point into the void (out of the silicone) after the difference.
    body = m3.Manifold.cube(BLOCK) - m3.Manifold.cube([20.0, 10.0, 4.0]).translate([10, 5, 3])
    mesh = from_manifold(body)
    assert mesh.volume_mm3() == pytest.approx(40 * 20 * 10 - 20 * 10 * 4)  # closed form
    hps = find_high_points(mesh, UP)
    assert len(hps) == 1
    assert hps[0].height_mm == pytest.approx(10.0)  # the block top, not the void top at 7


def test_horizontal_cylinder_high_point_at_radius_within_sagitta():
    r, n = 5.0, 32
    cyl = trimesh.creation.cylinder(radius=r, height=30.0, sections=n)
    cyl.apply_transform(trimesh.transformations.rotation_matrix(math.pi / 2, [0, 1, 0]))
    (hp,) = find_high_points(from_trimesh(cyl), UP)
    # an inscribed n-gon's top lies between the chord at r cos(pi/n) and the circle (sagitta)
    assert r * math.cos(math.pi / n) - 1e-9 <= hp.height_mm <= r + 1e-9


def test_tilted_box_high_point_at_highest_corner():
    a, b, c = 30.0, 20.0, 6.0
    th = math.radians(10.0)
    box = trimesh.creation.box(extents=(a, b, c))
    box.apply_transform(trimesh.transformations.rotation_matrix(th, [0, 1, 0]))
    (hp,) = find_high_points(from_trimesh(box), UP)
    # rotation about y: z' = -x sin(th) + z cos(th); max at x = -a/2, z = +c/2
    expected = a / 2 * math.sin(th) + c / 2 * math.cos(th)
    assert hp.height_mm == pytest.approx(expected, abs=1e-9)
    corner_x = -a / 2 * math.cos(th) + c / 2 * math.sin(th)
    assert hp.position_mm[0] == pytest.approx(corner_x, abs=1e-9)
    assert abs(hp.position_mm[1]) == pytest.approx(b / 2)
    assert hp.position_mm[2] == pytest.approx(expected, abs=1e-9)


def test_up_vector_is_honoured():
    # The two-boss part laid on its side with bosses along +x, poured with up = +x.
    rot = m3.Manifold.cube(BLOCK)
    for bump in (TALL, SHORT):
        cyl = m3.Manifold.cylinder(bump["height"], bump["radius"], circular_segments=24)
        rot = rot + cyl.translate([bump["axis"][0], bump["axis"][1], BLOCK[2]])
    rot = rot.rotate([0.0, 90.0, 0.0])  # +z -> +x
    hps = find_high_points(from_manifold(rot), (1.0, 0.0, 0.0))
    assert [round(h.height_mm, 4) for h in hps] == [16.0, 13.0]


def test_plan_openings_on_two_bumps_sprue_on_higher_one_vent_on_lower():
    mesh = _two_bumps()
    ops = plan_openings(mesh, UP, sprue_radius_mm=3.0, vent_radius_mm=1.0)
    assert [o.kind for o in ops] == ["sprue", "vent"]
    sprue, vent = ops
    assert sprue.center_mm[2] == pytest.approx(16.0, abs=1e-5)
    assert _radial(sprue.center_mm, TALL["axis"]) <= TALL["radius"] + 1e-5
    assert sprue.radius_mm == 3.0 and vent.radius_mm == 1.0
    assert vent.center_mm[2] == pytest.approx(13.0, abs=1e-5)
    assert _radial(vent.center_mm, SHORT["axis"]) <= SHORT["radius"] + 1e-5
    assert unserved(mesh, UP, ops) == ()


def test_long_flat_bar_sprue_at_centre_vents_at_both_far_ends():
    # 100 x 10 x 5 bar, subdivided once so the top face has a centre vertex.
    bar = trimesh.creation.box(extents=(100.0, 10.0, 5.0)).subdivide()
    ops = plan_openings(from_trimesh(bar), UP, sprue_radius_mm=3.0, vent_radius_mm=1.0)
    assert [o.kind for o in ops] == ["sprue", "vent", "vent"]
    sprue, first, second = ops
    assert sprue.center_mm == pytest.approx((0.0, 0.0, 2.5), abs=1e-9)
    # the farthest top vertex is a corner (50, 5); the vent goes to the nearest point of the
    # quarter-radius search grid round it whose 1 mm mouth stays on the top face with the
    # rim band (0.1 mm) to spare, i.e. at least 1.1 mm in from both edges: 1.25 mm, five
    # grid steps, so (48.75, 3.75) (closed form); then the same at a corner of the other end
    assert MOUTH_RIM_BAND_MM == 0.1
    assert np.abs(first.center_mm) == pytest.approx((48.75, 3.75, 2.5), abs=1e-6)
    assert np.abs(second.center_mm) == pytest.approx((48.75, 3.75, 2.5), abs=1e-6)
    assert first.center_mm[0] * second.center_mm[0] < 0.0
    # afterwards every top vertex is within far_vent_min_mm (15 mm) of an opening
    top = bar.vertices[np.isclose(bar.vertices[:, 2], 2.5)]
    centres = np.array([o.center_mm for o in ops])
    assert np.linalg.norm(top[:, None] - centres[None], axis=2).min(axis=1).max() <= 15.0
    # a short bar (plateau within far_vent_min_mm of the sprue) gets no extra vent
    short = trimesh.creation.box(extents=(20.0, 10.0, 5.0)).subdivide()
    assert len(plan_openings(from_trimesh(short), UP, 3.0, 1.0)) == 1


def test_unserved_with_only_the_sprue_is_exactly_the_lower_bump():
    mesh = _two_bumps()
    sprue = plan_openings(mesh, UP, 3.0, 1.0)[0]
    left = unserved(mesh, UP, [sprue])
    assert len(left) == 1
    assert left[0].height_mm == pytest.approx(13.0, abs=1e-5)
    assert _radial(left[0].position_mm, SHORT["axis"]) <= SHORT["radius"] + 1e-5
    assert len(unserved(mesh, UP, [])) == 2


def test_serves_respects_radius_and_height_band():
    hp = find_high_points(_two_bumps(), UP)[1]  # short boss, rim radius 4 about (30, 10)
    x, y = SHORT["axis"]
    # an opening whose axis pierces the flat boss top reaches it, however thin
    assert serves(Opening("vent", (x, y, 13.0), 0.5), hp, UP)
    # beside the boss, it reaches the rim only if its radius spans the gap (+0.05 mm):
    # axis 6 mm from the boss axis, rim at 4 mm -> a 2 mm gap (elementary geometry)
    assert serves(Opening("vent", (x + 6.0, y, 13.0), 2.0), hp, UP)
    assert serves(Opening("vent", (x + 6.0, y, 13.0), 1.96), hp, UP)
    assert not serves(Opening("vent", (x + 6.0, y, 13.0), 1.9), hp, UP)
    # height band: plateau_mm 0.25 + 0.5 mm
    assert serves(Opening("vent", (x + 4.0, y, 13.7), 0.1), hp, UP)
    assert not serves(Opening("vent", (x + 4.0, y, 13.8), 0.1), hp, UP)


def _elder_rule_reference(h: np.ndarray, edges: np.ndarray) -> dict[int, float]:
    """Brute-force persistence of every local maximum (heights distinct).

    A maximum p dies at the highest level t at which the superlevel set {h >= t} joins p to a
    strictly higher vertex (Edelsbrunner & Harer 2010, elder rule); never dying -> inf.
    """
    n = len(h)
    nbr = [[] for _ in range(n)]
    for a, b in edges:
        nbr[a].append(b)
        nbr[b].append(a)
    out = {}
    for p in range(n):
        if any(h[q] > h[p] for q in nbr[p]):
            continue
        death = -math.inf
        for t in sorted(h[h < h[p]], reverse=True):
            seen, stack = {p}, [p]
            while stack:
                x = stack.pop()
                for q in nbr[x]:
                    if h[q] >= t and q not in seen:
                        seen.add(q)
                        stack.append(q)
            if any(h[q] > h[p] for q in seen):
                death = t
                break
        out[p] = h[p] - death
    return out


def test_persistence_matches_brute_force_elder_rule():
    # A random height field (10 mm grid, heights within +-3 mm: every facet faces up, so all
    # are ceilings) with distinct heights.
    rng = np.random.default_rng(7)
    k = 9
    xs, ys = np.meshgrid(np.arange(k) * 10.0, np.arange(k) * 10.0, indexing="ij")
    z = rng.uniform(-3.0, 3.0, size=(k, k))
    v = np.stack([xs.ravel(), ys.ravel(), z.ravel()], axis=1)
    idx = np.arange(k * k).reshape(k, k)
    a, b, c, d = idx[:-1, :-1], idx[1:, :-1], idx[1:, 1:], idx[:-1, 1:]
    f = np.concatenate([np.stack([a, b, c], -1).reshape(-1, 3),
                        np.stack([a, c, d], -1).reshape(-1, 3)])
    mesh = TriMesh(v, f)
    assert (np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])[:, 2] > 0).all()
    edges = np.unique(np.sort(f[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2), axis=1), axis=0)
    ref = _elder_rule_reference(v[:, 2], edges)
    expected = sorted((float(v[p, 2]), float(pers)) for p, pers in ref.items() if pers >= 0.5)
    got = find_high_points(mesh, UP, persistence_mm=0.5, plateau_mm=0.0)
    np.testing.assert_allclose(
        sorted((hp.height_mm, hp.persistence_mm) for hp in got), expected, rtol=1e-12
    )
    assert len(expected) >= 3  # the field really has several separate maxima
    for hp in got:  # plateau_mm = 0: the plateau is the peak vertex alone
        assert len(hp.plateau_mm) == 1 and hp.position_mm == tuple(hp.plateau_mm[0])


def test_result_does_not_depend_on_vertex_or_face_order_or_welding():
    mesh = _two_bumps()
    rng = np.random.default_rng(3)
    perm = rng.permutation(len(mesh.vertices))
    inv = np.empty_like(perm)
    inv[perm] = np.arange(len(perm))
    shuffled = TriMesh(mesh.vertices[perm], inv[mesh.faces][rng.permutation(len(mesh.faces))])
    soup = TriMesh(mesh.triangles().reshape(-1, 3),
                   np.arange(3 * mesh.triangle_count).reshape(-1, 3))
    ref = find_high_points(mesh, UP)
    for other in (shuffled, soup):
        got = find_high_points(other, UP)
        assert got == ref  # compares position, height, persistence
        for g, r in zip(got, ref, strict=True):
            assert sorted(map(tuple, g.plateau_mm)) == sorted(map(tuple, r.plateau_mm))
    assert plan_openings(shuffled, UP, 3.0, 1.0) == plan_openings(mesh, UP, 3.0, 1.0)


def test_bad_parameters_are_refused():
    mesh = from_trimesh(trimesh.creation.box(extents=(1.0, 1.0, 1.0)))
    with pytest.raises(ValueError):
        find_high_points(mesh, (0.0, 0.0, 0.0))
    with pytest.raises(ValueError):
        find_high_points(mesh, UP, persistence_mm=0.0)
    with pytest.raises(ValueError):
        plan_openings(mesh, UP, sprue_radius_mm=-1.0, vent_radius_mm=1.0)


def test_sprue_sits_at_the_centre_of_a_flat_boss_top():
    # The centroid of a disc is its centre (elementary geometry): the sprue must go there,
    # not on the rim where the tessellation happens to have its vertices.
    sprue = plan_openings(_two_bumps(), UP, 3.0, 1.0)[0]
    assert sprue.center_mm == pytest.approx((*TALL["axis"], 10.0 + TALL["height"]), abs=1e-5)


def test_rounded_void_corners_and_thin_plates_trap_no_air():
    """Air under an internal void rounds its rim and rises on: a block with a thin plate
    void and a rounded-box void (both fully inside) has one high point, its top face."""
    body = m3.Manifold.cube(BLOCK)
    plate = m3.Manifold.cube([20.0, 10.0, 1.0]).translate([10, 5, 4])
    rounded = (m3.Manifold.cube([6.0, 6.0, 4.0]).translate([-3, -3, -2])
               .minkowski_sum(m3.Manifold.sphere(0.8, 16))).translate([8, 14, 5])
    mesh = from_manifold(body - plate - rounded)
    hps = find_high_points(mesh, UP)
    assert len(hps) == 1
    assert hps[0].height_mm == pytest.approx(BLOCK[2])


def test_sprue_on_a_ring_top_lies_wholly_on_the_flat_annulus():
    # A ring (trimesh.creation.annulus, radii 10 and 22, 14 tall, axis z): its top face
    # is a ring-shaped plateau whose centroid lies in the bore. The sprue's mouth must lie
    # on the flat between the radii (plan distance from the axis in [10 + r, 22 - r]),
    # not hang over the bore's edge where a knife edge of mold would be left.
    ring = from_trimesh(trimesh.creation.annulus(r_min=10.0, r_max=22.0, height=14.0,
                                                 sections=128))
    sprue_r = 3.0
    ops = plan_openings(ring, UP, sprue_radius_mm=sprue_r, vent_radius_mm=1.0)
    sprue = ops[0]
    rho = math.hypot(sprue.center_mm[0], sprue.center_mm[1])
    # The 128-gons' corners lie on the circles, their edges' middles cos(pi / 128) of the
    # radius from the axis (elementary geometry).
    outer_flat = 22.0 * math.cos(math.pi / 128)
    assert 10.0 + sprue_r - 1e-6 <= rho <= outer_flat - sprue_r + 1e-6
    assert sprue.center_mm[2] == pytest.approx(7.0, abs=1e-6)


def test_a_sprue_narrowed_for_a_narrow_ring_top_lies_wholly_on_it():
    # A thin ring (trimesh.creation.annulus, radii 12 and 14, 10 tall, axis z): its flat top
    # is 2 mm across, so no 6 mm mouth fits on it and the widest that does is 2 mm across,
    # centred at radius 13 (elementary geometry). Narrowed, the sprue's mouth lies between
    # the rims (plan distance from the axis in [12 + r, 14 cos(pi / 128) - r], the outer
    # 128-gon's edge middles) at its widest within one narrowing step; its floor is the top.
    ring = from_trimesh(trimesh.creation.annulus(r_min=12.0, r_max=14.0, height=10.0,
                                                 sections=128))
    wide = plan_openings(ring, UP, sprue_radius_mm=3.0, vent_radius_mm=0.5)[0]
    assert wide.radius_mm == 3.0  # unchanged unless asked for
    sprue = plan_openings(ring, UP, sprue_radius_mm=3.0, vent_radius_mm=0.5,
                          narrow_sprue=True)[0]
    r = sprue.radius_mm
    assert FIT_STEP * 1.0 * math.cos(math.pi / 128) <= r <= 1.0
    rho = math.hypot(sprue.center_mm[0], sprue.center_mm[1])
    assert 12.0 + r - 1e-6 <= rho <= 14.0 - r + 1e-6
    assert sprue.center_mm[2] == pytest.approx(5.0, abs=1e-6)
    assert sprue.floor_mm == pytest.approx(5.0, abs=1e-3)  # rays stop 1e-4 short
