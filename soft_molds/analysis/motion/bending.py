"""Motion model ``beam-bending``: a chambered finger or a body with an eccentric bore, as a
beam bent by its own pressure.

Assumptions (each one a simplification; the figures are estimates for choosing a variant,
not a calibration):

- Euler-Bernoulli beam along x: plane sections stay plane and square to the bent axis,
  no shear, no twist; bending in the one plane through x and the pressure's mean offset
  from the neutral axis (``bend_dir``); the product of inertia across that plane and any
  moment out of it are ignored (exact for a section symmetric about the plane, as every
  bundled bender is).
- Loads from the free body beyond a cut: the fluid pushes on the part beyond the section
  at x with the force P A_p(x) along +x, acting at the centroid of the void's cut A_p(x)
  (the voids' area at that section; closed voids, so the rest of the pressure cancels).
  The area is the undeformed one: the cross-section of a chamber is taken not to swell,
  which holds while every wall is well below its balloon limit (the curve stops there).
  The walls between chambers are taken as rigid plates: their own bulging, which makes
  real chambered fingers bend more, is not modelled. Against finite elements (package
  docstring) the angle is 7 % above a linear 3-D solution of the seedling finger's body
  at small pressure, where the side walls hold each chamber's section together, and 28 to
  58 % below a nonlinear plane-stress solution of its section, which has no side walls.
- Slits cut from the outside (void kind ``slits``): the sections are read off the cast
  mesh, so a section through a slit has no silicone in the slit (it carries no axial
  stiffness in the top layer there) and its smaller I bends it more; nothing else is
  changed. What makes a slit finger fast, the walls between chambers tilting apart
  without stretching a top layer over them, is the wall bulging left out above, so the
  model underestimates a slit finger's angle more than an unslit one's.
- Material: one homogeneous, incompressible neo-Hookean silicone (Young's modulus E from
  the recipe: measured, or Shore A by Gent's relation), each fibre in uniaxial stress
  sigma = (E/3)(l - 1/l^2) (nominal), so the neutral axis is the silicone's centroid at
  small pressure and moves as the fibres stiffen or soften. A thicker base below the
  chambers moves the centroid (and so the neutral axis) away from the pressure, which
  lengthens the lever arm e; a bonded sheet of another material would need a modulus-
  weighted section, which the recipe cannot describe yet.
- Section by section: curvature k(x) and axial strain a(x) solve the section's
  equilibrium (:mod:`.beam`); the tip angle is the integral of k over the active length
  (rotation per undeformed length), theta = sum k dx, and the extension the integral of a.
  At small pressure each section gives the linear k = P A_p e / (E I) (Euler-Bernoulli),
  and theta = k L_active for a uniform section.
- Gravity, the tube, friction and the first-inflation softening (Mullins effect) are left
  out; the body is free (no contact) and the inlet end is held.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .beam import STRIPS, solve_sections
from .model import MotionKind
from .registry import Profile, Solved, register

ECCENTRIC_FRACTION = 0.05
"""The pressure's mean offset from the neutral axis must exceed this fraction of the
section's radius of gyration for the body to count as a bender (a row of chambers on the
axis of a round rod only lengthens)."""

KINDS = frozenset({"chambers", "bore"})


@dataclass(frozen=True)
class BeamBending:
    name: str = "beam-bending"
    kind: MotionKind = MotionKind.BENDING
    order: int = 100

    def applies(self, profile: Profile) -> bool:
        if not KINDS & set(profile.void_kinds):
            return False
        d, e = profile.load_direction()
        return e > ECCENTRIC_FRACTION * profile.radius_of_gyration_mm(d)

    def solve(self, profile: Profile, e_mpa: float, pressures_kpa: np.ndarray) -> Solved:
        return solve_beam(profile, e_mpa, pressures_kpa, bending=True)


def solve_beam(profile: Profile, e_mpa: float, pressures_kpa: np.ndarray, bending: bool
               ) -> Solved:
    """Angle, extension and largest stretch per pressure (see the module docstring);
    ``bending`` False holds every curvature at zero (a bar in pure tension). Should a
    section's equilibrium not be found at some pressure, the arrays stop at the pressure
    before (the caller marks the curve there)."""
    d, _ = profile.load_direction()
    secs = profile.sections
    s, w = profile.strips(d, STRIPS)
    area_p = np.array([x.void_area_mm2 for x in secs])
    lever = np.array([x.lever_arm_mm(d) for x in secs]) if bending else np.zeros(len(secs))
    inertia = np.array([x.second_moment_mm4(d) for x in secs])
    area_s = np.array([x.silicone_area_mm2 for x in secs])
    spans = w > 0.0
    x = np.zeros((len(secs), 2))
    ang, ext, top = [], [], []
    for p in pressures_kpa:
        n = p / 1000.0 * area_p                              # N (MPa * mm2)
        try:
            x = solve_sections(s, w, n, n * lever, e_mpa, start=x, bending=bending)
        except ArithmeticError:
            break
        lam = 1.0 + x[:, :1] + x[:, 1:] * s
        ang.append(float(np.degrees(x[:, 1].sum() * profile.dx_mm)))
        ext.append(float(x[:, 0].sum() * profile.dx_mm))
        top.append(float(lam[spans].max()))
    if bending:
        per = area_p * lever / np.where(inertia > 0, inertia, np.inf)   # k / (P / E) per mm
        gov = int(np.argmax(per))
    else:
        per = area_p / np.where(area_s > 0, area_s, np.inf)
        gov = int(np.argmax(per))
    lin_deg = float(np.degrees((area_p * lever / np.where(inertia > 0, inertia, np.inf)).sum()
                               * profile.dx_mm / (e_mpa * 1000.0)))
    lin_mm = float((area_p / np.where(area_s > 0, area_s, np.inf)).sum() * profile.dx_mm
                   / (e_mpa * 1000.0))
    return Solved(np.array(ang), np.array(ext), np.array(top), d, gov, float(lever[gov]),
                  float(inertia[gov]), lin_deg, lin_mm)


register(BeamBending())
