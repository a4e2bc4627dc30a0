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

from dataclasses import dataclass

import numpy as np

from .demold import Surface
from .rays import thickness_along_normals

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
    thickness_mm: np.ndarray  # per void facet (same order as the mask's True entries)

    @property
    def min_mm(self) -> float:
        return min(self.outer.min_mm, self.between.min_mm)


def _round(x: float) -> float:
    return round(round(x / RESOLUTION_MM) * RESOLUTION_MM, 4) if np.isfinite(x) else x


def wall_map(cast: Surface, void_facets: np.ndarray, min_wall_mm: float) -> WallMap:
    """Wall thickness behind every void facet of ``cast`` and the thinnest of each kind."""
    idx = np.flatnonzero(void_facets)
    c, n = cast.centroids[idx], cast.normals[idx]
    t, hit = thickness_along_normals(cast.caster, c, n)
    ok = np.isfinite(t) & (hit >= 0)
    ends_on_void = np.zeros(len(idx), dtype=bool)
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
                              float(cast.areas[idx[thin]].sum()), int(sel.sum())))
    return WallMap(kinds[0], kinds[1], t)
