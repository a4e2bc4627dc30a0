"""How each variant is predicted to move when inflated: bend angle or extension against
pressure, from the cast's own cross-sections and the silicone's modulus.

:func:`predict_motion` cuts the cast mesh into sections along x over the pressurised
length (past the tube socket to the voids' far end; :mod:`.sections`), hands them to the
first registered motion model that applies (:mod:`.registry`: ``beam-bending`` for
chambers or a bore off the neutral axis, ``axial-extending`` otherwise; each module
states its assumptions) and steps the pressure from zero to the lowest balloon limit the
pressure check found (:mod:`soft_molds.analysis.pressure`), or to the pressure at which a
fibre would reach the grade's elongation at break, whichever comes first; the curve stops
and says so there. An estimate for comparing variants, not a rating: defer to a test on
the cast part.

How far off it is, against finite-element solutions kept in the tests (never in the
build): on a long channel loaded on its end wall the beam reduction matches 3-D linear
elasticity to 0.1 % (tests/analysis/test_motion_fe.py). On the seedling finger's body
(its bar and chambers, without roundings or feed channel) with the pressure on every
chamber wall, the small-pressure angle is 7 % above a linear 3-D solution
(tests/bench/bench_motion_fe.py: 0.275 against 0.256 deg at 1 kPa). On the finger's
longitudinal section in plane stress, incompressible neo-Hookean, the pressure a follower
load, up to 60 kPa (tests/analysis/test_motion_nonlinear_fe.py), the model gives 72 % of
the FE angle at 5 kPa, 64 % at 30 kPa, 52 % at half the balloon limit (48 kPa), 42 % at
60 kPa: a section without side walls lets each chamber's end faces bulge apart (the walls
between chambers are not the rigid plates the beam takes them for), and the chambers
swell as the pressure rises, which the model, keeping each section's undeformed void,
leaves out. The cast at large pressure in 3-D was not computed. No published measurement
with usable geometry and material was at hand to compare against.

Units: kPa, degrees, mm, MPa. Frame: world (x the long axis).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from soft_molds.meshdata import TriMesh
from soft_molds.recipe.contracts import bounds_of
from soft_molds.recipe.model import Recipe
from soft_molds.recipe.primitives import union_sdf

from ..pressure import WallPressure
from .model import MotionCurve, MotionInputs, MotionKind, MotionPoint, StopReason
from .registry import Profile, model_for
from .sections import cut_sections

__all__ = ["MotionCurve", "MotionInputs", "MotionKind", "MotionPoint", "StopReason",
           "motion_curve", "predict_motion", "profile_of"]

SECTION_SPACING_MM = 0.25
"""Target slice thickness along x: chamber walls of about 1 mm get several sections."""

STEPS = 40
"""Pressure steps from zero to the end of the curve (the working pressure is added)."""

NO_LIMIT_FACTOR = 2.0
"""With no balloon limit known, the curve runs to this multiple of the working pressure
(or to DEFAULT_RANGE_KPA without one)."""
DEFAULT_RANGE_KPA = 100.0


def pressurised(r: Recipe) -> tuple[int, ...]:
    """Indices of the voids inflated for the curve: every void; with several sockets, the
    voids fed through the first (``inlets[0]``), the others left open to the air. A
    two-way finger's rows are inflated one at a time, never together."""
    if len(r.inlets) == 1:
        return tuple(range(len(r.voids)))
    from soft_molds.recipe.feeds import core_groups

    return core_groups(r)[0].voids


def void_facet_mask(r: Recipe, mesh: TriMesh) -> np.ndarray:
    """Facets of ``mesh`` on the surface of a pressurised void (:func:`pressurised`) or its
    tube socket (the recipe primitives' exact distance functions, within the tolerance the
    checks use). An unpressurised void's facets count as the silicone's outline."""
    voids = r.void_primitives()
    prims = tuple(p for i in pressurised(r) for p in voids[i]) + r.sockets()[:1] \
        if len(r.inlets) > 1 else tuple(p for group in voids for p in group) + r.sockets()
    tol = min(0.1, r.checks.min_wall_mm / 3.0)
    return np.abs(union_sdf(prims, mesh.triangles().mean(axis=1))) <= tol


