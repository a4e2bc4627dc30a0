"""Motion model ``sheet-bending``: a chambered finger whose base carries a strain-limiting
sheet (paper or a woven fabric), bent by its own pressure about the sheet.

Assumptions, beyond those of ``beam-bending`` (:mod:`.bending`: plane sections, the
pressure's force P A_p at the voids' centroid, walls between chambers rigid, one
incompressible neo-Hookean silicone):

- The sheet is inextensible and bonded, a line in each section square to the bending
  direction (it lies flat across the base): the fibre on it keeps its length. So the
  stretch of a fibre at distance s from the silicone's centroid (along the bending
  direction ``d``) is l(s) = 1 + k (s - s_sheet): the neutral axis is the sheet, not the
  centroid, and the axial force the pressure puts on a section is carried by the sheet's
  tension, whatever it is.
- The sheet is thin: it adds no bending stiffness of its own and no area.
- Equilibrium of moments about the sheet line: integral of sigma(l(s)) (s - s_sheet) dA =
  P A_p (e - s_sheet), with e the voids' centroid from the silicone's centroid along d;
  solved for k per section by Newton's method with the exact tangent. At small pressure
  k = P A_p (e - s_sheet) / (E I_sheet), I_sheet the silicone's second moment about the
  sheet line (Euler-Bernoulli with the parallel-axis theorem).
- The extension reported is that of the sheet: zero.

Units: MPa, mm, kPa for pressures, degrees for the tip angle.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .beam import MIN_STRETCH, STRIPS, nominal_stress, tangent_modulus
from .bending import KINDS
from .model import MotionKind
from .registry import Profile, Solved, register


@dataclass(frozen=True)
class SheetBending:
    name: str = "sheet-bending"
    kind: MotionKind = MotionKind.BENDING
    order: int = 50

    def applies(self, profile: Profile) -> bool:
        """Voids that push and a sheet below them (on the far side of the silicone's
        centroid from the voids)."""
        if profile.sheet_yz_mm is None or not KINDS & set(profile.void_kinds):
            return False
        d, _ = profile.load_direction()
        return bool((sheet_offsets(profile, d) < 0.0).all())

    def solve(self, profile: Profile, e_mpa: float, pressures_kpa: np.ndarray) -> Solved:
        return solve_sheet(profile, e_mpa, pressures_kpa)


def sheet_offsets(profile: Profile, d: tuple[float, float]) -> np.ndarray:
    """s_sheet per section: the sheet's distance from the silicone's centroid along d."""
    assert profile.sheet_yz_mm is not None
    p = np.asarray(profile.sheet_yz_mm)
    return np.array([float((p - np.asarray(x.centroid_mm)) @ np.asarray(d))
                     for x in profile.sections])


def _solve_k(r: np.ndarray, w: np.ndarray, m: np.ndarray, e_mpa: float, start: np.ndarray,
             iters: int = 60, tol: float = 1e-10) -> np.ndarray:
    """Curvature per section for strips at ``r`` = s - s_sheet (sections, strips) of area
    ``w`` under the moment ``m`` about the sheet. ``ArithmeticError`` without convergence
    (residual moment within ``tol`` E I_sheet / depth)."""
    k = start.copy()
    scale = e_mpa * (w * r * r).sum(axis=1) / np.maximum(np.abs(r).max(axis=1), 1e-9)
    for _ in range(iters):
        lam = 1.0 + k[:, None] * r
        res = (nominal_stress(lam, e_mpa) * r * w).sum(axis=1) - m
        if (np.abs(res) <= tol * scale).all():
            return k
        dk = res / (tangent_modulus(lam, e_mpa) * r * r * w).sum(axis=1)
        step = np.ones(len(k))
        for _ in range(40):  # halve until every fibre stays above MIN_STRETCH
            bad = (1.0 + (k - step * dk)[:, None] * r).min(axis=1) < MIN_STRETCH
            if not bad.any():
                break
            step = np.where(bad, step / 2.0, step)
        k = k - step * dk
    raise ArithmeticError("the section equilibrium about the sheet did not converge")


def solve_sheet(profile: Profile, e_mpa: float, pressures_kpa: np.ndarray) -> Solved:
    """Angle, zero extension and the largest stretch per pressure (module docstring); the
    arrays stop before a pressure whose equilibrium is not found."""
    d, _ = profile.load_direction()
    secs = profile.sections
    s, w = profile.strips(d, STRIPS)
    s_sheet = sheet_offsets(profile, d)
    r = s - s_sheet[:, None]
    area_p = np.array([x.void_area_mm2 for x in secs])
    arm = np.array([x.lever_arm_mm(d) for x in secs]) - s_sheet      # voids to the sheet
    # Second moment about the sheet (parallel axes): exact from the section, not strips.
    inertia = np.array([x.second_moment_mm4(d) + x.silicone_area_mm2 * ss * ss
                        for x, ss in zip(secs, s_sheet)])
    spans = w > 0.0
    k = np.zeros(len(secs))
    ang, top = [], []
    for p in pressures_kpa:
        try:
            k = _solve_k(r, w, p / 1000.0 * area_p * arm, e_mpa, k)
        except ArithmeticError:
            break
        ang.append(float(np.degrees(k.sum() * profile.dx_mm)))
        top.append(float((1.0 + k[:, None] * r)[spans].max()))
    per = area_p * arm / np.where(inertia > 0, inertia, np.inf)     # k / (P / E) per mm
    gov = int(np.argmax(per))
    lin_deg = float(np.degrees(per.sum() * profile.dx_mm / (e_mpa * 1000.0)))
    return Solved(np.array(ang), np.zeros(len(ang)), np.array(top), d, gov, float(arm[gov]),
                  float(inertia[gov]), lin_deg, 0.0)


register(SheetBending())
