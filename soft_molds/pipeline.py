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
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import replace

from .analysis.integrity import check_mesh, require_ok
from .analysis.layered import LayeredMoldSet
from .errors import GeometryError, SoftMoldsError
from .meshdata import TriMesh
from .moldset import MoldSet, Part
from .plan import MoldPlan, PlaneScore, Role, plan_mold, with_openings, with_parting
from .plan.parting import candidate_planes, rank
from .plan.rules import first_rule_broken
from .recipe.model import Recipe


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
    from .analysis.casting import plan_casting
    from .analysis.context import CheckContext
    from .analysis.highpoints import plan_openings
    from .analysis.motion import predict_motion
    from .analysis.review import run_checks
    from .geometry import mold
    from .geometry.tessellate import tessellate_within

    if recipe.process.layered:
        raise ValueError(f"{recipe.name}: a layered recipe is built by build_layered")
    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg

    plan = plan_mold(recipe)
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

    solids = {"shell-lower": shells.lower, "shell-upper": shells.upper,
              **{sup.part: c for c, sup in zip(cs.cores, step.core_supports)},
              "cast": cs.cast}
    parts = []
    say("tessellate and check")
    for spec in step.parts:
        solid = solids[spec.name]
        with _stage(timings, "tessellate", label):
            vol = cs.volumes_mm3.get(spec.name) or float(solid.Volume())
            mesh = cast_mesh if spec.role is Role.CAST else tessellate_within(
                solid, chord, angle, spec.name, vol)
            report = check_mesh(mesh, spec.name, vol)
        require_ok(report, label)
        parts.append(Part(spec.name, str(spec.role), solid, mesh, vol, spec.pull_dir, report))
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        labels = tuple(x for x in (*shells.labels, *core_labels) if x is not None)
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
    from .analysis.integrity import check_mesh, require_ok
    from .analysis.layered import (
        LayerStep,
        is_chambered,
        least_post_draft_deg,
        pour_quantities,
    )
    from .analysis.layered_checks import layered_findings
    from .geometry.layered import build_layers
    from .geometry.tessellate import tessellate_within

    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg
    plan = plan_mold(recipe)
    say("layers")
    with _stage(timings, "layers", label):
        solids = build_layers(recipe, plan.steps)
    steps = []
    for i, step in enumerate(plan.steps, start=1):
        layer = step.layer
        assert layer is not None
        parts = []
        for spec in step.parts:
            solid = solids[step.name].parts[spec.name]
            with _stage(timings, "tessellate", label):
                vol = k_volume(solid)
                mesh = tessellate_within(solid, chord, angle, f"{step.name} {spec.name}", vol)
                report = check_mesh(mesh, f"{step.name} {spec.name}", vol)
            require_ok(report, label)
            parts.append(Part(spec.name, str(spec.role), solid, mesh, vol, spec.pull_dir,
                              report))
        cast = next(p for p in parts if p.role == Role.CAST)
        draft = (least_post_draft_deg(next(p for p in parts if p.name == "post-bridge"), layer)
                 if is_chambered(layer) else None)
        steps.append(LayerStep(i, step.name, layer, tuple(parts),
                               pour_quantities(recipe, cast.brep_volume_mm3), draft))
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        findings = worst_first(layered_findings(recipe, steps))
    return LayeredMoldSet(plan, tuple(steps), timings, findings)
