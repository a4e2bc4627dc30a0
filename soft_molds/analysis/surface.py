"""A closed mesh prepared once for the checks: facet centroids, unit outward normals and
areas, its ray index, and (on first use) facet adjacency.

Frame: mm, world; areas mm2. Building the ray index is the costly step, so a mesh gets one
:class:`Surface` per review (see :class:`soft_molds.analysis.context.CheckContext`) and
every check that casts rays against that mesh uses its ``caster``.
"""

from __future__ import annotations

import numpy as np

from soft_molds.meshdata import TriMesh

from .rays import RayCaster, face_normals


class Surface:
    """A closed mesh prepared for pull queries: facet centroids, normals, areas, the ray
    caster and facet adjacency (built on first use)."""

    def __init__(self, mesh: TriMesh, caster: RayCaster | None = None) -> None:
        self.mesh = mesh
        self.centroids, self.normals, self.areas = face_normals(mesh)
        self.caster = caster or RayCaster(mesh)
        self._edges: tuple[np.ndarray, np.ndarray] | None = None

    def edges(self) -> tuple[np.ndarray, np.ndarray]:
        """(e, 2) vertex pairs of every undirected edge and (e, 2) the two facets using it
        (the mesh is closed and manifold, so each edge has exactly two)."""
        if self._edges is None:
            f = self.mesh.faces
            e = np.sort(f[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2), axis=1)
            owner = np.repeat(np.arange(len(f)), 3)
            key = e[:, 0] * np.int64(len(self.mesh.vertices)) + e[:, 1]
            order = np.argsort(key, kind="stable")
            k, e, owner = key[order], e[order], owner[order]
            first = np.flatnonzero(np.r_[True, k[1:] != k[:-1]])
            counts = np.diff(np.r_[first, len(k)])
            pair = first[counts == 2]
            self._edges = (e[pair], np.stack([owner[pair], owner[pair + 1]], axis=1))
        return self._edges
