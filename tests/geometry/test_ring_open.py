"""A ring with an open groove (recipes/stem-ring-cuff-open.yaml: ring 16/32 x 12 rounded 1;
groove bottom at radius 8 + 2 = 10, open at the outer face 16, 6 mm high) against closed-
form geometry and independent libraries. Built once per session (conftest ``built``).

Closed forms: Pappus's centroid theorem for the rounded ring (tests/geometry/
test_ring_volumes.py ``pappus_ring_volume``) less the groove, a rectangle (16 - 10) x 6
turned about the axis: pi (16^2 - 10^2) 6. The plates' release is proved on the meshes
with manifold3d's booleans (each plate moved along its pull overlaps no other part and no
silicone) and with the cast's own facet normals (every groove facet on a plate's side has
n . d >= 0: the plate moves away from it or along it)."""

from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh
from conftest import built
from meshes import manifold

NAME = "stem-ring-cuff-open"
R_IN, R_OUT, H, F = 8.0, 16.0, 12.0, 1.0
R_G, G = 10.0, 6.0
#: Overlap accepted between parts that touch face to face, per mm3 of the smaller part:
#: boolean noise on coincident or inscribed faces (as tests/geometry/test_mold_release.py).
TOUCH_FRACTION = 5e-4


def pappus_ring_volume(r_in: float, r_out: float, h: float, f: float) -> float:
    """The rounded ring: pi (R^2 - r^2) h less its four spandrels, each of area
    (1 - pi/4) f^2 turned on the circle of its centroid, 2 f / (3 (4 - pi)) from the
    rounding's centre (Pappus; as tests/geometry/test_ring_volumes.py)."""
    area = (1.0 - math.pi / 4.0) * f * f
    c = 2.0 * f / (3.0 * (4.0 - math.pi))
    return (math.pi * (r_out ** 2 - r_in ** 2) * h
            - 4.0 * math.pi * area * ((r_out - f + c) + (r_in + f - c)))


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


def groove_volume() -> float:
    return math.pi * (R_OUT ** 2 - R_G ** 2) * G



@pytest.fixture(scope="module")
def cuff():
    return built(NAME)


def test_cast_volume_is_the_rounded_ring_less_the_revolved_groove(cuff):
    want = pappus_ring_volume(R_IN, R_OUT, H, F) - groove_volume()
    cast = cuff.part("cast")
    assert close(cast.brep_volume_mm3, want, 0.001), (cast.brep_volume_mm3, want)
    # trimesh integrates the mesh with its own code: the chord's 0.5 % rule.
    assert close(float(trimesh.Trimesh(cast.mesh.vertices, cast.mesh.faces).volume), want,
                 0.005)
    assert cuff.void_volume_mm3 == 0.0  # no core: nothing inside the body is cut away


def test_plate_volumes_are_their_box_less_half_the_groove_bottom_and_the_label(cuff):
    """Box (2 x 16 + 2 x 2) x (block's half width + grip) x 6, less pi 10^2 / 2 x 6; the
    label cut into the grip takes more than nothing and at most its box's area x its
    depth."""
    depth = cuff.recipe.label_settings.depth_mm
    for g in cuff.plan.step.plates:
        (x0, y0, _), (x1, y1, _) = g.box
        want = (x1 - x0) * (y1 - y0) * G - math.pi * R_G ** 2 / 2.0 * G
        assert close(g.volume_mm3(), want, 1e-12)
        (lab,) = [lab for lab in cuff.labels if lab.part == g.part]
        (lx0, ly0, _), (lx1, ly1, _) = lab.box
        part = cuff.part(g.part)
        removed = want - part.brep_volume_mm3
        assert 0.0 < removed <= (lx1 - lx0) * (ly1 - ly0) * depth
        # manifold3d's own volume of the mesh, to the 0.5 % mesh rule.
        assert close(manifold(part.mesh).volume(), part.brep_volume_mm3, 0.005)


def test_groove_bottom_and_walls_measured_by_rays_on_the_cast(cuff):
    """Rays towards the ring's axis along -x from beyond x = 2R: at z = 0 the first hit is
    the groove bottom (x = R + 10), just above the groove's wall the outer face
    (x = R + 16); rays along -z from above meet the top lip's underside at z = 3."""
    tm = cuff.part("cast").mesh.to_trimesh()
    cx = R_OUT
    origins = np.array([[100.0, 0.0, 0.0], [100.0, 0.0, G / 2 + 0.5],
                        [100.0, 0.0, -G / 2 - 0.5]])
    locs, idx, _ = tm.ray.intersects_location(origins, np.tile([-1.0, 0.0, 0.0], (3, 1)),
                                              multiple_hits=False)
    x = dict(zip(idx.tolist(), locs[:, 0].tolist()))
    assert x[0] == pytest.approx(cx + R_G, abs=0.02)
    assert x[1] == pytest.approx(cx + R_OUT, abs=0.02)
    assert x[2] == pytest.approx(cx + R_OUT, abs=0.02)
    # Between the lips, from the groove bottom outward, nothing above z = 3 until the top.
    probe = np.array([[cx + 13.0, 0.0, 0.0], [cx - 13.0, 0.0, 0.0], [cx, 13.0, 0.0]])
    locs, idx, _ = tm.ray.intersects_location(probe, np.tile([0.0, 0.0, 1.0], (3, 1)),
                                              multiple_hits=False)
    assert np.allclose(locs[:, 2], G / 2, atol=1e-6)


