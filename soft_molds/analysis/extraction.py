"""Pulling the core out of the cured part through its inlet opening.

Frame: mm, world. The core leaves along the unit vector ``pull`` through a round opening of
perimeter ``opening_perimeter_mm`` whose plane passes through ``opening_point`` normal to
``pull``. Every cross-section of the core inside the part must pass through that opening,
and the silicone ring around it must stretch to wrap the section: a loose ring wraps the
section's convex hull, so the hoop stretch needed is

    stretch = (convex-hull perimeter of the section) / (opening perimeter)

(a 20 mm ball through a 10 mm hole needs 20 pi / 10 pi = 2.0). The ring tears when the
strain ``stretch - 1`` reaches the silicone's elongation at break; with a safety factor
``k`` the pull is accepted while ``k (stretch - 1) <= elongation``.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy.spatial import ConvexHull, QhullError

from soft_molds.meshdata import TriMesh


@dataclass(frozen=True)
class Extraction:
    """Result of :func:`core_extraction` (mm; stretch and strain as ratios)."""

    stretch: float                 # largest hull perimeter / opening perimeter
    where_mm: tuple[float, float, float]  # centre of that section
    section_perimeter_mm: float
    opening_perimeter_mm: float
    free_length_mm: float          # how far the core reaches beyond the opening
    least_width_mm: float          # narrowest section width short of the far end's cap
    least_width_where_mm: tuple[float, float, float]

    @property
    def strain(self) -> float:
        return max(self.stretch - 1.0, 0.0)

    @property
    def slenderness(self) -> float:
        return self.free_length_mm / self.least_width_mm if self.least_width_mm > 0 else math.inf


def _basis(d: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    a = np.array([1.0, 0.0, 0.0]) if abs(d[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(d, a)
    e1 /= np.linalg.norm(e1)
    return e1, np.cross(d, e1)


def _section_points(tris_s: np.ndarray, tris_2d: np.ndarray, s: float) -> np.ndarray:
    """2-D points where the plane ``depth == s`` cuts the triangles (depth per corner)."""
    pts = []
    for i, j in ((0, 1), (1, 2), (2, 0)):
        si, sj = tris_s[:, i], tris_s[:, j]
        cross = (si - s) * (sj - s) < 0.0
        if cross.any():
            f = ((s - si[cross]) / (sj[cross] - si[cross]))[:, None]
            pts.append(tris_2d[cross, i] + f * (tris_2d[cross, j] - tris_2d[cross, i]))
    return np.concatenate(pts) if pts else np.empty((0, 2))


def _hull_perimeter_width(p: np.ndarray) -> tuple[float, float, np.ndarray]:
    """Perimeter, least width (rotating calipers over hull edges) and centroid of the 2-D
    convex hull of ``p``."""
    try:
        h = ConvexHull(p)
    except (QhullError, ValueError):
        return 0.0, 0.0, p.mean(axis=0) if len(p) else np.zeros(2)
    ring = p[h.vertices]
    edges = np.roll(ring, -1, axis=0) - ring
    lengths = np.linalg.norm(edges, axis=1)
    perim = float(lengths.sum())
    normals = np.stack([edges[:, 1], -edges[:, 0]], axis=1) / np.maximum(lengths, 1e-12)[:, None]
    spread = (ring @ normals.T)
    width = float((spread.max(axis=0) - spread.min(axis=0)).min())
    return perim, width, ring.mean(axis=0)


def core_extraction(core: TriMesh, pull: Sequence[float], opening_point: Sequence[float],
                    opening_perimeter_mm: float, step_mm: float = 0.5,
                    max_sections: int = 1000) -> Extraction:
    """Sweep sections of ``core`` normal to ``pull`` from the opening plane to the far end
    (the part of the core that must come through the opening) and return the worst."""
    d = np.asarray(pull, dtype=np.float64)
    d = d / np.linalg.norm(d)
    o = np.asarray(opening_point, dtype=np.float64)
    e1, e2 = _basis(d)
    tris = core.triangles() - o
    depth = -(tris @ d)                         # how far behind the opening, mm
    flat = np.stack([tris @ e1, tris @ e2], axis=-1)
    far = float(depth.max())
    if far <= 0.0:
        return Extraction(0.0, tuple(o), 0.0, opening_perimeter_mm, 0.0, math.inf,  # type: ignore[arg-type]
                          tuple(o))
    n = int(min(max_sections, max(8, math.ceil(far / step_mm))))
    # Section planes between the opening (depth 0) and the far end, never exactly on them.
    levels = (np.arange(n) + 0.5) * far / n
    lo, hi = depth.min(axis=1), depth.max(axis=1)
    order = np.argsort(lo, kind="stable")
    lo_sorted = lo[order]
    best = (-1.0, 0.0, np.zeros(2), 0.0)
    widths: list[tuple[float, np.ndarray, float]] = []
    for s in levels:
        upto = order[: int(np.searchsorted(lo_sorted, s, side="right"))]
        sel = upto[hi[upto] > s]
        p = _section_points(depth[sel], flat[sel], float(s))
        if len(p) < 3:
            continue
        perim, width, c = _hull_perimeter_width(p)
        if perim > best[0]:
            best = (perim, width, c, float(s))
        if width > 0.0:
            widths.append((width, c, float(s)))
    # The far end's rounded cap narrows to a point but carries no load: bending is governed
    # by the narrowest section before it (walking back from the tip while sections widen).
    k = len(widths) - 1
    while k > 0 and widths[k - 1][0] >= widths[k][0] - 1e-9:
        k -= 1
    body = widths[: k + 1]
    thin = min(body, key=lambda w: (w[0], w[2])) if body else (math.inf, np.zeros(2), 0.0)

    def world(c2: np.ndarray, s: float) -> tuple[float, float, float]:
        w = o + c2[0] * e1 + c2[1] * e2 - s * d
        return (float(w[0]), float(w[1]), float(w[2]))

    return Extraction(
        stretch=best[0] / opening_perimeter_mm, where_mm=world(best[2], best[3]),
        section_perimeter_mm=best[0], opening_perimeter_mm=float(opening_perimeter_mm),
        free_length_mm=far, least_width_mm=thin[0],
        least_width_where_mm=world(thin[1], thin[2]))


def allowed_stretch(elongation_pct: float, safety_factor: float) -> float:
    """Largest stretch accepted: strain at break divided by the safety factor, plus one."""
    return 1.0 + elongation_pct / 100.0 / safety_factor
