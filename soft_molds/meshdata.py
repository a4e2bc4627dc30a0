"""The triangle mesh value passed between stages (numpy only, no CAD kernel).

Frame: millimetres, the recipe's world frame (body long axis +x from the inlet face at
x = 0; the parting axis points "up" in pour orientation). Faces are wound
counter-clockwise seen from outside, so normals point out of the material.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True, eq=False)
class TriMesh:
    """An indexed triangle mesh: ``vertices`` (n, 3) float64 mm, ``faces`` (m, 3) int64."""

    vertices: np.ndarray
    faces: np.ndarray

    def __post_init__(self) -> None:
        v = np.ascontiguousarray(self.vertices, dtype=np.float64)
        f = np.ascontiguousarray(self.faces, dtype=np.int64)
        if v.ndim != 2 or v.shape[1] != 3 or f.ndim != 2 or f.shape[1] != 3:
            raise ValueError("TriMesh needs (n, 3) vertices and (m, 3) faces")
        v.flags.writeable = False
        f.flags.writeable = False
        object.__setattr__(self, "vertices", v)
        object.__setattr__(self, "faces", f)

    @property
    def triangle_count(self) -> int:
        return int(self.faces.shape[0])

    def triangles(self) -> np.ndarray:
        """(m, 3, 3) float64 corner coordinates."""
        return self.vertices[self.faces]

    def volume_mm3(self) -> float:
        """Signed enclosed volume by the divergence theorem (meaningful only when closed)."""
        t = self.triangles()
        return float(np.einsum("ij,ij->i", t[:, 0], np.cross(t[:, 1], t[:, 2])).sum() / 6.0)

    def bbox_mm(self) -> tuple[tuple[float, float, float], tuple[float, float, float]]:
        lo = self.vertices.min(axis=0)
        hi = self.vertices.max(axis=0)
        return (tuple(float(x) for x in lo), tuple(float(x) for x in hi))  # type: ignore[return-value]

    def to_trimesh(self):  # -> trimesh.Trimesh (imported lazily: trimesh is heavy)
        import trimesh

        return trimesh.Trimesh(self.vertices.copy(), self.faces.copy(), process=False)
