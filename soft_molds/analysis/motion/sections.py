"""Cross-sections of the cast along its long axis x, as a beam sees them.

Each plane x = const cuts the cast mesh into line segments in the (y, z) plane. The mesh is
wound with outward normals, so every segment can be oriented the way the silicone's
boundary runs counter-clockwise seen from +x (outer outline counter-clockwise, the holes
clockwise): the tangent of a cut through a facet with outward normal n is (-n_z, n_y).
Sums over oriented segments then give exact polygon integrals by Green's theorem, with no
loop assembly: area = sum of y0 z1 - y1 z0 over 2, and the first and second moments by the
usual polygon formulas (any loop order, any number of loops).

Segments cut from facets on a void's surface (the caller says which facets those are) close
the holes; summed alone they give minus the void's area and its centroid: the area the
pressure pushes on at that section and where its resultant acts.

Frame: mm, world (x the body's long axis from the inlet face, (y, z) across it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from soft_molds.meshdata import TriMesh


@dataclass(frozen=True, eq=False)
class Section:
    """One cut at ``x_mm``: the silicone's area (mm2), centroid (y, z) (mm) and central
    second moments ``iyy, izz, iyz`` = integrals of (y-yc)^2, (z-zc)^2, (y-yc)(z-zc) dA
    (mm4); the voids' area (mm2) and centroid; ``segments`` (n, 2, 2) oriented (y, z)
    segments of the whole cut (silicone boundary, counter-clockwise)."""

    x_mm: float
    silicone_area_mm2: float
    centroid_mm: tuple[float, float]
    iyy_mm4: float
    izz_mm4: float
    iyz_mm4: float
    void_area_mm2: float
    void_centroid_mm: tuple[float, float]
    segments: np.ndarray

    def second_moment_mm4(self, d: tuple[float, float]) -> float:
        """Second moment of the silicone about the axis through its centroid square to the
        unit direction ``d`` = (dy, dz): the integral of ((p - c) . d)^2 dA."""
        dy, dz = d
        return self.iyy_mm4 * dy * dy + 2.0 * self.iyz_mm4 * dy * dz + self.izz_mm4 * dz * dz

    def lever_arm_mm(self, d: tuple[float, float]) -> float:
        """Distance along ``d`` from the silicone's centroid (the neutral axis of a
        uniform section) to the voids' centroid (where the pressure's resultant acts)."""
        return ((self.void_centroid_mm[0] - self.centroid_mm[0]) * d[0]
                + (self.void_centroid_mm[1] - self.centroid_mm[1]) * d[1])


def oriented_cut(mesh: TriMesh, x_mm: float, void_facets: np.ndarray,
                 tris: np.ndarray | None = None, normals: np.ndarray | None = None
                 ) -> tuple[np.ndarray, np.ndarray]:
    """Segments (n, 2, 2) in (y, z) where the plane x = ``x_mm`` cuts ``mesh``, oriented
    as the module says, and a mask (n,) of those on void facets (``void_facets``, one flag
    per facet). ``tris`` and ``normals`` may be passed precomputed (facet corners and
    unnormalised normals)."""
    t = mesh.triangles() if tris is None else tris
    n = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0]) if normals is None else normals
    d = t[:, :, 0] - x_mm
    d = np.where(d == 0.0, 1e-9, d)  # a corner on the plane counts as just beyond it
    cross = (d[:, [0, 1, 2]] * d[:, [1, 2, 0]]) < 0.0
    hit = cross.sum(axis=1) == 2
    t, d, cross, n, void = t[hit], d[hit], cross[hit], n[hit], void_facets[hit]
    pts = np.zeros((len(t), 3, 2))
    for e in range(3):
        a, b = e, (e + 1) % 3
        den = d[:, a] - d[:, b]
        f = np.divide(d[:, a], den, out=np.zeros_like(den), where=cross[:, e])
        pts[:, e] = (t[:, a] + f[:, None] * (t[:, b] - t[:, a]))[:, 1:]
    order = np.argsort(~cross, axis=1, kind="stable")[:, :2]
    seg = np.take_along_axis(pts, order[:, :, None], axis=1)
    tangent = np.stack([-n[:, 2], n[:, 1]], axis=1)
    flip = np.einsum("ij,ij->i", seg[:, 1] - seg[:, 0], tangent) < 0.0
    seg[flip] = seg[flip][:, ::-1]
    return seg, void


def _moments(seg: np.ndarray, origin: np.ndarray) -> np.ndarray:
    """Green's-theorem integrals over the region the oriented segments bound, about
    ``origin``: [A, Sy, Sz, Syy, Szz, Syz] (integrals of 1, y, z, y^2, z^2, yz dA)."""
    p0, p1 = seg[:, 0] - origin, seg[:, 1] - origin
    y0, z0, y1, z1 = p0[:, 0], p0[:, 1], p1[:, 0], p1[:, 1]
    c = y0 * z1 - y1 * z0
    return np.array([c.sum() / 2.0,
                     (c * (y0 + y1)).sum() / 6.0,
                     (c * (z0 + z1)).sum() / 6.0,
                     (c * (y0 * y0 + y0 * y1 + y1 * y1)).sum() / 12.0,
                     (c * (z0 * z0 + z0 * z1 + z1 * z1)).sum() / 12.0,
                     (c * (y0 * z1 + 2 * y0 * z0 + 2 * y1 * z1 + y1 * z0)).sum() / 24.0])


def section_at(seg: np.ndarray, void: np.ndarray, x_mm: float) -> Section:
    """The :class:`Section` of oriented segments ``seg`` (``void``: those on void facets)."""
    origin = seg.reshape(-1, 2).mean(axis=0) if len(seg) else np.zeros(2)
    a, sy, sz, syy, szz, syz = _moments(seg, origin)
    if a <= 0.0:
        return Section(x_mm, 0.0, (0.0, 0.0), 0.0, 0.0, 0.0, 0.0, (0.0, 0.0), seg)
    cy, cz = sy / a, sz / a
    iyy, izz, iyz = syy - a * cy * cy, szz - a * cz * cz, syz - a * cy * cz
    va, vsy, vsz = (-_moments(seg[void], origin))[:3] if void.any() else (0.0, 0.0, 0.0)
    vc = (vsy / va + origin[0], vsz / va + origin[1]) if va > 1e-12 else (
        cy + origin[0], cz + origin[1])
    return Section(x_mm, float(a), (float(cy + origin[0]), float(cz + origin[1])),
                   float(iyy), float(izz), float(iyz), float(max(va, 0.0)),
                   (float(vc[0]), float(vc[1])), seg)


def cut_sections(mesh: TriMesh, xs_mm: np.ndarray, void_facets: np.ndarray
                 ) -> tuple[Section, ...]:
    """:class:`Section` of ``mesh`` at every x in ``xs_mm``."""
    t = mesh.triangles()
    n = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    lo, hi = t[:, :, 0].min(axis=1), t[:, :, 0].max(axis=1)
    out = []
    for x in xs_mm:
        near = (lo <= x) & (hi >= x)
        seg, void = oriented_cut(mesh, float(x), void_facets[near], t[near], n[near])
        out.append(section_at(seg, void, float(x)))
    return tuple(out)


def strip_moments(seg: np.ndarray, centroid: tuple[float, float], d: tuple[float, float],
                  edges_mm: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Area (mm2) and first moment (mm3) of the silicone in each strip between consecutive
    ``edges_mm`` (ascending) of s = (p - centroid) . d, exactly.

    The chord length at s is the sum over segments crossing that line of the crossing's
    coordinate t = p . (d_z, -d_y), signed by the direction the segment crosses it (the
    integral of t ds round the boundary is the area). Along one segment t = alpha + beta s,
    so its share of F(q) = integral of the chord up to q, and of G(q) = integral of chord * s,
    is a polynomial in q over the segment's span and a constant past it; the polynomials
    are added as differences over the edges each segment spans and summed once (linear in
    segments plus edges). Strip j holds F(q_j+1) - F(q_j) and G(q_j+1) - G(q_j)."""
    dy, dz = d
    p = seg - np.asarray(centroid)
    s = p[..., 0] * dy + p[..., 1] * dz
    t = p[..., 0] * dz - p[..., 1] * dy
    s0, s1, t0, t1 = s[:, 0], s[:, 1], t[:, 0], t[:, 1]
    q = np.asarray(edges_mm, dtype=np.float64)
    keep = s1 != s0
    s0, s1, t0, t1 = s0[keep], s1[keep], t0[keep], t1[keep]
    sign = np.sign(s1 - s0)
    beta = (t1 - t0) / (s1 - s0)
    alpha = t0 - beta * s0
    lo_s, hi_s = np.minimum(s0, s1), np.maximum(s0, s1)
    lo = np.searchsorted(q, lo_s, side="left")   # first edge inside the span
    hi = np.searchsorted(q, hi_s, side="left")   # first edge at or past its end

    def add(acc: np.ndarray, at: np.ndarray, v: np.ndarray) -> None:
        np.add.at(acc, at, v)

    def prim_f(x):   # integral of alpha + beta s
        return alpha * x + beta * x * x / 2.0

    def prim_g(x):   # integral of (alpha + beta s) s
        return alpha * x * x / 2.0 + beta * x ** 3 / 3.0

    out = []
    for prim, deg in ((prim_f, 2), (prim_g, 3)):
        # Inside the span: sign * (prim(q) - prim(lo_s)), a polynomial in q of degree deg.
        coef = np.zeros((deg + 1, len(q) + 1))
        base = -sign * prim(lo_s)
        if deg == 2:
            terms = [base, sign * alpha, sign * beta / 2.0]
        else:
            terms = [base, np.zeros_like(alpha), sign * alpha / 2.0, sign * beta / 3.0]
        for k, c in enumerate(terms):
            add(coef[k], lo, c)
            add(coef[k], hi, -c)
        const = np.zeros(len(q) + 1)
        add(const, hi, sign * (prim(hi_s) - prim(lo_s)))   # past the span: the whole share
        coef = np.cumsum(coef, axis=1)[:, :-1]
        total = np.cumsum(const)[:-1] + sum(coef[k] * q ** k for k in range(deg + 1))
        out.append(np.diff(total))
    return out[0], out[1]