def profile_of(mesh: TriMesh, void_facets: np.ndarray, from_mm: float, to_mm: float,
               void_kinds: Sequence[str], spacing_mm: float = SECTION_SPACING_MM,
               sheet_yz_mm: tuple[float, float] | None = None) -> Profile:
    """Sections of ``mesh`` at the middles of equal slices of [from_mm, to_mm]."""
    count = max(int(np.ceil((to_mm - from_mm) / spacing_mm)), 1)
    dx = (to_mm - from_mm) / count
    xs = from_mm + dx * (np.arange(count) + 0.5)
    return Profile(cut_sections(mesh, xs, void_facets), dx, from_mm, to_mm,
                   tuple(void_kinds), sheet_yz_mm)


def predict_motion(r: Recipe, cast: TriMesh, walls: Sequence[WallPressure],
                   sheet_yz_mm: tuple[float, float] | None = None) -> MotionCurve | None:
    """The motion curve of the cast ``cast`` of recipe ``r`` (None when the silicone's
    modulus is unknown, the body has no long axis, or no model applies); with several
    sockets, for the voids fed through the first inflated alone (:func:`pressurised`).
    ``walls``: the pressure check's
    weakest wall per group (their lowest limit ends the curve). ``sheet_yz_mm``: a point
    (y, z) of a strain-limiting sheet bonded flat in the cast (a layered finger's), or
    None."""
    e = r.material.silicone.youngs_modulus_mpa()
    # A body without a long axis (a ring) is no beam along x: no model applies (the
    # ``motion`` check's note says so); nor does one to voids without one (a channel
    # network whose arms turn away from x).
    if e is None or not r.voids or not getattr(type(r.body), "LONG_AXIS", True):
        return None
    if not all(getattr(type(v), "LONG_AXIS", True) for v in r.voids):
        return None
    voids = r.void_primitives()
    lo, hi = bounds_of(tuple(p for i in pressurised(r) for p in voids[i]))
    # The pressurised length lies between the start face's sockets and the end face's.
    start = max([float(lo[0])] + [i.socket_depth_mm for i in r.inlets if not i.at_end])
    end = min([float(hi[0])] + [r.body_length_mm - i.socket_depth_mm
                                for i in r.inlets if i.at_end])
    if end <= start:
        return None
    prof = profile_of(cast, void_facet_mask(r, cast), start, end,
                      [type(r.voids[i]).KIND for i in pressurised(r)], sheet_yz_mm=sheet_yz_mm)
    limits = [w.limit_kpa for w in walls if w.limit_kpa is not None]
    return motion_curve(prof, e, min(limits) if limits else None,
                        r.inflate.working_pressure_kpa,
                        1.0 + r.material.elongation_at_break_pct / 100.0)


def motion_curve(prof: Profile, e_mpa: float, limit_kpa: float | None,
                 working_kpa: float | None, break_stretch: float | None = None,
                 steps: int = STEPS) -> MotionCurve | None:
    """The curve of the first model that applies to ``prof`` (module docstring)."""
    model = model_for(prof)
    if model is None:
        return None
    if limit_kpa is not None:
        end, stop = limit_kpa, StopReason.BALLOON_LIMIT
    else:
        end = NO_LIMIT_FACTOR * working_kpa if working_kpa else DEFAULT_RANGE_KPA
        stop = StopReason.RANGE_END
    ps = np.linspace(0.0, end, steps + 1)
    if working_kpa is not None and 0.0 < working_kpa < end:
        ps = np.unique(np.append(ps, working_kpa))
    sol = model.solve(prof, e_mpa, ps)
    keep = len(sol.angle_deg)
    if keep < len(ps):
        stop = StopReason.NO_EQUILIBRIUM
    if break_stretch is not None and (sol.max_stretch[:keep] > break_stretch).any():
        keep = int(np.argmax(sol.max_stretch > break_stretch))
        stop = StopReason.BREAK_STRETCH
    pts = tuple(MotionPoint(float(p), float(a), float(x), float(m)) for p, a, x, m in
                zip(ps[:keep], sol.angle_deg[:keep], sol.extension_mm[:keep],
                    sol.max_stretch[:keep], strict=True))
    valid_to = pts[-1].pressure_kpa if pts else 0.0
    at_work = next((q for q in pts if working_kpa is not None
                    and q.pressure_kpa == working_kpa), None)
    g = prof.sections[sol.governing]
    inputs = MotionInputs(e_mpa, prof.from_mm, prof.to_mm, len(prof.sections), sol.bend_dir,
                          g.x_mm, g.silicone_area_mm2, sol.second_moment_mm4,
                          g.void_area_mm2, sol.lever_arm_mm)
    return MotionCurve(model.name, model.kind, inputs, pts, valid_to, stop, limit_kpa,
                       sol.linear_deg_per_kpa, sol.linear_mm_per_kpa, working_kpa, at_work)
