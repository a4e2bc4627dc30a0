"""Mesh helpers shared by the tests: convert reference-library meshes to TriMesh."""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import trimesh

from soft_molds.meshdata import TriMesh


def from_manifold(man: m3.Manifold) -> TriMesh:
    me = man.to_mesh()
    return TriMesh(np.asarray(me.vert_properties)[:, :3].astype(np.float64),
                   np.asarray(me.tri_verts).astype(np.int64))


def from_trimesh(t: trimesh.Trimesh) -> TriMesh:
    return TriMesh(np.asarray(t.vertices), np.asarray(t.faces))


def box(lo, hi) -> m3.Manifold:
    """Axis-aligned manifold box from corner ``lo`` to corner ``hi`` (mm)."""
    return m3.Manifold.cube(tuple(h - a for a, h in zip(lo, hi))).translate(tuple(lo))
