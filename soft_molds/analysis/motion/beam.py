"""A beam of incompressible neo-Hookean fibres, loaded section by section by the pressure.

Plane sections stay plane (Euler-Bernoulli): at a section the fibre at distance s from the
silicone's centroid along the bending direction stretches to l(s) = 1 + a + k s, with a the
axial strain of the centroid fibre and k the curvature (rad per mm of undeformed length).
Each fibre is in uniaxial tension or compression and carries the nominal (first
Piola-Kirchhoff) stress of an incompressible neo-Hookean solid,
sigma(l) = (E/3)(l - 1/l^2) (Treloar 1975, with mu = E/3), whose slope at l = 1 is E: for
small stretch it is Hooke's law and the solution is the linear beam's,
a = N/(E A), k = M/(E I) (Euler-Bernoulli; M = P A_p e gives k = P A_p e/(E I)).

Equilibrium of a section under the axial force N and the moment M about its centroid:
integral of sigma(l(s)) dA = N and integral of sigma(l(s)) s dA = M, integrated over thin
strips of the section (each strip's exact area and centroid from
:func:`.sections.strip_moments`, one point per strip) and solved for
(a, k) by Newton's method with the exact tangent (E/3)(1 + 2/l^3), step-halved to keep every
fibre's stretch above zero. Units: MPa, mm, N (MPa mm2), N mm.
"""

from __future__ import annotations

import numpy as np

STRIPS = 240
"""Strips across each section: A, the neutral axis and the linear N and M are exact; I is
short by about (1/STRIPS)^2 / 12 of the depth squared per unit area."""

MIN_STRETCH = 0.05
"""No fibre is let shorter than this during a Newton step (the law is singular at 0)."""


def nominal_stress(stretch: np.ndarray | float, e_mpa: float) -> np.ndarray:
    """Uniaxial nominal stress (MPa) of an incompressible neo-Hookean solid of Young's
    modulus ``e_mpa`` at ``stretch``: (E/3)(l - l^-2) (Treloar 1975)."""
    lam = np.asarray(stretch, dtype=np.float64)
    return e_mpa / 3.0 * (lam - 1.0 / (lam * lam))


def tangent_modulus(stretch: np.ndarray | float, e_mpa: float) -> np.ndarray:
    """d sigma / d l = (E/3)(1 + 2 l^-3); E at l = 1."""
    lam = np.asarray(stretch, dtype=np.float64)
    return e_mpa / 3.0 * (1.0 + 2.0 / (lam * lam * lam))


def solve_sections(s: np.ndarray, w: np.ndarray, n: np.ndarray, m: np.ndarray, e_mpa: float,
                   start: np.ndarray | None = None, bending: bool = True, iters: int = 60,
                   tol: float = 1e-10) -> np.ndarray:
    """(a, k) per section for strips centred at ``s`` (sections, strips) of area ``w``
    under axial force ``n`` and moment ``m`` (sections,).
    ``bending`` False holds k = 0 (a bar in pure tension). ``start``: (sections, 2) initial
    guess (the previous pressure step's solution). Raises ``ArithmeticError`` when Newton's
    method does not converge: the residual force (and moment over the section's half
    depth) within ``tol`` times E A, a strain error of ``tol``."""
    x = np.zeros((len(s), 2)) if start is None else np.array(start, dtype=np.float64)
    scale = e_mpa * w.sum(axis=1)
    for _ in range(iters):
        lam = 1.0 + x[:, :1] + x[:, 1:] * s
        sig, tan = nominal_stress(lam, e_mpa), tangent_modulus(lam, e_mpa)
        r0 = (sig * w).sum(axis=1) - n
        r1 = (sig * s * w).sum(axis=1) - m
        if bending:
            j00, j01, j11 = (tan * w).sum(axis=1), (tan * s * w).sum(axis=1), \
                (tan * s * s * w).sum(axis=1)
            det = j00 * j11 - j01 * j01
            dx = np.stack([(j11 * r0 - j01 * r1) / det, (j00 * r1 - j01 * r0) / det], axis=1)
            res = np.abs(r0) + np.abs(r1) / np.maximum(np.abs(s).max(axis=1), 1e-9)
        else:
            dx = np.stack([r0 / (tan * w).sum(axis=1), np.zeros(len(s))], axis=1)
            res = np.abs(r0)
        if (res <= tol * scale).all():
            return x
        step = np.ones(len(s))
        for _ in range(40):  # halve until every fibre stays above MIN_STRETCH
            trial = x - step[:, None] * dx
            lam_min = (1.0 + trial[:, :1] + trial[:, 1:] * s).min(axis=1)
            bad = lam_min < MIN_STRETCH
            if not bad.any():
                break
            step = np.where(bad, step / 2.0, step)
        x = x - step[:, None] * dx
    raise ArithmeticError("the section equilibrium did not converge")
