"""Plan stage: a validated recipe -> a typed, immutable :class:`MoldPlan` (the casting
steps, per step the parting plane with pull directions, inlets, core supports, the layout of
keys, clamp holes and notches, and, once the analysis stage has located the high points, the
sprue and vents). The geometry stage builds exactly what the plan says. No CAD kernel here.
"""

from __future__ import annotations

from dataclasses import replace

from ..errors import Problem, RecipeError
from ..recipe.model import Recipe
from .layout import Layout, block_band_mm, plan_layout
from .lines import line_finder
from .model import (
    CastingStep,
    ChosenBy,
    CoreSupport,
    Inlet,
    MoldPlan,
    Opening,
    OpeningKind,
    PartingPlane,
    PartPlan,
    PlaneScore,
    Role,
)
from .rules import frame_problems, parting_problems

__all__ = ["CastingStep", "ChosenBy", "CoreSupport", "Inlet", "Layout", "MoldPlan", "Opening",
           "OpeningKind", "PartPlan", "PartingPlane", "PlaneScore", "Role", "plan_mold",
           "plan_problems", "with_openings", "with_parting"]

#: The one pour of today's process.
ONE_SHOT_STEP = "silicone"
#: Wall left on each side of the core key pocket (mm), toward the cavity and outside.
KEY_LAND_MM = 1.5
#: How far the square key stands out beyond the round print on each side (mm).
KEY_SHOULDER_MM = 1.5


def plan_problems(r: Recipe) -> list[Problem]:
    """Every rule of the mold the recipe breaks (empty when it can be planned)."""
    line = line_finder(r.lines)
    out = frame_problems(r, line)
    if not r.parting.auto and not out:
        assert r.parting.offset_mm is not None
        out += parting_problems(r, r.parting.axis, r.parting.offset_mm, line)
    return out


def plan_mold(r: Recipe) -> MoldPlan:
    """The plan of ``r``'s one-shot mold; RecipeError listing every broken rule. With
    ``parting: auto`` the step's plane and layout stay open until :func:`with_parting`."""
    problems = plan_problems(r)
    if problems:
        raise RecipeError(problems, r.source or "recipe")
    inlet = Inlet(r.inlet.center_mm, r.inlet.socket_diameter_mm, r.inlet.socket_depth_mm)
    parting = None if r.parting.auto else PartingPlane(r.parting.axis,
                                                       float(r.parting.offset_mm or 0.0))
    layout = None if parting is None else plan_layout(r, parting.axis, parting.offset_mm)
    step = CastingStep(ONE_SHOT_STEP, (inlet,), (core_support(r, inlet),), parting, layout)
    return MoldPlan(r, r.params_sha256(), (step,))


def core_support(r: Recipe, inlet: Inlet) -> CoreSupport:
    """The core print through the block's inlet wall (x from -(wall + flange) to 0), standing
    out ``mold.core_handle_mm`` beyond it, with its square key centred in that wall."""
    wall_x = r.body_bounds()[0][0] - block_band_mm(r)
    cy, cz = inlet.center_mm
    key_len = min(6.0, -wall_x - 2 * KEY_LAND_MM)
    x0 = wall_x / 2.0 - key_len / 2.0
    half = inlet.socket_diameter_mm / 2.0 + KEY_SHOULDER_MM
    key = ((x0, cy - half, cz - half), (x0 + key_len, cy + half, cz + half))
    return CoreSupport(inlet, wall_x - r.mold.core_handle_mm, inlet.socket_depth_mm,
                       inlet.socket_diameter_mm / 2.0, key)


def with_parting(plan: MoldPlan, ranked: tuple[PlaneScore, ...]) -> MoldPlan:
    """The plan with the best of the analysis stage's ranked planes (best first) chosen: the
    step's plane and layout filled in, and the recipe carrying the plane."""
    from .parting import choose

    r = choose(plan.recipe, ranked)
    assert r.parting.offset_mm is not None
    plane = PartingPlane(r.parting.axis, r.parting.offset_mm, ChosenBy.ANALYSIS)
    step = replace(plan.step, parting=plane, candidates=ranked,
                   layout=plan_layout(r, plane.axis, plane.offset_mm))
    return plan.with_step(step, r)


def with_openings(plan: MoldPlan, openings: tuple[Opening, ...]) -> MoldPlan:
    """The plan with the sprue and vents the analysis stage located on the cast."""
    return plan.with_step(replace(plan.step, openings=tuple(openings)))
