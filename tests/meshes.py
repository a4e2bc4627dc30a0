"""Mesh helpers shared by the tests: convert between TriMesh and the reference libraries'
meshes."""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import trimesh

from soft_molds.meshdata import TriMesh


def from_manifold(man: m3.Manifold) -> TriMesh:
    me = man.to_mesh()
    return TriMesh(np.asarray(me.vert_properties)[:, :3].astype(np.float64),
                   np.asarray(me.tri_verts).astype(np.int64))


def manifold(mesh) -> m3.Manifold:
    """A TriMesh (or anything with vertices and faces) as a manifold3d solid."""
    return m3.Manifold(m3.Mesh64(vert_properties=np.array(mesh.vertices, dtype=np.float64),
                                 tri_verts=np.array(mesh.faces, dtype=np.uint64)))


def from_trimesh(t: trimesh.Trimesh) -> TriMesh:
    return TriMesh(np.asarray(t.vertices), np.asarray(t.faces))


def box(lo, hi) -> m3.Manifold:
    """Axis-aligned manifold box from corner ``lo`` to corner ``hi`` (mm)."""
    return m3.Manifold.cube(tuple(h - a for a, h in zip(lo, hi))).translate(tuple(lo))
