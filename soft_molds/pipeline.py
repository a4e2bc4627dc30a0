"""The one place that runs the stages in order: recipe -> geometry -> analysis -> export.

Stages never import each other backwards; this module hands each one the numbers the
previous produced (for instance, the analysis stage plans the sprue and vents on the cast
part's mesh, and the geometry stage then cuts them into the upper shell).
"""

from __future__ import annotations

import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import replace
from typing import Any

from .analysis.integrity import check_mesh, require_ok
from .errors import GeometryError, SoftMoldsError
from .meshdata import TriMesh
from .moldset import MoldSet, Part, pour_up
from .recipe.layout import plan_layout
from .recipe.model import Parting, Recipe


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
    """Build, tessellate and check every part of the mold set for ``recipe``.

    Raises :class:`GeometryError` naming the variant and step when the kernel fails, and
    :class:`MeshIntegrityError` when a part's mesh is not a closed, consistent volume within
    0.5 % of its BRep volume.
    """
    from .analysis.casting import plan_casting
    from .analysis.highpoints import plan_openings
    from .analysis.review import review
    from .geometry import mold
    from .geometry.tessellate import tessellate

    say = progress or (lambda _msg: None)
    timings: dict[str, float] = {}
    label = recipe.label
    chord, angle = recipe.mesh.chord_mm, recipe.mesh.angle_deg

    source_hash = recipe.params_sha256()
    say("body")
    with _stage(timings, "body", label):
        body = mold.build_body(recipe)
    say("voids and core")
    with _stage(timings, "core", label):
        cs = mold.build_cast(recipe, body)
    with _stage(timings, "tessellate", label):
        cast_mesh = tessellate(cs.cast, chord, angle, "cast")
    candidates: tuple[Any, ...] = ()
    if recipe.parting.auto:
        say("parting plane")
        with _stage(timings, "tessellate", label):
            bare_core = tessellate(cs.core, chord, angle, "core")
        with _stage(timings, "analysis", label):
            recipe, candidates = _choose_parting(recipe, cast_mesh, bare_core, cs)
        cs = replace(cs, layout=plan_layout(recipe))
    say("labels")
    with _stage(timings, "labels", label):
        core, core_label = mold.label_core(recipe, cs.layout, cs.core)
        cs = replace(cs, core=core, volumes_mm3=dict(cs.volumes_mm3, core=k_volume(core)))
    up = tuple(pour_up(recipe))
    down = tuple(-c + 0.0 for c in up)  # + 0.0: no -0.0 in the manifest
    say("sprue and vents")
    with _stage(timings, "features", label):
        openings = plan_openings(cast_mesh, up, recipe.mold.sprue_diameter_mm / 2.0,
                                 recipe.mold.vent_diameter_mm / 2.0)
    say("shell parts")
    with _stage(timings, "shell", label):
        shells = mold.build_shells(recipe, cs, openings)

    solids = (
        ("shell-lower", "shell", shells.lower, down),
        ("shell-upper", "shell", shells.upper, up),
        ("core", "core", cs.core, (-1.0, 0.0, 0.0)),
        ("cast", "cast", cs.cast, None),
    )
    parts = []
    say("tessellate and check")
    for name, role, solid, pull in solids:
        with _stage(timings, "tessellate", label):
            mesh = cast_mesh if name == "cast" else tessellate(solid, chord, angle, name)
            vol = cs.volumes_mm3.get(name) or float(solid.Volume())
            report = check_mesh(mesh, name, vol)
        require_ok(report, label)
        parts.append(Part(name, role, solid, mesh, vol, pull, report))  # type: ignore[arg-type]
    say("manufacturability checks")
    with _stage(timings, "analysis", label):
        labels = tuple(x for x in (*shells.labels, core_label) if x is not None)
        rev = review(recipe, cast_mesh, {p.name: (p.mesh, p.pull_dir) for p in parts
                                         if p.role != "cast"},
                     up, cs.layout.block_lo[0], openings,
                     {lab.part: [lab.box] for lab in labels})
        volumes = dict(cs.volumes_mm3, fill=shells.fill_volume_mm3)
        plan = plan_casting(recipe, volumes["cast"], volumes["fill"],
                            [(p.name, p.mesh, p.brep_volume_mm3) for p in parts
                             if p.role != "cast"])
    return MoldSet(recipe, tuple(parts), tuple(openings), cs.layout, volumes,
                   shells.funnel_diameter_mm, timings, rev, candidates, plan, labels,
                   source_hash)


def k_volume(shape: Any) -> float:
    from .geometry.kernel import volume

    return volume(shape)


def _choose_parting(recipe: Recipe, cast_mesh: TriMesh, core_mesh: TriMesh, cs: Any
                    ) -> tuple[Recipe, tuple[Any, ...]]:
    """The recipe with the best candidate plane filled in, and every candidate's score."""
    from .analysis.demold import Surface
    from .analysis.review import core_print_facets, plane_candidates, rank_planes, void_facets
    from .recipe.sanity import parting_problems

    def rule(axis: str, offset: float) -> str | None:
        trial = replace(recipe, parting=Parting(axis, offset))
        problems = parting_problems(trial, lambda _path: None)
        return problems[0].message if problems else None

    cast_s, core_s = Surface(cast_mesh), Surface(core_mesh)
    contact = ~void_facets(recipe, cast_s)
    ranked = rank_planes(cast_s, contact, core_s,
                         core_print_facets(core_s, cs.layout.block_lo[0]),
                         plane_candidates(recipe), rule,
                         recipe.checks.min_draft_deg)
    best = ranked[0]
    if not best.usable:
        raise GeometryError("choose the parting plane", "no candidate plane releases the "
                            f"cast: best {best.axis} = {best.offset_mm:g} mm {best.rule}")
    return replace(recipe, parting=Parting(best.axis, best.offset_mm)), tuple(ranked)
