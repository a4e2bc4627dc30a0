"""Pure-data solids that body and void kinds are made of.

A kind turns its recipe fields into a few primitives; the geometry stage knows how to
build each primitive as a BRep solid, and the recipe stage can reason about them with
exact signed distance functions (negative inside, mm) before any kernel call. A new
kind therefore needs one file and no kernel code, as long as it is made of these.

Frame: mm; +x is the body's long axis, pointing away from the inlet face at x = 0.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

AXES = {"x": 0, "y": 1, "z": 2}


@dataclass(frozen=True)
class RoundedBox:
    """Axis-aligned box of full ``size_mm`` centred at ``center_mm``, every edge and
    corner rounded with ``radius_mm`` (the Minkowski sum of a smaller box and a ball)."""

    center_mm: tuple[float, float, float]
    size_mm: tuple[float, float, float]
    radius_mm: float = 0.0

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm) of points ``p`` (n, 3)."""
        half = np.asarray(self.size_mm) / 2.0 - self.radius_mm
        q = np.abs(p - np.asarray(self.center_mm)) - half
        outside = np.linalg.norm(np.maximum(q, 0.0), axis=1)
        inside = np.minimum(q.max(axis=1), 0.0)
        return outside + inside - self.radius_mm

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        c, s = np.asarray(self.center_mm), np.asarray(self.size_mm) / 2.0
        return c - s, c + s

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface, at most ``spacing_mm`` apart along each face."""
        return _project_to_surface(self, _box_shell_grid(*self.bounds(), spacing_mm))

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along axis ``v`` of the section by the plane ``coord[w] = t``,
        taken over the third axis (None: the plane misses). Exact: the section across a
        rounded edge narrows by r - sqrt(r^2 - d^2) at depth d into the rounding."""
        c, h, r = self.center_mm, np.asarray(self.size_mm) / 2.0, self.radius_mm
        off = abs(t - c[w])
        if off > h[w]:
            return None
        d = off - (h[w] - r)
        half = h[v] - (r - float(np.sqrt(max(r * r - d * d, 0.0))) if d > 0.0 else 0.0)
        return (c[v] - half, c[v] + half)


@dataclass(frozen=True)
class RoundedRod:
    """Cylinder along ``axis`` from ``start_mm`` for ``length_mm`` (along that axis), its
    two end rims rounded with ``end_radius_mm`` (0 = sharp, = radius gives hemispheres).
    ``center_mm`` is the position of the axis in the two other coordinates, in x-y-z order
    with the axis coordinate left out (for axis x: (y, z))."""

    axis: str
    start_mm: float
    length_mm: float
    center_mm: tuple[float, float]
    radius_mm: float
    end_radius_mm: float = 0.0

    def _split(self, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        a = AXES[self.axis]
        others = [i for i in range(3) if i != a]
        t = p[:, a] - (self.start_mm + self.length_mm / 2.0)
        rho = np.linalg.norm(p[:, others] - np.asarray(self.center_mm), axis=1)
        return t, rho

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the rounded rectangle (rho, t) revolved."""
        t, rho = self._split(p)
        f = self.end_radius_mm
        d = np.stack([rho - (self.radius_mm - f), np.abs(t) - (self.length_mm / 2.0 - f)], axis=1)
        outside = np.linalg.norm(np.maximum(d, 0.0), axis=1)
        inside = np.minimum(d.max(axis=1), 0.0)
        return outside + inside - f

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        a = AXES[self.axis]
        lo, hi = np.zeros(3), np.zeros(3)
        others = [i for i in range(3) if i != a]
        lo[a], hi[a] = self.start_mm, self.start_mm + self.length_mm
        for k, i in enumerate(others):
            lo[i] = self.center_mm[k] - self.radius_mm
            hi[i] = self.center_mm[k] + self.radius_mm
        return lo, hi

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        return _project_to_surface(self, _box_shell_grid(*self.bounds(), spacing_mm))

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along axis ``v`` of the section by the plane ``coord[w] = t``,
        taken over the third axis (None: the plane misses). Exact for the revolved rounded
        rectangle: across the axis a chord of the circle, along it the length less the end
        roundings' shortfall at that radius."""
        a = AXES[self.axis]
        others = [i for i in range(3) if i != a]
        big, f = self.radius_mm, self.end_radius_mm
        if w == a:  # a plane across the rod: a disc whose radius the end rounding trims
            s = t - self.start_mm
            if s < 0.0 or s > self.length_mm:
                return None
            e = max(f - s, s - (self.length_mm - f), 0.0)
            rho = big - (f - float(np.sqrt(max(f * f - e * e, 0.0))) if e > 0.0 else 0.0)
            cv = self.center_mm[others.index(v)]
            return (cv - rho, cv + rho)
        rho = abs(t - self.center_mm[others.index(w)])
        if rho > big:
            return None
        if v == a:  # along the axis at radial distance rho
            d = rho - (big - f)
            short = f - float(np.sqrt(max(f * f - d * d, 0.0))) if d > 0.0 else 0.0
            return (self.start_mm + short, self.start_mm + self.length_mm - short)
        half = float(np.sqrt(big * big - rho * rho))
        cv = self.center_mm[others.index(v)]
        return (cv - half, cv + half)


Primitive = RoundedBox | RoundedRod


def union_sdf(prims: tuple[Primitive, ...], p: np.ndarray) -> np.ndarray:
    """Signed distance bound of a union (exact outside, a bound inside; min of members)."""
    # Running minimum, not a stacked array: a row of 200 chambers must not hold
    # 200 distance arrays at once.
    out = prims[0].sdf(p)
    for q in prims[1:]:
        np.minimum(out, q.sdf(p), out=out)
    return out


def _box_shell_grid(lo: np.ndarray, hi: np.ndarray, spacing: float) -> np.ndarray:
    """Grid points on the six faces of a box: starting points for projection."""
    counts = [max(2, int(np.ceil((h - a) / spacing)) + 1) for a, h in zip(lo, hi)]
    axes = [np.linspace(a, h, n) for a, h, n in zip(lo, hi, counts)]
    pts = []
    for a in range(3):
        b, c = [i for i in range(3) if i != a]
        gb, gc = np.meshgrid(axes[b], axes[c], indexing="ij")
        for val in (lo[a], hi[a]):
            q = np.empty((gb.size, 3))
            q[:, a], q[:, b], q[:, c] = val, gb.ravel(), gc.ravel()
            pts.append(q)
    return np.concatenate(pts)


def _project_to_surface(prim: Primitive, p: np.ndarray, iterations: int = 6) -> np.ndarray:
    """Move points onto the zero set along the numerical SDF gradient (sphere tracing)."""
    h = 1e-5
    for _ in range(iterations):
        d = prim.sdf(p)
        grad = np.stack([(prim.sdf(p + e) - prim.sdf(p - e)) / (2 * h)
                         for e in np.eye(3) * h], axis=1)
        norm = np.linalg.norm(grad, axis=1, keepdims=True)
        norm[norm == 0] = 1.0
        p = p - (d[:, None] * grad / norm)
    return p
