"""Motion model ``axial-extending``: a body whose pressure acts on its axis (a centred
bore, a bellows, chambers centred in a rod) lengthens as a bar in tension.

Assumptions (estimates for choosing a variant, not a calibration):

- The free body beyond a cut at x carries the axial force P A_p(x) (the void's undeformed
  area at that section), spread evenly over the silicone there: every fibre at the same
  stretch l solving (E/3)(l - 1/l^2) A_s = P A_p (incompressible neo-Hookean, uniaxial
  nominal stress; Treloar 1975), which at small pressure is the linear bar,
  l - 1 = P A_p / (E A_s). The extension is the integral of l - 1 over the active length.
- The stresses across the axis (the pressure on the bore's wall, hoop and radial) are
  left out. For a plain round bore this overstates the extension: in linear elasticity an
  incompressible closed thick tube does not lengthen at all (Lame's solution with
  Poisson's ratio 1/2), its lengthening is a large-stretch effect. The figure is the
  extension of a bore whose wall is held from swelling (a hoop-reinforced tube); it is an
  upper estimate for an unreinforced one.
- A bellows is treated by its wall's cross-section like any other section: the folding of
  its pleats, which dominates a real bellows' stroke, is not modelled (a lower estimate).
- No bending (the pressure's offset from the neutral axis is below the bending model's
  threshold); gravity, the tube and first-inflation softening are left out.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .bending import solve_beam
from .model import MotionKind
from .registry import Profile, Solved, register


@dataclass(frozen=True)
class AxialExtending:
    name: str = "axial-extending"
    kind: MotionKind = MotionKind.EXTENDING
    order: int = 900

    def applies(self, profile: Profile) -> bool:
        return any(s.void_area_mm2 > 0.0 for s in profile.sections)

    def solve(self, profile: Profile, e_mpa: float, pressures_kpa: np.ndarray) -> Solved:
        return solve_beam(profile, e_mpa, pressures_kpa, bending=False)


register(AxialExtending())
