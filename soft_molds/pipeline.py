"""The one place that runs the stages in order: recipe -> geometry -> analysis -> export.

Stages never import each other backwards; this module hands each one the numbers the
previous produced (for instance, the analysis stage plans the sprue and vents on the cast
part's mesh, and the geometry stage then cuts them into the upper shell).
"""

from __future__ import annotations

import hashlib
import os
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

from .analysis.integrity import MeshReport, check_mesh, require_ok
from .errors import GeometryError, SoftMoldsError
from .meshdata import TriMesh
from .recipe.layout import plan_layout
from .recipe.model import Parting, Recipe
from .version import __version__


@dataclass(frozen=True, eq=False)
class Part:
    """One solid of the mold set with its mesh and integrity report.

    ``pull_dir`` is the unit vector (world frame) along which the part leaves the cast,
    ``None`` for the cast itself. ``brep`` is the kernel's solid (opaque here).
    """

    name: str
    role: str
    brep: Any
    mesh: TriMesh
    brep_volume_mm3: float
    pull_dir: tuple[float, float, float] | None
    report: MeshReport

    @property
    def stl_name(self) -> str:
        return f"{self.name}.stl"

    @property
    def step_name(self) -> str:
        return f"{self.name}.step"


@dataclass(frozen=True, eq=False)
class MoldSet:
    """Everything built from one recipe; :meth:`export` writes it."""

    recipe: Recipe
    parts: tuple[Part, ...]
    openings: tuple[Any, ...]
    layout: Any
    volumes_mm3: dict[str, float]  # exact volumes of body, void_set, core, cast; fill: the
    #                                 sprue, funnel and vents above the cavity
    funnel_diameter_mm: float | None
    timings_s: dict[str, float] = field(default_factory=dict)
    review: Any = None             # analysis.review.Review: every manufacturability finding
    parting_candidates: tuple[Any, ...] = ()  # PlaneScore per plane tried (parting: auto)
    casting: Any = None            # analysis.casting.CastingPlan: what to weigh and print
    labels: tuple[Any, ...] = ()   # geometry.mold.Label per printed part that carries one
    source_params_sha256: str = ""  # hash of the recipe as given (before parting: auto)

    @property
    def pressures(self) -> tuple[Any, ...]:
        return () if self.review is None else self.review.pressures

    @property
    def findings(self) -> tuple[Any, ...]:
        return () if self.review is None else self.review.findings

    @property
    def errors(self) -> tuple[Any, ...]:
        return () if self.review is None else self.review.errors

    @property
    def warnings(self) -> tuple[Any, ...]:
        return () if self.review is None else self.review.warnings

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)

    @property
    def void_volume_mm3(self) -> float:
        """Air inside the cast: voids and tube socket (mm3)."""
        return self.volumes_mm3["void_set"]

    @property
    def silicone_volume_mm3(self) -> float:
        return self.part("cast").brep_volume_mm3

    def output_dir(self, root: str | os.PathLike) -> Path:
        return Path(root) / self.recipe.name / self.recipe.label

    def manifest(self) -> dict[str, Any]:
        r = self.recipe
        lay = self.layout
        parts = []
        for p in self.parts:
            lo, hi = p.mesh.bbox_mm()
            parts.append({
                "name": p.name,
                "role": p.role,
                "file": p.stl_name,
                "step": p.step_name,
                "volume_mm3": round(p.brep_volume_mm3, 3),
                "mesh_volume_mm3": round(p.report.volume_mm3, 3),
                "bbox_mm": [[round(x, 4) for x in lo], [round(x, 4) for x in hi]],
                "triangles": p.mesh.triangle_count,
                "pull_dir": list(p.pull_dir) if p.pull_dir is not None else None,
                "printable": p.role != "cast",
                "watertight": p.report.watertight,
            })
        return {
            "recipe": r.name,
            "label": r.label,
            "tool_version": __version__,
            "units": "mm",
            "params_sha256": r.params_sha256(),
            "source_params_sha256": self.source_params_sha256 or r.params_sha256(),
            "parts": parts,
            "silicone_volume_mm3": round(self.silicone_volume_mm3, 3),
            "void_volume_mm3": round(self.void_volume_mm3, 3),
            "body_volume_mm3": round(self.volumes_mm3["body"], 3),
            "pour": {
                "up": _up(r),
                "funnel_diameter_mm": (None if self.funnel_diameter_mm is None
                                       else round(self.funnel_diameter_mm, 4)),
                "openings": [{"kind": o.kind,
                              "at_mm": [round(c, 4) for c in o.center_mm],
                              "diameter_mm": round(2 * o.radius_mm, 4)} for o in self.openings],
            },
            "parting": {
                "axis": r.parting.axis, "offset_mm": r.parting.offset_mm,
                "chosen_by": "analysis" if self.parting_candidates else "recipe",
                "candidates": [
                    {"axis": c.axis, "offset_mm": round(c.offset_mm, 4) + 0.0,
                     "locked_area_mm2": round(c.locked_area_mm2, 3) + 0.0,
                     "core_locked_area_mm2": round(c.rigid_locked_area_mm2, 3) + 0.0,
                     "min_draft_deg": round(c.min_draft_deg, 3) + 0.0,
                     "rejected": c.rule, "chosen": i == 0}
                    for i, c in enumerate(self.parting_candidates)],
            },
            "registration_keys_uv_mm": [[round(a, 4) for a in k] for k in lay.keys_uv],
            "clamp": {"bolt": r.mold.clamp_bolt, "hole_diameter_mm": r.mold.clamp_hole_mm,
                      "holes_uv_mm": [[round(a, 4) for a in b] for b in lay.bolts_uv]},
            "labels": [{"part": lab.part, "text": lab.text,
                        "height_mm": round(lab.height_mm, 3),
                        "depth_mm": r.label_settings.depth_mm} for lab in self.labels],
            "checks": [f.to_json() for f in self.findings],
            "verdict": ("error" if self.errors else "warning" if self.warnings else "ok"),
            "print": {name: _print_json(plan) for name, plan in
                      (self.review.prints.items() if self.review is not None else ())},
            "casting": _casting_json(self.casting),
            "pressure": {
                "youngs_modulus_mpa": (None if self.review is None or
                                       self.review.modulus_mpa is None
                                       else round(self.review.modulus_mpa, 4)),
                "working_pressure_kpa": r.inflate.working_pressure_kpa,
                "walls": [{"group": w.group, "shape": w.shape,
                           "thickness_mm": round(w.thickness_mm, 3),
                           "span_mm": round(2 * w.radius_mm, 3),
                           "limit_kpa": None if w.limit_kpa is None else round(w.limit_kpa, 1),
                           "margin": (None if w.margin(r.inflate.working_pressure_kpa) is None
                                      else round(w.margin(r.inflate.working_pressure_kpa), 3)),
                           "thick_wall": w.thick} for w in self.pressures],
            },
            "params": r.params(),
        }

    def files(self) -> dict[str, bytes]:
        """File name -> bytes of every output, manifest last."""
        from .export.files import json_bytes
        from .export.stl import encode_binary_stl
        from .geometry.tessellate import step_bytes

        out: dict[str, bytes] = {}
        for p in self.parts:
            out[p.stl_name] = encode_binary_stl(p.mesh, f"{self.recipe.name} {self.recipe.label} "
                                                f"{p.name}")
            tag = f"{self.recipe.name}-{self.recipe.label}-{p.name}"
            out[p.step_name] = step_bytes(p.brep, tag)
        man = self.manifest()
        if self.casting is not None:
            from .export.card import card_files

            out.update(card_files([man], f"{self.recipe.name} {self.recipe.label}"))
        # Every other file's digest, so a resumed sweep can tell a finished set from one
        # a killed run left behind.
        man["files"] = {name: hashlib.sha256(data).hexdigest()
                        for name, data in sorted(out.items())}
        out["manifest.json"] = json_bytes(man)
        return out

    def export(self, root: str | os.PathLike = "out") -> list[Path]:
        """Write every part (STL + STEP) and ``manifest.json`` under
        ``root/<recipe>/<label>/``; each file appears complete or not at all."""
        from .export.files import write_file_set

        t = time.perf_counter()
        files = self.files()
        paths = write_file_set(self.output_dir(root), files, last="manifest.json")
        self.timings_s["write"] = time.perf_counter() - t
        return paths


