"""Plan stage: a validated recipe -> a typed, immutable :class:`MoldPlan` (the casting
steps, per step the parting plane with pull directions, inlets, core supports, the layout of
keys, clamp holes and notches, and, once the analysis stage has located the high points, the
sprue and vents). The geometry stage builds exactly what the plan says. No CAD kernel here.
"""

from __future__ import annotations

from dataclasses import replace

from ..errors import Problem, RecipeError
from ..recipe.model import Recipe
from .groove import groove_problems
from .layout import Layout, plan_layout
from .lines import LineOf, line_finder
from .magnets import magnet_kind_problems, magnet_problems
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
from .processes import own_problems, steps_of
from .rules import (
    first_rule_broken,
    frame_problems,
    lost_core_problems,
    parting_problems,
    printer_problems,
    process_problems,
)

__all__ = ["CastingStep", "ChosenBy", "CoreSupport", "Inlet", "Layout", "MoldPlan", "Opening",
           "OpeningKind", "PartPlan", "PartingPlane", "PlaneScore", "Role", "plan_mold",
           "plan_problems", "with_openings", "with_parting"]

#: The process of a recipe without a ``process`` block.
DEFAULT_PROCESS = "one-shot"


def plan_problems(r: Recipe) -> list[Problem]:
    """Every rule of the mold the recipe breaks (empty when it can be planned)."""
    line = line_finder(r.lines)
    out = (process_problems(r, line) + frame_problems(r, line) + lost_core_problems(r, line)
           + magnet_kind_problems(r, line) + groove_problems(r, line))
    if out:
        return out
    if r.core.melted:
        from .processes.melted_core import melted_problems

        melted = melted_problems(r, line)
        if melted:
            return melted
    own = own_problems(r.process.kind)
    if own is not None:
        return own(r, line)
    if len(r.inlets) > 1:
        from .processes.one_shot import print_problems

        prints = print_problems(r, line)
        if prints:
            return prints
    if r.core.magnets:
        from .processes.one_shot import steps

        # The key is square across the inlet axis: its walls are the same for either
        # parting axis, so an automatic parting is checked on z.
        axis = "z" if r.parting.auto else r.parting.axis
        pockets = magnet_problems(r, steps(r)[0].core_supports, PartingPlane(axis, 0.0), line)
        if pockets:
            return pockets
    if not r.parting.auto:
        assert r.parting.offset_mm is not None
        return parting_problems(r, r.parting.axis, r.parting.offset_mm, line)
    # parting: auto is chosen after the build, but a block that fits the printer on
    # neither cross axis is known now.
    cy, cz = r.inlet.center_mm
    misfits = [printer_problems(r, plan_layout(r, ax, off), line)
               for ax, off in (("y", cy), ("z", cz))]
    if all(misfits):
        return misfits[0]
    return auto_parting_problems(r, line)


def auto_parting_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """``parting: auto`` can only choose among the candidate planes that keep the rules of
    the mold (these are numbers, known before anything is built): when none does, the
    recipe is refused now, with the rules the plane through the socket breaks."""
    from .parting import candidate_planes

    planes = candidate_planes(r)
    if any(first_rule_broken(r, ax, off) is None for ax, off in planes):
        return []
    if not planes:  # several sockets that no one plane runs through
        ys = ", ".join(f"({i.center_mm[0]:g}, {i.center_mm[1]:g})" for i in r.inlets)
        return [Problem("parting.axis", "auto finds no plane through every socket centre "
                        f"(y, z) = {ys} mm: each core print must seat in both shells",
                        line("parting.axis"), "auto",
                        "sockets that share a y or a z (put both sockets at the same z, or "
                        "at the same y), or a parting axis and offset of your own")]
    ax, off = planes[0]
    head = Problem("parting.axis", f"auto finds no candidate plane that keeps the rules of "
                   f"the mold ({len(planes)} tried); the plane through the socket, {ax} = "
                   f"{off:g} mm, breaks those below", line("parting.axis"), "auto",
                   "a recipe with room for the mold's features on some plane, or a "
                   "parting axis and offset of your own")
    return [head, *parting_problems(r, ax, off, line)]


def plan_mold(r: Recipe) -> MoldPlan:
    """The plan of ``r``: the steps of its casting process; RecipeError listing every broken
    rule of the mold. With ``parting: auto`` the step's plane and layout stay open until
    :func:`with_parting`."""
    problems = plan_problems(r)
    if problems:
        raise RecipeError(problems, r.source or "recipe")
    from .processes.melted_core import process_of

    return MoldPlan(r, r.params_sha256(), steps_of(process_of(r), r))


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
