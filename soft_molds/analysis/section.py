"""A plane section through a mesh, as line segments for a drawing (mm)."""

from __future__ import annotations

import numpy as np

from soft_molds.meshdata import TriMesh

AXES = "xyz"


def section_segments(mesh: TriMesh, axis: str, offset_mm: float) -> tuple[np.ndarray,
                                                                          tuple[str, str]]:
    """Where the plane ``axis = offset_mm`` cuts the triangles of ``mesh``: (n, 2, 2)
    segments in the two other coordinates (in x-y-z order) and their axis names."""
    k = AXES.index(axis)
    keep = [i for i in range(3) if i != k]
    t = mesh.triangles()
    d = t[:, :, k] - offset_mm
    # Nudge vertices lying exactly on the plane (float-exact CAD planes), so each crossing
    # triangle has exactly two crossing edges.
    d = np.where(d == 0.0, 1e-9, d)
    cross = (d[:, [0, 1, 2]] * d[:, [1, 2, 0]]) < 0.0  # edge i: corner i -> i+1
    hit = cross.sum(axis=1) == 2
    t, d, cross = t[hit], d[hit], cross[hit]
    pts = np.zeros((len(t), 3, 2))
    for e in range(3):
        a, b = e, (e + 1) % 3
        den = d[:, a] - d[:, b]
        # Edges that do not cross get a dummy fraction; they are dropped below.
        f = np.divide(d[:, a], den, out=np.zeros_like(den), where=cross[:, e])
        p = t[:, a] + f[:, None] * (t[:, b] - t[:, a])
        pts[:, e] = p[:, keep]
    order = np.argsort(~cross, axis=1, kind="stable")[:, :2]
    seg = np.take_along_axis(pts, order[:, :, None], axis=1)
    return seg, (AXES[keep[0]], AXES[keep[1]])
