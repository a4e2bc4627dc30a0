"""Rubber elasticity for the pressure check: hardness to modulus, and the pressure at which
an inflated wall stops resisting (its limit point), after which it balloons.

Sources: A. N. Gent, "On the relation between indentation hardness and Young's modulus",
Rubber Chem. Technol. 31:896 (1958) for Shore A -> E; L. R. G. Treloar, The Physics of
Rubber Elasticity (3rd ed., 1975) for the incompressible neo-Hookean solid
(W = mu/2 (I1 - 3), mu = E/3) and the inflation of thin and thick spheres.

Units: MPa for moduli and pressures unless a name says kPa; lengths in mm (only ratios
matter); stretches are ratios (deformed / undeformed).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from soft_molds.recipe.materials import gent_modulus_mpa, shore_a_from_modulus

__all__ = ["gent_modulus_mpa", "shore_a_from_modulus"]  # re-exported: the relation lives in
# the recipe layer, which needs it to blend grades


def shear_modulus_mpa(e_mpa: float) -> float:
    """mu = E / 3 for an incompressible rubber (Poisson's ratio 1/2; Treloar 1975)."""
    return e_mpa / 3.0


# ---------------------------------------------------------------------------- spheres

SPHERE_LIMIT_STRETCH = 7.0 ** (1.0 / 6.0)
"""Stretch at the pressure peak of a thin neo-Hookean sphere: dP/dl = 0 at l^6 = 7."""


def thin_sphere_pressure(stretch: float | np.ndarray, mu: float, h_over_r: float):
    """P = 2 mu (H/R) (l^-1 - l^-7): thin neo-Hookean sphere of radius R, wall H."""
    lam = np.asarray(stretch, dtype=np.float64)
    return 2.0 * mu * h_over_r * (1.0 / lam - lam ** -7.0)


def thin_sphere_limit(mu: float, h_over_r: float) -> float:
    """Peak pressure of a thin sphere, 2 mu (H/R) (l*^-1 - l*^-7) at l* = 7^(1/6)
    (= 1.23946 mu H/R = 0.41315 E H/R)."""
    return float(thin_sphere_pressure(SPHERE_LIMIT_STRETCH, mu, h_over_r))


def thick_sphere_pressure(stretch_inner: float | np.ndarray, mu: float, inner: float,
                          outer: float):
    """Exact neo-Hookean inflation of a thick sphere (inner radius ``inner``, outer
    ``outer``) against the inner stretch la:
    P = mu [(2/lb + 1/(2 lb^4)) - (2/la + 1/(2 la^4))] with lb^3 = 1 + (A/B)^3 (la^3 - 1)."""
    la = np.asarray(stretch_inner, dtype=np.float64)
    lb = np.cbrt(1.0 + (inner / outer) ** 3 * (la ** 3 - 1.0))
    return mu * ((2.0 / lb + 0.5 / lb ** 4) - (2.0 / la + 0.5 / la ** 4))


# ------------------------------------------------------------------------------ tubes

def plane_strain_tube_pressure(stretch: float | np.ndarray, mu: float, h_over_r: float):
    """Thin tube held at constant length (plane strain, lz = 1): P = mu (H/R)(1 - l^-4),
    rising monotonically toward mu H/R: no limit point."""
    lam = np.asarray(stretch, dtype=np.float64)
    return mu * h_over_r * (1.0 - lam ** -4.0)


def closed_tube_axial_stretch(stretch: float | np.ndarray) -> np.ndarray:
    """Axial stretch of a thin closed-end tube free to lengthen, for hoop stretch l.

    With lr = 1/(l lz), membrane stresses s_theta = mu (l^2 - lr^2) and
    s_z = mu (lz^2 - lr^2); the end caps make s_theta = 2 s_z (thin-walled vessel), so
    lz^2 = (l^2 + lr^2) / 2, solved here by fixed-point iteration (it converges: the map
    is a contraction for l >= 1)."""
    lam = np.asarray(stretch, dtype=np.float64)
    lz = np.ones_like(lam)
    for _ in range(200):
        lr2 = 1.0 / (lam * lz) ** 2
        lz = np.sqrt((lam ** 2 + lr2) / 2.0)
    return lz


def closed_tube_pressure(stretch: float | np.ndarray, mu: float, h_over_r: float):
    """Thin closed-end tube free to lengthen: P = s_theta h / r = mu (H/R)(l^2 - lr^2) lr / l
    with h = H lr, r = l R and lz from :func:`closed_tube_axial_stretch`."""
    lam = np.asarray(stretch, dtype=np.float64)
    lz = closed_tube_axial_stretch(lam)
    lr = 1.0 / (lam * lz)
    return mu * h_over_r * (lam ** 2 - lr ** 2) * lr / lam


@dataclass(frozen=True)
class Limit:
    """The pressure peak of an inflation curve: ``pressure`` (same unit as mu) at hoop
    stretch ``stretch``; ``has_peak`` False when the curve only rises within the range
    searched (``pressure`` is then its value at the end of that range)."""

    pressure: float
    stretch: float
    has_peak: bool


def _peak(curve, lo: float = 1.0, hi: float = 20.0, n: int = 20001) -> Limit:
    lam = np.linspace(lo, hi, n)
    p = curve(lam)
    i = int(np.argmax(p))
    if i >= n - 1:
        return Limit(float(p[-1]), float(lam[-1]), False)
    if i == 0:  # falls from the start: the peak is the first sample
        return Limit(float(p[0]), float(lam[0]), True)
    # Refine with a parabola through the three samples around the peak.
    a, b, c = p[i - 1], p[i], p[i + 1]
    den = a - 2 * b + c
    off = 0.5 * (a - c) / den if den != 0 else 0.0
    step = lam[1] - lam[0]
    lam_star = lam[i] + off * step
    return Limit(float(curve(np.array([lam_star]))[0]), float(lam_star), True)


def closed_tube_limit(mu: float, h_over_r: float) -> Limit:
    """Limit point of the thin closed-end tube (derived: about 0.750 mu H/R at hoop
    stretch about 1.58; checked in the tests, not a published table value)."""
    return _peak(lambda lam: closed_tube_pressure(lam, mu, h_over_r))


MAX_STRETCH = 50.0
"""Largest inner stretch searched for a thick sphere's peak: beyond it the part has long
burst or torn (elongations at break of casting silicones are at most about 10x)."""


def thick_sphere_limit(mu: float, inner: float, outer: float) -> Limit:
    """Peak of :func:`thick_sphere_pressure` for inner stretch up to MAX_STRETCH
    (``has_peak`` False: the pressure still rises there, a wall thick enough to stiffen
    as it grows)."""
    return _peak(lambda lam: thick_sphere_pressure(lam, mu, inner, outer), hi=MAX_STRETCH,
                 n=50001)


THIN_WALL_RATIO = 0.2
"""Walls thicker than this fraction of their radius are outside thin-membrane theory; the
estimate is then rough (the thick-sphere formula is used for bulges)."""
