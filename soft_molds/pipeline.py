"""The one place that runs the stages in order: recipe -> plan -> geometry -> analysis ->
export.

Stages never import each other backwards; this module hands each one what the previous
produced. The plan is completed in two places by what analysis measured on the built cast:
the parting plane (``parting: auto``: candidates scored on the cast and core) and the sprue
and vents (located at the cast's high points); the geometry stage then builds the shells
exactly as the completed plan says.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Iterator, Mapping
from contextlib import contextmanager
from dataclasses import replace
from typing import TYPE_CHECKING, Any

from .analysis.integrity import check_mesh, require_ok
from .analysis.layered import LayeredMoldSet
from .analysis.melted import MeltedMoldSet
from .analysis.overmold import OvermoldMoldSet
from .errors import GeometryError, RecipeError, SoftMoldsError
from .meshdata import TriMesh
from .moldset import MoldSet, Part
from .plan import (
    MoldPlan,
    Opening,
    PartPlan,
    PlaneScore,
    Role,
    plan_mold,
    with_openings,
    with_parting,
)
from .plan.parting import candidate_planes, rank
from .plan.rules import first_rule_broken
from .recipe.model import Recipe

if TYPE_CHECKING:
    from .geometry.layered import LayerSolids

Box = tuple[tuple[float, float, float], tuple[float, float, float]]

#: What a multi-step build returns: its ``steps`` (each with ``index``, ``name``, ``parts``,
#: ``pour`` and ``folder``), ``findings`` and ``recipe``.
StepwiseMoldSet = LayeredMoldSet | OvermoldMoldSet | MeltedMoldSet


@contextmanager
def _stage(timings: dict[str, float], name: str, label: str) -> Iterator[None]:
    t = time.perf_counter()
    try:
        yield
    except GeometryError as exc:
        raise exc.with_variant(label) from exc
    except SoftMoldsError:
        raise
    except Exception as exc:  # a kernel exception with no useful type: name the step
        raise GeometryError(name, f"{type(exc).__name__}: {exc}", variant=label) from exc
    finally:
        timings[name] = timings.get(name, 0.0) + time.perf_counter() - t


def build(recipe: Recipe, progress: Callable[[str], None] | None = None) -> MoldSet:
    """Plan, build, tessellate and check every part of the mold set for ``recipe``.

    Raises :class:`RecipeError` when the recipe breaks a rule of the mold (nothing is built),
    :class:`GeometryError` naming the variant and step when the kernel fails, and
    :class:`MeshIntegrityError` when a part's mesh is not a closed, consistent volume within
    0.5 % of its BRep volume.
    """
    if recipe.multi_step:
        raise ValueError(f"{recipe.name}: a recipe cast in steps ({recipe.process.kind}, "
                         f"core {recipe.core.kind}) is built by build_steps")
    return _build_one_shot(plan_mold(recipe), progress)


def _build_one_shot(plan: MoldPlan, progress: Callable[[str], None] | None = None
                    ) -> MoldSet:
    """The one-shot mold set of a plan of one step (see :func:`build`)."""
    from .analysis.casting import plan_casting
    from .analysis.context import CheckContext
    from .analysis.highpoints import plan_openings
    from .analysis.motion import predict_motion
    from .analysis.review import run_checks
    from .geometry import mold
    from .geometry.tessellate import tessellate_within

    recipe = plan.recipe
    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg

    say("body")
    with _stage(timings, "body", label):
        body = mold.build_body(recipe)
    say("voids and core")
    with _stage(timings, "core", label):
        cs = mold.build_cast(recipe, plan.step, body)
    with _stage(timings, "tessellate", label):
        cast_mesh = tessellate_within(cs.cast, chord, angle, "cast", cs.volumes_mm3["cast"])
    if plan.step.parting is None:
        say("parting plane")
        with _stage(timings, "tessellate", label):
            bare_cores = [tessellate_within(core, chord, angle, sup.part,
                                            cs.volumes_mm3[sup.part])
                          for core, sup in zip(cs.cores, plan.step.core_supports)]
        with _stage(timings, "analysis", label):
            plan = with_parting(plan, _ranked_planes(plan, cast_mesh, bare_cores))
    recipe, step = plan.recipe, plan.step
    say("labels")
    with _stage(timings, "labels", label):
        labelled = [mold.label_core(recipe, step, core, sup)
                    for core, sup in zip(cs.cores, step.core_supports)]
        core_labels = tuple(lab for _, lab in labelled)
        cs = replace(cs, cores=tuple(c for c, _ in labelled),
                     volumes_mm3=dict(cs.volumes_mm3, **{
                         sup.part: k_volume(c) for (c, _), sup in zip(labelled,
                                                                      step.core_supports)}))
    up = step.settled_parting.up
    say("sprue and vents")
    with _stage(timings, "features", label):
        plan = with_openings(plan, plan_openings(cast_mesh, up,
                                                 recipe.mold.sprue_diameter_mm / 2.0,
                                                 recipe.mold.vent_diameter_mm / 2.0))
        step = plan.step
    say("shell parts")
    with _stage(timings, "shell", label):
        shells = mold.build_shells(recipe, step, cs)

    with _stage(timings, "labels", label):
        plates, plate_labels = mold.label_plates(recipe, step, mold.build_plates(step))
    solids = {"shell-lower": shells.lower, "shell-upper": shells.upper,
              **{sup.part: c for c, sup in zip(cs.cores, step.core_supports)},
              **{g.part: c for c, g in zip(plates, step.plates)},
              "cast": cs.cast}
    say("tessellate and check")
    parts = meshed_parts(recipe, step.parts, solids, cs.volumes_mm3, cast_mesh, "", timings,
                         measure=lambda solid: float(solid.Volume()))
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        labels = tuple(x for x in (*shells.labels, *core_labels, *plate_labels)
                       if x is not None)
        rev = run_checks(CheckContext.for_step(
            plan, cast_mesh, {p.name: (p.mesh, p.pull_dir) for p in parts if p.role != "cast"},
            {lab.part: [lab.box] for lab in labels}))
        volumes = dict(cs.volumes_mm3, fill=shells.fill_volume_mm3)
        casting = plan_casting(recipe, volumes["cast"], volumes["fill"],
                               [(p.name, p.mesh, p.brep_volume_mm3) for p in parts
                                if p.role != "cast"])
    say("motion")
    with _stage(timings, "motion", label):
        motion = predict_motion(recipe, cast_mesh, rev.pressures)
    return MoldSet(plan, tuple(parts), volumes, shells.funnel_diameter_mm, timings, rev,
                   casting, labels, motion)


def meshed_parts(recipe: Recipe, specs: tuple[PartPlan, ...], solids: Mapping[str, Any],
                 known_mm3: Mapping[str, float], cast_mesh: TriMesh | None, prefix: str,
                 timings: dict[str, float], measure: Callable[[Any], float] | None = None
                 ) -> list[Part]:
    """The parts ``specs`` names, in order: each solid's volume (mm3: ``known_mm3`` by part
    name, else measured on the solid, by :func:`k_volume` unless ``measure`` is given), its
    mesh within the recipe's chord and angle (the cast's ``cast_mesh`` when given, already
    made), checked against that volume under the name ``prefix + name``."""
    from .geometry.tessellate import tessellate_within

    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg
    parts = []
    for spec in specs:
        solid, name = solids[spec.name], prefix + spec.name
        with _stage(timings, "tessellate", recipe.label):
            vol = known_mm3.get(spec.name) or (measure or k_volume)(solid)
            mesh = (cast_mesh if cast_mesh is not None and spec.role is Role.CAST
                    else tessellate_within(solid, chord, angle, name, vol))
            report = check_mesh(mesh, name, vol)
        require_ok(report, recipe.label)
        parts.append(Part(spec.name, str(spec.role), solid, mesh, vol, spec.pull_dir, report))
    return parts


def k_volume(shape: object) -> float:
    from .geometry.kernel import volume

    return volume(shape)  # type: ignore[arg-type]


def _ranked_planes(plan: MoldPlan, cast_mesh: TriMesh, core_meshes: list[TriMesh]
                   ) -> tuple[PlaneScore, ...]:
    """Every candidate plane of the plan scored on the cast and bare cores (as one mesh),
    best first."""
    from .analysis.context import core_print_facets, void_facets
    from .analysis.demold import Surface
    from .analysis.parting_scores import score_planes
    from .analysis.trapped_air import combine

    r = plan.recipe
    cast_s = Surface(cast_mesh)
    core_s = Surface(core_meshes[0] if len(core_meshes) == 1 else combine(core_meshes))
    sup = plan.step.core_supports[0]
    block_lo_x = sup.start_x_mm + r.mold.core_handle_mm if sup.outward < 0 else \
        -(r.mold.wall_mm + r.mold.flange_mm)
    ends = r.body_length_mm if any(i.at_end for i in r.inlets) else None
    scores = score_planes(cast_s, ~void_facets(r, cast_s), core_s,
                          core_print_facets(core_s, block_lo_x, ends),
                          candidate_planes(r),
                          lambda ax, off: first_rule_broken(r, ax, off),
                          r.checks.min_draft_deg)
    return tuple(rank(scores))


def build_layered(recipe: Recipe, progress: Callable[[str], None] | None = None
                  ) -> LayeredMoldSet:
    """Plan, build, tessellate and check both steps of a layered recipe (see
    :mod:`soft_molds.plan.processes.layered`). Raises like :func:`build`."""
    from .analysis.findings import worst_first
    from .analysis.layered import (
        LayerStep,
        is_chambered,
        least_post_draft_deg,
        pour_quantities,
    )
    from .analysis.layered_checks import layered_findings, print_plans, recipe_printer
    from .analysis.motion import predict_motion
    from .analysis.pressure import pressure_findings, wall_pressures
    from .geometry.layered import build_layers

    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    plan = plan_mold(recipe)
    say("layers")
    with _stage(timings, "layers", label):
        solids = build_layers(recipe, plan.steps)
    steps = []
    for i, step in enumerate(plan.steps, start=1):
        layer = step.layer
        assert layer is not None
        parts = meshed_parts(recipe, step.parts, solids[step.name].parts, {}, None,
                             f"{step.name} ", timings)
        cast = next(p for p in parts if p.role == Role.CAST)
        draft = (least_post_draft_deg(next(p for p in parts if p.name == "post-bridge"), layer)
                 if is_chambered(layer) else None)
        steps.append(LayerStep(i, step.name, layer, tuple(parts),
                               pour_quantities(recipe, cast.brep_volume_mm3), draft,
                               solids[step.name].label_boxes))
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        printer = recipe_printer(recipe)
        plans = tuple(print_plans(s, printer, s.label_boxes) for s in steps)
        e_mpa, walls = wall_pressures(recipe)
        findings = worst_first((*layered_findings(recipe, steps, plans),
                                *pressure_findings(recipe, e_mpa, walls)))
    say("motion")
    with _stage(timings, "motion", label):
        motion = predict_motion(recipe, _actuator_mesh(recipe, solids), walls,
                                _sheet_point(plan))
    return LayeredMoldSet(plan, tuple(steps), timings, findings, plans, motion)


def _actuator_mesh(recipe: Recipe, solids: dict[str, LayerSolids]) -> TriMesh:
    """The finished layered actuator (actuator frame), meshed as the casts are."""
    from .geometry.layered import assembled_actuator
    from .geometry.tessellate import tessellate_within

    solid = assembled_actuator(solids)
    return tessellate_within(solid, recipe.mesh.chord_mm, recipe.mesh.angle_deg, "actuator",
                             k_volume(solid))


def _sheet_point(plan: MoldPlan) -> tuple[float, float] | None:
    """A point (y, z) of the strain-limiting sheet, which lies on the bond face across the
    footprint, or None without a sheet."""
    for step in plan.steps:
        layer = step.layer
        if layer is not None and layer.sheet_inset_mm is not None:
            return float(layer.footprint.center_mm[1]), float(layer.bond_z_mm)
    return None


def build_overmold(recipe: Recipe, progress: Callable[[str], None] | None = None
                   ) -> OvermoldMoldSet:
    """Plan, build, tessellate and check both steps of an overmold recipe (see
    :mod:`soft_molds.plan.processes.overmold`). Raises like :func:`build`."""
    from .analysis.findings import worst_first
    from .analysis.highpoints import plan_openings
    from .analysis.layered_checks import print_plans, recipe_printer
    from .analysis.overmold import (
        OvermoldStep,
        arc_centre_yz,
        axis_yz_mm,
        pour_quantities,
        radial_extent_mm,
        releases,
        sheet_cover_mm,
        skin_over_half_round_mm,
        thread_plan,
    )
    from .analysis.overmold_checks import overmold_findings
    from .geometry import overmold as g
    from .geometry.tessellate import tessellate_within

    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg
    plan = plan_mold(recipe)
    first, second = plan.steps
    assert first.overmold is not None and second.overmold is not None
    say("bladder, core and skin")
    with _stage(timings, "casts", label):
        casts = g.build_casts(first.overmold, second.overmold)
    cavities = {first.name: casts.outside, second.name: casts.skin_cavity}
    step_casts = {first.name: casts.bladder, second.name: casts.skin}
    steps = []
    for i, step in enumerate(plan.steps, start=1):
        om = step.overmold
        assert om is not None
        cast = step_casts[step.name]
        with _stage(timings, "tessellate", label):
            vol = k_volume(cast)
            cast_mesh = tessellate_within(cast, chord, angle, f"{step.name} cast", vol)
        say(f"{step.name}: sprue, vents and shells")
        with _stage(timings, "features", label):
            plan = with_openings_of(plan, step.name, plan_openings(
                cast_mesh, step.settled_parting.up, recipe.mold.sprue_diameter_mm / 2.0,
                recipe.mold.vent_diameter_mm / 2.0))
            step = next(s for s in plan.steps if s.name == step.name)
        with _stage(timings, "shell", label):
            shells = g.build_shells(om, cavities[step.name], casts.core, step.openings)
        solids = {"shell-lower": shells.lower, "shell-upper": shells.upper,
                  "core": casts.core, "cast": cast}
        parts = meshed_parts(recipe, step.parts, solids, {"cast": vol}, cast_mesh,
                             f"{step.name} ", timings)
        with _stage(timings, "analysis", label):
            rel = releases([p for p in parts if p.role != Role.CAST], cast_mesh)
        steps.append(OvermoldStep(i, step.name, om, tuple(parts),
                                  pour_quantities(recipe, vol, shells.fill_volume_mm3),
                                  step.openings, rel))
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        bladder_mesh = steps[0].part("cast").mesh
        skin_mesh = steps[1].part("cast").mesh
        bl = first.overmold.bladder
        skin_r = second.overmold.cavity_radius_mm
        # The bore's surface of the bladder against the skin cavity's wall.
        if bl.half_round:
            by, bz = arc_centre_yz(bladder_mesh, bl.bore_radius_mm - 0.05,
                                   bl.bore_radius_mm + 0.05, bl.wall_mm + 0.1)
            sy, sz = arc_centre_yz(skin_mesh, skin_r - 0.05, skin_r + 0.05, 0.1)
        else:
            by, bz = axis_yz_mm(bladder_mesh, 0.0,
                                (bl.bore_radius_mm + bl.outer_radius_mm) / 2)
            sy, sz = axis_yz_mm(skin_mesh, skin_r - 0.25 * (skin_r - bl.crest_radius_mm),
                                skin_r + 1.0)
        offset = float(((by - sy) ** 2 + (bz - sz) ** 2) ** 0.5)
        thread_mm = recipe.process.thread_diameter_mm
        if bl.half_round:
            over = skin_over_half_round_mm(skin_mesh, bladder_mesh, bl.outer_radius_mm,
                                           thread_mm)
        else:
            over = radial_extent_mm(skin_mesh) - max(radial_extent_mm(bladder_mesh),
                                                     bl.outer_radius_mm + thread_mm)
        sheet = second.overmold.sheet
        cover = None if sheet is None else sheet_cover_mm(sheet, skin_mesh)
        thread = thread_plan(recipe, bl)
        printer = recipe_printer(recipe)
        plans = tuple(print_plans(s, printer) for s in steps)
        findings = worst_first(overmold_findings(recipe, steps, over, offset, thread, plans,
                                                 cover))
    return OvermoldMoldSet(plan, tuple(steps), thread, over, offset, timings, findings, plans,
                           cover)


def with_openings_of(plan: MoldPlan, step_name: str, openings: tuple[Opening, ...]
                     ) -> MoldPlan:
    """The plan with the openings the analysis stage located on one step's cast."""
    step = next(s for s in plan.steps if s.name == step_name)
    return plan.with_step(replace(step, openings=tuple(openings)))


