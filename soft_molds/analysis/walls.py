"""Silicone wall thickness around the voids of a cast part.

Frame: mm, world. ``cast`` is the closed, outward-wound silicone mesh; ``void_facets``
marks the facets on the surface of the voids (their outward normals point out of the
silicone into the void). From every such facet a ray goes into the silicone along the
inward normal; the distance to the first surface it meets is the wall there. The wall
ends either on the outer surface (an outer wall) or on another void facet (a wall between
neighbouring voids). The thinnest wall of a plate is met along its normal, so the minimum
over facets is the plate's thickness to within the tessellation's chord error.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from .rays import thickness_along_normals
from .surface import Surface

RESOLUTION_MM = 0.05
"""Walls are reported to this resolution."""


@dataclass(frozen=True)
class WallKind:
    """The thinnest wall of one kind ("outer" or "between voids") and its area below the
    limit (mm, mm2). ``where_mm`` is the middle of the thinnest wall."""

    kind: str
    min_mm: float
    where_mm: tuple[float, float, float] | None
    thin_area_mm2: float
    samples: int


@dataclass(frozen=True)
class WallMap:
    outer: WallKind
    between: WallKind
    thickness_mm: np.ndarray  # per sample point on the void facets (mm)

    @property
    def min_mm(self) -> float:
        return min(self.outer.min_mm, self.between.min_mm)


def _round(x: float) -> float:
    return round(round(x / RESOLUTION_MM) * RESOLUTION_MM, 4) if np.isfinite(x) else x


MAX_SPLIT = 256


def _samples(cast: Surface, idx: np.ndarray, spacing_mm: float
             ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Sample points, normals and areas on the facets ``idx``, at most about
    ``spacing_mm`` apart (CAD meshes have long slivers along cylinders, whose centroids
    alone would miss a wall that thins along them).

    A facet ABC with AB its longest edge is mapped from the unit square,
    P(u, v) = (1 - v) (A + u (B - A)) + v C, and sampled at the centres of a k x m grid
    (k = |AB| / spacing, m = height / spacing, rounded up); a sample's area is
    2 area (1 - v) / (k m), which sums exactly to the facet's area.
    """
    tris = cast.mesh.triangles()[idx]
    edge = np.linalg.norm(tris - np.roll(tris, -1, axis=1), axis=2)  # edge i: corner i -> i+1
    longest = edge.argmax(axis=1)
    r = np.arange(len(tris))
    A = tris[r, longest]
    B = tris[r, (longest + 1) % 3]
    C = tris[r, (longest + 2) % 3]
    ab = edge[r, longest]
    area = cast.areas[idx]
    height = 2.0 * area / np.maximum(ab, 1e-12)
    k = np.clip(np.ceil(ab / spacing_mm), 1, MAX_SPLIT).astype(np.int64)
    m = np.clip(np.ceil(height / spacing_mm), 1, MAX_SPLIT).astype(np.int64)
    pts, nrm, wts = [], [], []
    normals = cast.normals[idx]
    for kk, mm in sorted(set(zip(k.tolist(), m.tolist()))):
        sel = np.flatnonzero((k == kk) & (m == mm))
        u = (np.arange(kk) + 0.5) / kk
        v = (np.arange(mm) + 0.5) / mm
        uu, vv = (g.reshape(-1) for g in np.meshgrid(u, v, indexing="ij"))
        base = A[sel, None, :] + uu[None, :, None] * (B - A)[sel, None, :]
        p = (1.0 - vv)[None, :, None] * base + vv[None, :, None] * C[sel, None, :]
        pts.append(p.reshape(-1, 3))
        nrm.append(np.repeat(normals[sel], len(uu), axis=0))
        wts.append((2.0 * area[sel, None] * (1.0 - vv)[None, :] / (kk * mm)).reshape(-1))
    return np.concatenate(pts), np.concatenate(nrm), np.concatenate(wts)


def wall_map(cast: Surface, void_facets: np.ndarray, min_wall_mm: float,
             spacing_mm: float = 1.0,
             skip: Callable[[np.ndarray], np.ndarray] | None = None) -> WallMap:
    """Wall thickness behind the void facets of ``cast`` (sampled at most ``spacing_mm``
    apart; ``skip`` maps sample points (n, 3) to those left out) and the thinnest wall of
    each kind. ``thickness_mm`` holds one value per sample."""
    idx = np.flatnonzero(void_facets)
    c, n, areas = _samples(cast, idx, spacing_mm)
    if skip is not None:
        keep = ~skip(c)
        c, n, areas = c[keep], n[keep], areas[keep]
    t, hit = thickness_along_normals(cast.caster, c, n)
    ok = np.isfinite(t) & (hit >= 0)
    ends_on_void = np.zeros(len(c), dtype=bool)
    ends_on_void[ok] = void_facets[hit[ok]]
    kinds = []
    for name, sel in (("outer", ok & ~ends_on_void), ("between voids", ok & ends_on_void)):
        if not sel.any():
            kinds.append(WallKind(name, float("inf"), None, 0.0, 0))
            continue
        j = np.flatnonzero(sel)
        k = j[int(np.argmin(t[j]))]
        mid = c[k] - n[k] * (t[k] / 2.0)
        thin = sel & (t < min_wall_mm)
        kinds.append(WallKind(name, _round(float(t[k])),
                              (float(mid[0]), float(mid[1]), float(mid[2])),
                              float(areas[thin].sum()), int(sel.sum())))
    return WallMap(kinds[0], kinds[1], t)
