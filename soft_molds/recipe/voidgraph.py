"""Which voids join which: two voids are joined when they overlap with positive volume
(a shared face or a touching edge is no passage for air or silicone). A void is reached
when it opens into a tube socket itself or is joined to a reached void; the voids of
one group share one core piece, which the kernel fuses into one solid and which leaves
through the one socket the group opens into.

The overlap test is exact for the primitives chambers and bores are made of: a rounded
box is a box grown by a ball of its corner radius, and a rounded rod is a shorter,
thinner cylinder grown by a ball of its end rounding (both Minkowski sums). Two such
solids overlap with positive volume exactly when their cores lie closer than the sum of
the two ball radii. The cores are products (an interval along one axis times a rectangle
or a disc across it), so their distance is the root of the sum of the squared distances
of the factors (elementary geometry). Other pairs (a revolved or swept void, two rods on
crossing axes) are decided from surface samples: a sample of one lying inside the other.

Frame: mm, world (x along the body from the inlet face)."""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from .primitives import AXES, Primitive, RoundedBox, RoundedRod

#: Overlap depth (mm) below which two voids count as touching, not joined: the kernel's
#: confusion distance is 1e-7 mm, and a passage this thin carries nothing.
JOIN_EPS_MM = 1e-6
#: Sample spacing (mm) for the pairs without an exact test, coarser for large solids so
#: that each is sampled with about MAX_SAMPLES points (fields allow 1000 mm parts).
SAMPLE_MM = 0.25
MAX_SAMPLES = 100_000

#: A grown core: per-axis intervals (lo, hi) of the core, the axis of a disc factor (or
#: None), the disc's centre in the two other axes and radius, and the growing radius.
_Core = tuple[list[tuple[float, float]], int | None, tuple[float, float], float, float]


def _core(p: Primitive) -> _Core | None:
    if isinstance(p, RoundedBox):
        r = p.radius_mm
        iv = [(c - s / 2.0 + r, c + s / 2.0 - r) for c, s in zip(p.center_mm, p.size_mm)]
        return iv, None, (0.0, 0.0), 0.0, r
    if isinstance(p, RoundedRod):
        a, f = AXES[p.axis], p.end_radius_mm
        iv = [(0.0, 0.0)] * 3
        iv[a] = (p.start_mm + f, p.start_mm + p.length_mm - f)
        return iv, a, p.center_mm, p.radius_mm - f, f
    return None


def _gap(a: tuple[float, float], b: tuple[float, float]) -> float:
    """Signed gap between two intervals: their distance, or minus their common length."""
    return max(a[0] - b[1], b[0] - a[1])


def _rect_disc_gap(iv: list[tuple[float, float]], axes: tuple[int, int],
                   centre: tuple[float, float], radius: float) -> float:
    """Signed gap between the rectangle ``iv`` over ``axes`` and a disc in that plane:
    their distance, or (the centre inside) minus the radius plus the centre's depth."""
    gy = _gap(iv[axes[0]], (centre[0], centre[0]))
    gz = _gap(iv[axes[1]], (centre[1], centre[1]))
    if gy > 0.0 or gz > 0.0:
        return math.hypot(max(gy, 0.0), max(gz, 0.0)) - radius
    return max(gy, gz) - radius


def _gaps(a: _Core, b: _Core) -> list[float] | None:
    """Signed gaps of the cores' factors (positive: apart along that factor), or None
    when the pair has no exact test."""
    iva, axa, ca, ra, _ = a
    ivb, axb, cb, rb, _ = b
    if axa is None and axb is None:
        return [_gap(x, y) for x, y in zip(iva, ivb)]
    if axa is not None and axb is not None and axa != axb:
        return None
    ax = axa if axa is not None else axb
    assert ax is not None
    across = (min(i for i in range(3) if i != ax), max(i for i in range(3) if i != ax))
    if axa is not None and axb is not None:
        cross = math.dist(ca, cb) - ra - rb
    elif axa is None:
        cross = _rect_disc_gap(iva, across, cb, rb)
    else:
        cross = _rect_disc_gap(ivb, across, ca, ra)
    return [_gap(iva[ax], ivb[ax]), cross]