def test_every_groove_facet_on_a_plates_side_faces_along_its_pull(cuff):
    """The cast's outward normal n on the groove (bottom and walls) on the plate's side of
    y = 0 has n . d >= 0 for the plate's pull d: nothing there locks the plate."""
    tm = cuff.part("cast").mesh.to_trimesh()
    c = tm.triangles_center
    rho = np.hypot(c[:, 0] - R_OUT, c[:, 1])
    on_bottom = (np.abs(rho - R_G) < 0.05) & (np.abs(c[:, 2]) < G / 2)
    on_walls = (np.abs(np.abs(c[:, 2]) - G / 2) < 1e-6) & (rho > R_G) & (rho < R_OUT)
    groove = on_bottom | on_walls
    assert groove.sum() > 100
    n = tm.face_normals
    for sign in (1.0, -1.0):
        d = np.array([0.0, sign, 0.0])
        side = groove & (c[:, 1] * sign > 0.0)
        # A facet straddling y = 0 (its centroid on one side, its quad's middle on the
        # other) leans at most half a facet's angle, under 1 deg, against the pull.
        near = side & (np.abs(c[:, 1]) < 0.5)
        assert (n[side & ~near] @ d).min() >= -1e-9
        assert (n[near] @ d).min() >= -math.sin(math.radians(1.0))


def test_each_plate_moved_along_its_pull_cuts_no_other_part_and_no_silicone(cuff):
    solids = {p.name: manifold(p.mesh) for p in cuff.parts}
    for g in cuff.plan.step.plates:
        pull = np.asarray(g.pull_dir)
        plate = solids[g.part]
        # Small moves find a lock at the contact, larger ones a hook further along; at
        # 2 x 16 mm the plate is clear of the ring.
        for d in (0.05, 0.5, 2.0, 8.0, 2 * R_OUT):
            moved = plate.translate(list(pull * d))
            for other, solid in solids.items():
                if other == g.part:
                    continue
                overlap = (moved ^ solid).volume()
                assert overlap <= TOUCH_FRACTION * min(solid.volume(), moved.volume()), (
                    g.part, other, d, overlap)


def test_a_plate_pushed_against_its_pull_cuts_the_bore_wall(cuff):
    """The same measure bites: plate-1 moved d = 0.5 mm along -y (into the groove bottom)
    cuts the crescent between its hole and the groove bottom out of the bore wall: the
    disc less the lens of two circles of radius r whose centres are d apart,
    pi r^2 - (2 r^2 acos(d / 2r) - d/2 sqrt(4 r^2 - d^2)) (elementary geometry), times the
    groove's height; far beyond the noise."""
    d = 0.5
    plate = manifold(cuff.part("plate-1").mesh).translate([0.0, -d, 0.0])
    cast = manifold(cuff.part("cast").mesh)
    lens = 2 * R_G ** 2 * math.acos(d / (2 * R_G)) - d / 2 * math.sqrt(4 * R_G ** 2 - d * d)
    want = (math.pi * R_G ** 2 - lens) * G
    got = (plate ^ cast).volume()
    assert got == pytest.approx(want, rel=0.02)
    assert got > 20 * TOUCH_FRACTION * cast.volume()


def test_the_plate_release_check_finds_nothing_locked_and_bites_the_wrong_way(cuff):
    """The demold check (rays on the cast's mesh) on each plate's half of the groove: 0
    locked along its pull; pulled the other way (towards the axis), the groove bottom
    locks it."""
    from soft_molds.analysis.checks.plate_release import PlateRelease
    from soft_molds.analysis.demold import Surface, pull_report
    from soft_molds.recipe.primitives import union_sdf

    assert cuff.review is not None
    rel = cuff.review.result(PlateRelease)
    assert [r.locked_area_mm2 for r in rel.reports] == [0.0, 0.0]
    # Each half's groove: bottom 2 pi 10 x 6 / 2 plus two walls pi (16^2 - 10^2) / 2,
    # within the chord's shortfall.
    half = math.pi * R_G * G + math.pi * (R_OUT ** 2 - R_G ** 2)
    assert [r.area_mm2 for r in rel.reports] == pytest.approx([half, half], rel=0.01)
    cast = Surface(cuff.part("cast").mesh)
    on = np.abs(union_sdf(cuff.recipe.outer_primitives(), cast.centroids)) <= 0.05
    wrong = pull_report(cast, on & (cast.centroids[:, 1] >= 0.0), (0.0, -1.0, 0.0), "plate-1")
    assert wrong.locked_area_mm2 > 0.5 * math.pi * R_G * G


def test_no_socket_and_no_core_in_an_open_groove(cuff):
    assert cuff.recipe.inlets == ()
    step = cuff.plan.step
    assert step.core_supports == () and step.inlets == ()
    assert [p.name for p in cuff.parts] == ["shell-lower", "shell-upper", "plate-1",
                                            "plate-2", "cast"]
    assert cuff.part("plate-1").pull_dir == (0.0, 1.0, 0.0)
    assert cuff.part("plate-2").pull_dir == (0.0, -1.0, 0.0)


def test_keys_and_clamp_holes_lie_off_the_plates_strip(cuff):
    lay = cuff.layout
    x0 = cuff.plan.step.plates[0].box[0][0]
    x1 = cuff.plan.step.plates[0].box[1][0]
    r = cuff.recipe.mold
    rk = r.key_diameter_mm / 2 + r.clearance_mm
    rb = (r.clamp_hole_mm or 0.0) / 2
    for u, _ in lay.keys_uv:
        assert u + rk < x0 or u - rk > x1
    for u, _ in lay.bolts_uv:
        assert u + rb < x0 or u - rb > x1