def build_melted(recipe: Recipe, progress: Callable[[str], None] | None = None
                 ) -> MeltedMoldSet:
    """Plan, build, tessellate and check both steps of a melted-core recipe (see
    :mod:`soft_molds.plan.processes.melted_core`): the silicone step first (the one-shot
    build, whose core is the core mold's cavity), then the core mold around that core.
    Raises like :func:`build`."""
    from .analysis.findings import worst_first
    from .analysis.highpoints import plan_openings
    from .analysis.layered_checks import part_name, printing_findings, recipe_printer
    from .analysis.melted import (
        CoreMoldStep,
        SiliconeStep,
        core_mold_findings,
        core_quantities,
    )
    from .analysis.overmold import releases
    from .analysis.printability import plan_print
    from .geometry import mold
    from .plan.layout import layout_problems, plan_layout
    from .plan.processes.melted_core import core_bounds
    from .plan.rules import printer_problems

    say = progress or (lambda _msg: None)
    label = recipe.label
    plan = plan_mold(recipe)
    core_step, pour = plan.steps
    cm = core_step.core_mold
    assert cm is not None
    say(f"{pour.name}: the one-shot mold around the core")
    silicone = _build_one_shot(replace(plan, steps=(pour,)), progress)
    timings = dict(silicone.timings_s)
    recipe = silicone.recipe  # with a chosen parting plane
    core = silicone.part(cm.core_part)
    parting = silicone.plan.step.settled_parting
    lay = plan_layout(recipe, parting.axis, parting.offset_mm,
                      core_bounds(recipe, silicone.plan.step, parting))
    # Known before the build when the recipe fixes its plane (the plan refused it then);
    # a plane chosen by the analysis is known only now.
    found = layout_problems(recipe, lay, lambda _p: None) + printer_problems(
        recipe, lay, lambda _p: None)
    if found:
        raise RecipeError(found, recipe.source or "recipe")
    step = replace(core_step, parting=parting, layout=lay)
    say(f"{step.name}: sprue, vents and shells")
    with _stage(timings, "features", label):
        step = replace(step, openings=plan_openings(core.mesh, parting.up,
                                                    recipe.mold.sprue_diameter_mm / 2.0,
                                                    recipe.mold.vent_diameter_mm / 2.0,
                                                    narrow_sprue=True))
    vol = core.brep_volume_mm3
    cast = mold.CastSolids(core.brep, (), core.brep,
                           {"body": vol, "void_set": 0.0, "cast": vol})
    with _stage(timings, "shell", label):
        shells = mold.build_shells(recipe, step, cast)
    solids = {"shell-lower": shells.lower, "shell-upper": shells.upper, "cast": core.brep}
    parts = meshed_parts(recipe, step.parts, solids, {"cast": vol}, core.mesh,
                         f"{step.name} ", timings)
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        rel = releases([p for p in parts if p.role != Role.CAST], core.mesh)
        first = CoreMoldStep(1, step.name, cm, tuple(parts),
                             core_quantities(recipe, vol, shells.fill_volume_mm3),
                             step.openings, rel, shells.fill_volume_mm3)
        printer = recipe_printer(recipe)
        # The label cut into the core's grip tab stands as ribs in the upper shell's cavity:
        # thin like any label's, and skipped by the wall check like them.
        boxes: dict[str, list[Box]] = {}
        for lab in shells.labels:
            boxes.setdefault(lab.part, []).append(lab.box)
        for lab in silicone.labels:
            if lab.part == cm.core_part:
                boxes.setdefault("shell-upper", []).append(lab.box)
        plans = ({p.name: plan_print(p.mesh, part_name(first, p.name), printer,
                                     ignore_boxes=boxes.get(p.name, ()))
                  for p in parts if p.role != Role.CAST},)
        findings = worst_first((*printing_findings(plans[0], printer),
                                *core_mold_findings(first),
                                *(replace(f, part=f"{pour.name} {f.part}")
                                  for f in silicone.findings)))
    done = replace(plan, recipe=recipe, steps=(step, silicone.plan.step))
    return MeltedMoldSet(done, (first, SiliconeStep(2, pour.name, silicone)), timings,
                         findings, plans)


def build_steps(recipe: Recipe, progress: Callable[[str], None] | None = None
                ) -> StepwiseMoldSet:
    """Build a recipe cast in steps (``Recipe.multi_step``: a multi-step process or a
    melted core) by its kind."""
    if recipe.core.melted:
        return build_melted(recipe, progress)
    if recipe.process.layered:
        return build_layered(recipe, progress)
    if recipe.process.kind == "overmold":
        return build_overmold(recipe, progress)
    raise ValueError(f"{recipe.name}: process {recipe.process.kind!r} is built by build")
