"""Vectorised ray queries on a closed triangle mesh (mm, world frame).

trimesh answers the queries; with the optional Embree binding installed it uses Embree,
otherwise its own (much slower) triangle intersector. Rays that start exactly on an edge or
a vertex of a CAD mesh give odd answers, so callers start rays a small distance off the
surface (``EPS_MM``) and this module jitters origins by a fixed, reproducible amount.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from soft_molds.meshdata import TriMesh

EPS_MM = 1e-3
"""How far off the surface rays start, mm (well below any feature and the 0.05 mm report
resolution, well above float noise on coordinates of a few hundred mm)."""

_JITTER_MM = 1e-4

Vec3 = Sequence[float] | np.ndarray
"""A 3-vector (a point in mm or a direction), as a sequence or a numpy array."""


class RayCaster:
    """First-hit queries against one mesh; built once, queried many times."""

    def __init__(self, mesh: TriMesh) -> None:
        import trimesh

        self.mesh = mesh
        tm = trimesh.Trimesh(mesh.vertices.copy(), mesh.faces.copy(), process=False)
        try:
            from trimesh.ray.ray_pyembree import RayMeshIntersector
        except ImportError:
            # No Embree binding: trimesh's own intersector, about 100x slower. Only a
            # missing module falls back; any other failure of the binding is a bug to see.
            from trimesh.ray.ray_triangle import RayMeshIntersector  # type: ignore[assignment]
        self._rays = RayMeshIntersector(tm)

    def first_hit(self, origins: np.ndarray, directions: np.ndarray
                  ) -> tuple[np.ndarray, np.ndarray]:
        """Distance (mm, ``inf`` for a miss) and face index (-1) of the first hit per ray.

        ``directions`` are (n, 3) or one (3,) vector, normalised here.
        """
        o = np.asarray(origins, dtype=np.float64).reshape(-1, 3)
        d = np.broadcast_to(np.asarray(directions, dtype=np.float64), o.shape).copy()
        d /= np.linalg.norm(d, axis=1, keepdims=True)
        n = len(o)
        dist = np.full(n, np.inf)
        face = np.full(n, -1, dtype=np.int64)
        if n == 0:
            return dist, face
        # A fixed jitter (a function of the index only), so results are reproducible.
        k = np.arange(n, dtype=np.float64)
        o = o + _JITTER_MM * np.stack([np.sin(k * 1.3), np.sin(k * 2.1 + 1.0),
                                       np.sin(k * 3.7 + 2.0)], axis=1)
        tri, ray, loc = self._rays.intersects_id(o, d, multiple_hits=False,
                                                 return_locations=True)
        if len(ray):
            t = np.einsum("ij,ij->i", loc - o[ray], d[ray])
            dist[ray] = t
            face[ray] = tri
        return dist, face


def face_normals(mesh: TriMesh) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Centroids (m, 3), unit outward normals (m, 3) and areas (m,) of every facet (mm, mm2)."""
    t = mesh.triangles()
    cr = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    a2 = np.linalg.norm(cr, axis=1)
    n = np.divide(cr, a2[:, None], out=np.zeros_like(cr), where=a2[:, None] > 0)
    return t.mean(axis=1), n, a2 / 2.0


def thickness_along_normals(caster: RayCaster, centroids: np.ndarray, normals: np.ndarray
                            ) -> tuple[np.ndarray, np.ndarray]:
    """Material thickness (mm) behind each facet: the distance from the facet, along its
    inward normal (``-normal``), to the first surface of ``caster``'s mesh; and the face hit.

    For a closed mesh wound outward this is the local wall thickness of a plate and the
    chord of anything thicker; ``inf`` where the ray leaves without a hit (an open mesh).
    """
    d, f = caster.first_hit(centroids - EPS_MM * normals, -normals)
    return d + EPS_MM, f