def _casting_json(plan: Any) -> dict[str, Any] | None:
    if plan is None:
        return None
    q, g = plan.quantities, plan.grade
    return {
        "grade": g.name, "shore": f"{g.scale}{g.hardness:g}", "scale": g.scale,
        "hardness": round(g.hardness, 3), "cure": g.cure,
        "density_g_cm3": round(g.density_g_cm3, 4),
        "mix_ratio": list(g.mix_ratio), "mix_by": g.mix_by, "note": g.note,
        "cast_volume_mm3": round(q.cast_mm3, 3), "fill_volume_mm3": round(q.fill_mm3, 3),
        "waste_pct": q.waste_pct, "mixed_volume_mm3": round(q.mixed_mm3, 3),
        "mixed_mass_g": round(q.mixed_g, 3),
        "portions": [{"what": p.what, "g": p.grams, "ml": p.ml, "mix_by": p.by}
                     for p in q.portions],
        "pot_life_min": g.pot_life_min, "demold_h": g.demold_h,
        "blend": None if plan.blend is None else {
            "first": plan.blend.first.name, "with": plan.blend.second.name,
            "target_shore_a": plan.blend.target_shore_a,
            "volume_fraction_first": round(plan.blend.volume_fraction_first, 4),
            "weight_fraction_first": round(plan.blend.weight_fraction_first, 4)},
        "prints": [{"part": pe.part, "volume_mm3": round(pe.volume_mm3, 1),
                    "infill_pct": pe.infill_pct, "mass_g_estimate": round(pe.mass_g, 1)}
                   for pe in plan.prints],
    }


def _print_json(plan: Any) -> dict[str, Any]:
    return {
        "down": [round(c, 6) + 0.0 for c in plan.down],
        "turn_deg": round(plan.turn_deg, 3) + 0.0,
        "size_mm": [round(c, 3) + 0.0 for c in plan.size_mm],
        "fits": plan.fits,
        "contact_area_mm2": round(plan.contact_area_mm2, 2) + 0.0,
        "overhang_area_mm2": round(plan.overhang_area_mm2, 2) + 0.0,
        "min_wall_mm": round(plan.min_wall_mm, 3) + 0.0,
    }


def _up(r: Recipe) -> list[float]:
    return [0.0, 0.0, 1.0] if r.parting.axis == "z" else [0.0, 1.0, 0.0]


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
    up = tuple(_up(recipe))
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
