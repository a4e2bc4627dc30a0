"""Sections of the body by planes, from its primitives' exact section extents: how wide the
body is at a candidate parting plane, and where it is widest. Mm, world frame."""

from __future__ import annotations

import numpy as np

from ..recipe.primitives import Primitive

#: Planes tried when looking for the widest section (odd: a symmetric body's centre is one).
WIDEST_SAMPLES = 401
#: Widths within this of the greatest count as the greatest (mm): float noise only.
WIDTH_TOL_MM = 1e-9


def width_at(prims: tuple[Primitive, ...], v: int, w: int, t: float) -> float:
    """Extent (mm) along axis ``v`` of the union's section by ``coord[w] = t`` (0 when the
    plane misses). The union's extent spans its members' extents."""
    spans = [s for s in (p.section_extent(v, w, t) for p in prims) if s is not None]
    if not spans:
        return 0.0
    return max(b for _, b in spans) - min(a for a, _ in spans)


def widest_offset(prims: tuple[Primitive, ...], v: int, w: int) -> tuple[float, float]:
    """(offset along ``w``, width along ``v``) of the widest section: the middle of the run
    of planes that share the greatest width (a bar's flat sides give a run; a rod a point)."""
    lo = min(float(p.bounds()[0][w]) for p in prims)
    hi = max(float(p.bounds()[1][w]) for p in prims)
    ts = np.linspace(lo, hi, WIDEST_SAMPLES)
    widths = np.array([width_at(prims, v, w, float(t)) for t in ts])
    best = float(widths.max())
    first, last = _longest_run(widths >= best - WIDTH_TOL_MM)
    return float(round((ts[first] + ts[last]) / 2.0, 6)) + 0.0, best


def _longest_run(mask: np.ndarray) -> tuple[int, int]:
    """First and last index of the longest run of True (the first such run on a tie)."""
    edges = np.diff(np.concatenate([[0], mask.astype(np.int8), [0]]))
    starts, ends = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1) - 1
    k = int(np.argmax(ends - starts))
    return int(starts[k]), int(ends[k])
