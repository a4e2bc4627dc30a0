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

Slenderness. A core that is long for its narrowest width may bend while the silicone is
poured round it or snap while it is pulled. What bends is the narrow part between the
places that hold it: the opening plane (the core's print is seated in the mold block
there) and every section at least :data:`SUPPORT_WIDTH_RATIO` times as wide as the
narrowest one (a chamber, a socket plug), which bears on the silicone across its face. The
*span* is the longest stretch of the core between two such supports, or between the last
one and the far end; slenderness is that span over the narrowest width. A plain bore has
no support past the opening, so its span is its whole reach.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy.spatial import ConvexHull, QhullError

from soft_molds.meshdata import TriMesh

SUPPORT_WIDTH_RATIO = 1.5
"""A section at least this many times the core's narrowest width holds the narrow part
(our threshold, a judgement: a round section 1.5 times as wide is 1.5^4 = 5 times as
stiff in bending, since the second moment of area grows with the fourth power of the
diameter, and it bears on the silicone across a face rather than along a line)."""

CAP_TOL_MM = 1e-6
"""Sections of the far end's cap widen towards the body by more than this (mm); equal
sections (within float noise) belong to the body."""

SPAN_TOL_MM = 0.01
"""The ends of a span are found by bisection between section planes to this (mm)."""


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
    span_mm: float                 # longest unsupported span (see the module docstring)
    span_where_mm: tuple[float, float, float]  # narrowest section within that span

    @property
    def strain(self) -> float:
        return max(self.stretch - 1.0, 0.0)

    @property
    def slenderness(self) -> float:
        """Longest unsupported span over the narrowest width."""
        return self.span_mm / self.least_width_mm if self.least_width_mm > 0 else math.inf


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


class _Sections:
    """Cross-sections of a mesh normal to ``d``, by depth behind the opening plane."""

    def __init__(self, core: TriMesh, d: np.ndarray, o: np.ndarray) -> None:
        self.e1, self.e2 = _basis(d)
        tris = core.triangles() - o
        self.depth = -(tris @ d)                    # how far behind the opening, mm
        self.flat = np.stack([tris @ self.e1, tris @ self.e2], axis=-1)
        self.lo, self.hi = self.depth.min(axis=1), self.depth.max(axis=1)
        self.order = np.argsort(self.lo, kind="stable")
        self.lo_sorted = self.lo[self.order]

    def at(self, s: float) -> tuple[float, float, np.ndarray] | None:
        """Hull perimeter, least width and 2-D centroid of the section at depth ``s``
        (``None`` where the plane cuts fewer than three points)."""
        upto = self.order[: int(np.searchsorted(self.lo_sorted, s, side="right"))]
        sel = upto[self.hi[upto] > s]
        p = _section_points(self.depth[sel], self.flat[sel], float(s))
        if len(p) < 3:
            return None
        return _hull_perimeter_width(p)


def core_extraction(core: TriMesh, pull: Sequence[float], opening_point: Sequence[float],
                    opening_perimeter_mm: float, step_mm: float = 0.5,
                    max_sections: int = 1000) -> Extraction:
    """Sweep sections of ``core`` normal to ``pull`` from the opening plane to the far end
    (the part of the core that must come through the opening) and return the worst."""
    d = np.asarray(pull, dtype=np.float64)
    d = d / np.linalg.norm(d)
    o = np.asarray(opening_point, dtype=np.float64)
    sec = _Sections(core, d, o)
    far = float(sec.depth.max())
    if far <= 0.0:
        return Extraction(0.0, tuple(o), 0.0, opening_perimeter_mm, 0.0, math.inf,
                          tuple(o), 0.0, tuple(o))
    n = int(min(max_sections, max(8, math.ceil(far / step_mm))))
    # Section planes between the opening (depth 0) and the far end, never exactly on them.
    levels = (np.arange(n) + 0.5) * far / n
    best = (-1.0, 0.0, np.zeros(2), 0.0)
    widths: list[tuple[float, np.ndarray, float]] = []
    for s in levels:
        cut = sec.at(float(s))
        if cut is None:
            continue
        perim, width, c = cut
        if perim > best[0]:
            best = (perim, width, c, float(s))
        if width > 0.0:
            widths.append((width, c, float(s)))
    # The far end's rounded cap narrows to a point but carries no load: bending is governed
    # by the narrowest section before it (walking back from the tip while sections widen;
    # a stretch of equal sections is the body, not the cap).
    k = len(widths) - 1
    while k > 0 and widths[k - 1][0] > widths[k][0] + CAP_TOL_MM:
        k -= 1
    body = widths[: k + 1]
    thin = min(body, key=lambda w: (w[0], w[2])) if body else (math.inf, np.zeros(2), 0.0)
    span, span_at = _longest_span(sec, widths, k, SUPPORT_WIDTH_RATIO * thin[0], far)

    def world(c2: np.ndarray, s: float) -> tuple[float, float, float]:
        w = o + c2[0] * sec.e1 + c2[1] * sec.e2 - s * d
        return (float(w[0]), float(w[1]), float(w[2]))

    return Extraction(
        stretch=best[0] / opening_perimeter_mm, where_mm=world(best[2], best[3]),
        section_perimeter_mm=best[0], opening_perimeter_mm=float(opening_perimeter_mm),
        free_length_mm=far, least_width_mm=thin[0],
        least_width_where_mm=world(thin[1], thin[2]), span_mm=span,
        span_where_mm=world(span_at[1], span_at[2]))


def _longest_span(sec: _Sections, widths: list[tuple[float, np.ndarray, float]],
                  body_end: int, support_mm: float, far: float
                  ) -> tuple[float, tuple[float, np.ndarray, float]]:
    """The longest run of sections narrower than ``support_mm`` (its length in mm, from
    the opening plane or the support before it to the support after it or the far end)
    and the narrowest section of that run short of the far end's cap (sections after
    index ``body_end``), or its first section when it is all cap."""
    best: tuple[float, tuple[float, np.ndarray, float]] = (0.0, (math.inf, np.zeros(2), 0.0))
    i = 0
    while i < len(widths):
        if widths[i][0] >= support_mm:
            i += 1
            continue
        j = i
        while j + 1 < len(widths) and widths[j + 1][0] < support_mm:
            j += 1
        start = 0.0 if i == 0 else _edge(sec, widths[i - 1][2], widths[i][2], support_mm)
        end = far if j == len(widths) - 1 else _edge(sec, widths[j + 1][2], widths[j][2],
                                                     support_mm)
        if end - start > best[0]:
            run = widths[i: min(j, body_end) + 1] or widths[i: i + 1]
            best = (end - start, min(run, key=lambda w: (w[0], w[2])))
        i = j + 1
    return best


def _edge(sec: _Sections, held: float, free: float, support_mm: float) -> float:
    """Depth where the core stops being a support, between a supporting section at depth
    ``held`` and a narrow one at ``free`` (bisection to SPAN_TOL_MM)."""
    while abs(free - held) > SPAN_TOL_MM:
        mid = 0.5 * (held + free)
        cut = sec.at(mid)
        if cut is not None and cut[1] >= support_mm:
            held = mid
        else:
            free = mid
    return 0.5 * (held + free)


def allowed_stretch(elongation_pct: float, safety_factor: float) -> float:
    """Largest stretch accepted: strain at break divided by the safety factor, plus one."""
    return 1.0 + elongation_pct / 100.0 / safety_factor
