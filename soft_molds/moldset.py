"""The typed result of one build: every part of the mold set with its mesh, the plan it
was built to, and what the analysis measured. Produced by :func:`soft_molds.pipeline.build`;
the export stage turns it into files.

Frame: mm, world (see :mod:`soft_molds.recipe.model`); ``pull_dir`` is the unit vector along
which a part leaves the cast in pour orientation.
"""

from __future__ import annotations

import hashlib
import os
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from .analysis.findings import Finding, verdict
from .analysis.integrity import MeshReport
from .meshdata import TriMesh
from .plan.model import MoldPlan
from .recipe.model import Recipe
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
    plan: MoldPlan | None = None   # the plan the parts were built to

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
                "up": pour_up(r),
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
            "checks": [_finding_json(f) for f in self.findings],
            "verdict": str(verdict(self.findings)),
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


def pour_up(r: Recipe) -> list[float]:
    return [0.0, 0.0, 1.0] if r.parting.axis == "z" else [0.0, 1.0, 0.0]


def _finding_json(f: Finding) -> dict[str, Any]:
    def r(x: float | None, nd: int = 4) -> float | None:
        return None if x is None else round(float(x), nd) + 0.0

    return {
        "check": f.check,
        "severity": str(f.severity),
        "part": f.part,
        "value": r(f.value),
        "limit": r(f.limit),
        "where_mm": None if f.where_mm is None else [r(c) for c in f.where_mm],
        "message": f.message,
    }