def _depth(a: _Core, b: _Core) -> float | None:
    """How deep (mm) the two grown cores overlap (negative: apart), or None. Apart along
    some factor, the cores' distance is the root of the squared positive gaps; otherwise
    the cores share a point and the overlap is at least the balls' radii plus the least
    common length of the factors."""
    gaps = _gaps(a, b)
    if gaps is None:
        return None
    grow = a[4] + b[4]
    apart = [g for g in gaps if g > 0.0]
    if apart:
        return grow - math.sqrt(sum(g * g for g in apart))
    return grow - max(gaps)


def _bounds_apart(a: Primitive, b: Primitive) -> bool:
    (alo, ahi), (blo, bhi) = a.bounds(), b.bounds()
    return bool(np.any(alo >= bhi - JOIN_EPS_MM) or np.any(blo >= ahi - JOIN_EPS_MM))


def overlaps(a: Primitive, b: Primitive) -> bool:
    """Whether ``a`` and ``b`` share a positive volume (deeper than JOIN_EPS_MM)."""
    if _bounds_apart(a, b):
        return False
    ca, cb = _core(a), _core(b)
    if ca is not None and cb is not None:
        depth = _depth(ca, cb)
        if depth is not None:
            return depth > JOIN_EPS_MM
    return bool(np.any(b.sdf(a.surface_samples(_spacing(a))) < -JOIN_EPS_MM)
                or np.any(a.sdf(b.surface_samples(_spacing(b))) < -JOIN_EPS_MM))


def _spacing(p: Primitive) -> float:
    lo, hi = p.bounds()
    a, b, c = np.maximum(hi - lo, SAMPLE_MM)
    return max(SAMPLE_MM, float(np.sqrt(2.0 * (a * b + b * c + a * c) / MAX_SAMPLES)))


def joined(a: Sequence[Primitive], b: Sequence[Primitive]) -> bool:
    """Whether two voids, each a union of primitives, overlap with positive volume. Only
    pairs whose bounds overlap are tested (two rows of 200 chambers side by side would
    otherwise be 40 000 tests)."""
    lo_a, hi_a = (np.array(v) for v in zip(*(p.bounds() for p in a)))
    lo_b, hi_b = (np.array(v) for v in zip(*(p.bounds() for p in b)))
    near = np.all((lo_a[:, None, :] < hi_b[None, :, :] - JOIN_EPS_MM)
                  & (lo_b[None, :, :] < hi_a[:, None, :] - JOIN_EPS_MM), axis=2)
    return any(overlaps(a[i], b[j]) for i, j in zip(*np.nonzero(near)))


def groups(voids: Sequence[Sequence[Primitive]]) -> tuple[tuple[int, ...], ...]:
    """The voids' indices in groups of joined voids (each group sorted, the groups by
    their first index): the pieces the void set is made of without the socket."""
    parent = list(range(len(voids)))

    def root(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for i in range(len(voids)):
        for j in range(i + 1, len(voids)):
            if root(i) != root(j) and joined(voids[i], voids[j]):
                parent[root(j)] = root(i)
    out: dict[int, list[int]] = {}
    for i in range(len(voids)):
        out.setdefault(root(i), []).append(i)
    return tuple(sorted(tuple(g) for g in out.values()))


def unreached(voids: Sequence[Sequence[Primitive]], opens: Callable[[int], bool]
              ) -> tuple[tuple[int, ...], ...]:
    """The groups of joined voids none of which opens into an inlet (``opens(i)``)."""
    return tuple(g for g in groups(voids) if not any(opens(i) for i in g))


def feeds(voids: Sequence[Sequence[Primitive]], opens: Callable[[int, int], bool],
          inlets: int) -> tuple[tuple[tuple[int, ...], tuple[int, ...]], ...]:
    """Each group of joined voids with the inlets it opens into (``opens(void, inlet)``):
    (void indices, inlet indices), the groups as :func:`groups` orders them. A group with
    no inlet is not reached; one with two has two sockets for one core piece."""
    return tuple((g, tuple(j for j in range(inlets) if any(opens(i, j) for i in g)))
                 for g in groups(voids))
