"""Closure and volume checks against elementary geometry and independent libraries.

Outside references: closed-form volumes (sphere 4/3 pi r^3, box a b c, tetrahedron |det|/6);
manifold3d's own volume and manifoldness check as an independent mesh library; the Euler
edge count of a closed triangle mesh (3F = 2E).
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh

from soft_molds.analysis.integrity import MeshReport, check_mesh, require_ok
from soft_molds.errors import MeshIntegrityError
from soft_molds.meshdata import TriMesh

R = 10.0


def _tm(t: trimesh.Trimesh) -> TriMesh:
    return TriMesh(np.asarray(t.vertices), np.asarray(t.faces))


def _sphere() -> TriMesh:
    return _tm(trimesh.creation.icosphere(subdivisions=3, radius=R))


def _tess_volume(mesh: TriMesh) -> float:
    # Elementary geometry: sum of signed tetrahedra (origin, a, b, c), each det/6.
    t = mesh.triangles()
    return float(np.linalg.det(t).sum() / 6.0)


def test_closed_icosphere_passes_against_its_exact_tessellated_volume():
    mesh = _sphere()
    exact = _tess_volume(mesh)
    rep = check_mesh(mesh, "core", brep_volume_mm3=exact)
    assert isinstance(rep, MeshReport)
    assert rep.ok, rep.failures
    assert rep.watertight and rep.winding_consistent and rep.is_volume
    assert rep.bodies == 1 and rep.triangles == 1280
    assert rep.volume_mm3 == pytest.approx(exact, rel=1e-12)
    assert rep.volume_rel_error == pytest.approx(0.0, abs=1e-12)
    # manifold3d as an independent volume reference for the same triangles.
    man = m3.Manifold(m3.Mesh(mesh.vertices.astype(np.float32), mesh.faces.astype(np.uint32)))
    assert man.volume() == pytest.approx(exact, rel=1e-5)
    require_ok(rep)  # must not raise


def test_icosphere_volume_is_bracketed_by_closed_form_spheres():
    mesh = _sphere()
    v = check_mesh(mesh, "core").volume_mm3
    # An inscribed polyhedron lies inside the sphere of radius R and contains the ball of
    # radius d_min (the smallest distance from the centre to a face plane).
    t = mesh.triangles()
    n = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    d_min = float(np.min(np.einsum("ij,ij->i", n, t[:, 0]) / np.linalg.norm(n, axis=1)))
    assert 4 / 3 * math.pi * d_min**3 < v < 4 / 3 * math.pi * R**3
    # The inscribed shortfall (0.86 % here) exceeds the default 0.5 % tolerance, which is why
    # the pass case compares against the tessellation's own exact volume, not 4/3 pi R^3.
    shortfall = 1 - v / (4 / 3 * math.pi * R**3)
    assert 0.005 < shortfall < 0.01
    assert not check_mesh(mesh, "core", brep_volume_mm3=4 / 3 * math.pi * R**3).ok


def test_brep_volume_one_percent_off_fails_with_numbers():
    mesh = _sphere()
    exact = _tess_volume(mesh)
    rep = check_mesh(mesh, "core", brep_volume_mm3=exact * 1.01)
    assert not rep.ok
    assert rep.volume_rel_error == pytest.approx(0.01 / 1.01, rel=1e-9)
    (msg,) = rep.failures
    assert f"mesh volume {exact:.1f} mm3" in msg
    assert f"BRep volume {exact * 1.01:.1f} mm3" in msg
    assert "0.99 %" in msg and "allowed 0.5 %" in msg
    with pytest.raises(MeshIntegrityError, match="part core: mesh integrity failed") as ei:
        require_ok(rep, variant="v2")
    assert ei.value.variant == "v2" and ei.value.failures == rep.failures


def test_box_missing_one_triangle_reports_three_open_edges():
    box = trimesh.creation.box(extents=(4.0, 5.0, 6.0))
    assert len(box.faces) == 12
    # 3F = 2E for the closed box (36 = 2*18); removing one triangle frees its 3 edges.
    mesh = TriMesh(box.vertices, box.faces[1:])
    rep = check_mesh(mesh, "shell_a")
    assert not rep.watertight and not rep.is_volume and not rep.ok
    assert "not watertight: 3 open edges" in rep.failures


def test_box_with_all_faces_flipped_reports_negative_volume():
    a, b, c = 4.0, 5.0, 6.0
    box = trimesh.creation.box(extents=(a, b, c))
    rep = check_mesh(TriMesh(box.vertices, box.faces[:, ::-1]), "shell_b")
    assert rep.watertight and rep.winding_consistent and not rep.is_volume
    assert rep.volume_mm3 == pytest.approx(-a * b * c)  # closed form a b c, sign flipped
    (msg,) = rep.failures
    assert "negative" in msg and "inverted" in msg and "-120" in msg


def test_box_with_one_face_flipped_reports_winding_inconsistent():
    box = trimesh.creation.box(extents=(4.0, 5.0, 6.0))
    f = np.array(box.faces)
    f[0] = f[0, ::-1]
    rep = check_mesh(TriMesh(box.vertices, f), "core")
    assert rep.watertight and not rep.winding_consistent and not rep.ok
    # the flipped triangle's three edges now run the same way as in their neighbours
    assert "winding inconsistent: 3 edges traversed the same way by both of its faces" in (
        rep.failures
    )
    # manifold3d independently refuses the same triangles as a manifold.
    man = m3.Manifold(m3.Mesh(np.asarray(box.vertices, np.float32), f.astype(np.uint32)))
    assert man.status() != m3.Error.NoError


def test_two_disjoint_boxes_are_two_bodies():
    a = trimesh.creation.box(extents=(2.0, 2.0, 2.0))
    b = a.copy()
    b.apply_translation((10.0, 0.0, 0.0))
    both = trimesh.util.concatenate([a, b])
    mesh = _tm(both)
    rep = check_mesh(mesh, "core", brep_volume_mm3=16.0)  # closed form 2 * 2^3
    assert rep.bodies == 2
    assert rep.failures == ("2 separate bodies (expected 1)",)
    assert check_mesh(mesh, "core", expected_bodies=2).ok
    assert check_mesh(mesh, "core", expected_bodies=None).ok


def test_empty_and_bad_index_meshes_fail_cleanly():
    empty = check_mesh(TriMesh(np.zeros((0, 3)), np.zeros((0, 3), dtype=np.int64)), "x")
    assert not empty.ok and empty.failures == ("mesh has no triangles",)
    bad = check_mesh(TriMesh(np.zeros((3, 3)), np.array([[0, 1, 5]])), "x")
    assert not bad.ok and "do not exist" in bad.failures[0]
