"""The manufacturability review of a built mold set: every check, as findings.

Works on meshes and numbers only. Frame: mm, world; the parting axis points up in pour
orientation; the lower shell pulls along -up, the upper along +up, the core along -x
through the inlet opening at x = 0.

Checks (``Finding.check``):

- ``draft`` / ``undercut`` per shell part against the cast (silicone flexes: a locked
  undercut is a warning with its depth), ``core-lock`` per shell part against the core
  print (rigid against rigid: an error), ``core-draft`` for the voids along the core's pull;
- ``core-extraction`` (stretch of the inlet ring as the core's widest section passes) and
  ``core-slenderness``;
- ``silicone-wall`` (outer walls and walls between neighbouring voids);
- ``trapped-air`` (a high point of the cavity no opening of the built mold vents);
- ``build-volume``, ``print-wall``, ``overhang``, ``flat-face`` per printable part;
- ``pressure``: the limit pressure of each group of pressurised walls against the working
  pressure (an estimate, see :mod:`.pressure`).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from soft_molds.meshdata import TriMesh
from soft_molds.recipe.model import Recipe
from soft_molds.recipe.primitives import union_sdf

from .demold import PullReport, Surface, pull_report, score_plane
from .extraction import Extraction, allowed_stretch, core_extraction
from .findings import Finding, finding
from .pressure import WallPressure, pressure_findings, wall_pressures
from .printability import Printer, PrintPlan, plan_print, print_findings
from .trapped_air import AirReport, combine, trapped_air
from .walls import RESOLUTION_MM, WallMap, wall_map


@dataclass(frozen=True)
class Review:
    """Everything the review measured, and its findings (errors first)."""

    findings: tuple[Finding, ...]
    pulls: tuple[PullReport, ...]
    extraction: Extraction | None
    walls: WallMap | None
    air: AirReport | None
    prints: dict[str, PrintPlan] = field(default_factory=dict)
    modulus_mpa: float | None = None
    pressures: tuple[WallPressure, ...] = ()

    @property
    def errors(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if f.severity == "error")

    @property
    def warnings(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if f.severity == "warning")


def _fmt(p: Sequence[float] | None) -> str:
    return "-" if p is None else "(" + ", ".join(f"{c:.1f}" for c in p) + ") mm"


def void_facets(r: Recipe, cast: Surface) -> np.ndarray:
    """Facets of the cast on the surface of the voids or the inlet socket (those the core
    touches), found with the recipe primitives' exact distance functions."""
    prims = tuple(p for group in r.void_primitives() for p in group) + (r.inlet.socket(),)
    tol = min(0.1, r.checks.min_wall_mm / 3.0)
    return np.abs(union_sdf(prims, cast.centroids)) <= tol


def core_print_facets(core: Surface, block_lo_x: float, tol_mm: float = 0.05) -> np.ndarray:
    """Facets of the core between the mold block's inlet face and the body (the print and
    its key, seated in the two shells)."""
    x = core.centroids[:, 0]
    return (x > block_lo_x + tol_mm) & (x < -tol_mm)


def review(
    r: Recipe,
    cast: TriMesh,
    parts: dict[str, tuple[TriMesh, tuple[float, float, float] | None]],
    up: Sequence[float],
    block_lo_x: float,
    openings: Sequence = (),
    label_boxes: dict[str, Sequence] | None = None,
) -> Review:
    """Run every check on a built mold set. ``parts`` maps part name -> (mesh, pull
    direction) for shell-lower, shell-upper and core; ``cast`` is the cast part's mesh."""
    out: list[Finding] = []
    c = r.checks
    cs = Surface(cast)
    voids = void_facets(r, cs)
    outer = ~voids
    w = 1 if r.parting.axis == "y" else 2
    upv = np.zeros(3)
    upv[w] = 1.0

    # 1. Shells against the silicone and against the core print.
    core_mesh = parts["core"][0]
    core_s = Surface(core_mesh)
    core_contact = core_print_facets(core_s, block_lo_x)
    # Rays that leave through a sprue or vent do not lock the upper shell.
    _, pulls = score_plane(cs, outer, r.parting.axis, float(r.parting.offset_mm), core_s,
                           core_contact, c.min_draft_deg, openings)
    for rep in pulls:
        if rep.area_mm2 == 0.0:
            continue
        rigid = "/core" in rep.part
        part = rep.part.split("/")[0]
        if rigid:
            if rep.locked_area_mm2 > 0.0:
                out.append(finding(
                    "core-lock", "error", part,
                    f"{part} cannot be pulled {_dir(rep.pull)} off the core print: "
                    f"{rep.locked_area_mm2:.1f} mm2 locked, {rep.locked_depth_mm:.1f} mm deep, "
                    f"near {_fmt(rep.locked_where_mm)}; put the parting plane through the "
                    "socket axis", value=rep.locked_area_mm2, limit=0.0,
                    where=rep.locked_where_mm))
            continue
        if rep.locked_area_mm2 > 0.0:
            out.append(finding(
                "undercut", "warning", part,
                f"{rep.locked_area_mm2:.1f} mm2 of the cast is locked in an undercut when "
                f"{part} pulls {_dir(rep.pull)} ({rep.locked_regions} region(s), deepest "
                f"{rep.locked_depth_mm:.1f} mm, near {_fmt(rep.locked_where_mm)}); the "
                "silicone must flex that far to release", value=rep.locked_depth_mm,
                limit=0.0, where=rep.locked_where_mm))
        out.append(finding(
            "draft", "info", part,
            f"least draft {rep.min_draft_deg:.2f} deg at {_fmt(rep.min_draft_where_mm)}; "
            f"{rep.low_draft_area_mm2:.0f} of {rep.area_mm2:.0f} mm2 below "
            f"{rep.min_draft_limit_deg:g} deg (silicone flexes off undrafted walls; stiff "
            "grades release more easily with draft)", value=rep.min_draft_deg,
            limit=rep.min_draft_limit_deg, where=rep.min_draft_where_mm))
    core_pull = pull_report(cs, voids, (-1.0, 0.0, 0.0), "core", c.min_draft_deg)
    pulls.append(core_pull)
    out.append(finding(
        "core-draft", "info", "core",
        f"{core_pull.locked_area_mm2:.0f} mm2 of the void surface faces against the core's "
        f"pull (-x); least draft {core_pull.min_draft_deg:.1f} deg; the silicone stretches "
        "over it (see core-extraction)", value=core_pull.locked_area_mm2, limit=None,
        where=core_pull.locked_where_mm))

    # 2. Core extraction through the inlet.
    cy, cz = r.inlet.center_mm
    d_open = r.inlet.socket_diameter_mm
    ext = core_extraction(core_mesh, (-1.0, 0.0, 0.0), (0.0, cy, cz), np.pi * d_open)
    elong = r.material.elongation_at_break_pct
    k = c.core_safety_factor
    allowed = allowed_stretch(elong, k)
    need = k * ext.strain * 100.0
    verdict = "error" if ext.stretch > allowed + 1e-9 else "info"
    out.append(finding(
        "core-extraction", verdict, "core",
        f"pulling the core out stretches the {d_open:g} mm inlet to {ext.stretch:.2f} x its "
        f"perimeter ({ext.section_perimeter_mm:.1f} mm section near {_fmt(ext.where_mm)}): "
        f"strain {ext.strain * 100:.0f} % x safety factor {k:g} = {need:.0f} % against "
        f"elongation at break {elong:g} % ({r.material.grade})"
        + ("" if verdict == "info" else "; the inlet will tear: widen the socket, slim the "
           "voids or choose a more stretchy grade"),
        value=ext.stretch, limit=allowed, where=ext.where_mm))
    if ext.slenderness > c.core_slenderness_max:
        out.append(finding(
            "core-slenderness", "warning", "core",
            f"the core reaches {ext.free_length_mm:.1f} mm into the part but is only "
            f"{ext.least_width_mm:.1f} mm wide near {_fmt(ext.least_width_where_mm)} "
            f"(length / width {ext.slenderness:.1f} > {c.core_slenderness_max:g}): it may bend "
            "while pouring or break while pulling; print it solid, or support its far end",
            value=ext.slenderness, limit=c.core_slenderness_max,
            where=ext.least_width_where_mm))

    # 3. Silicone walls.
    walls = wall_map(cs, voids, c.min_wall_mm)
    for wk in (walls.outer, walls.between):
        if wk.samples == 0:
            continue
        bad = wk.min_mm < c.min_wall_mm - RESOLUTION_MM + 1e-9
        sev = "error" if bad else ("warning" if wk.thin_area_mm2 > 0.0 and
                                   wk.min_mm < c.min_wall_mm - 1e-9 else "info")
        out.append(finding(
            "silicone-wall", sev, "cast",
            f"thinnest {wk.kind} wall {wk.min_mm:.2f} mm at {_fmt(wk.where_mm)}; "
            f"{wk.thin_area_mm2:.1f} mm2 below checks.min_wall_mm = {c.min_wall_mm:g} mm"
            + (" (thin walls balloon and burst)" if sev != "info" else ""),
            value=wk.min_mm, limit=c.min_wall_mm, where=wk.where_mm))

    # 4. Trapped air, on the closed mold as built.
    rigid = [parts[n][0] for n in ("shell-lower", "shell-upper", "core") if n in parts]
    air = trapped_air(cast, upv, combine(rigid))
    for hp in air.trapped:
        out.append(finding(
            "trapped-air", "error", "shell-upper",
            f"air is trapped under a high point of the cavity at {_fmt(hp.position_mm)} (no "
            "vent or sprue above it)", value=hp.height_mm, limit=None, where=hp.position_mm))
    out.append(finding(
        "trapped-air", "info", "shell-upper",
        f"{len(air.high_points)} high point(s) in the cavity, {len(air.trapped)} not vented",
        value=float(len(air.trapped)), limit=0.0))

    # 5. Printability.
    pr = r.printer
    printer = Printer(bed_mm=tuple(pr.bed_mm), height_mm=pr.height_mm,  # type: ignore[arg-type]
                      nozzle_mm=pr.nozzle_mm, perimeters=pr.perimeters,
                      overhang_deg=pr.overhang_deg)
    prints = {}
    for name in ("shell-lower", "shell-upper", "core"):
        if name in parts:
            plan = plan_print(parts[name][0], name, printer, (label_boxes or {}).get(name, ()))
            prints[name] = plan
            out.extend(print_findings(plan, printer))

    # 6. Pressure the walls will take (an estimate).
    e_mpa, pressures = wall_pressures(r)
    out.extend(pressure_findings(r, e_mpa, pressures))

    rank = {"error": 0, "warning": 1, "info": 2}
    out.sort(key=lambda f: rank[f.severity])  # stable: check order kept within a severity
    return Review(tuple(out), tuple(pulls), ext, walls, air, prints, e_mpa, pressures)


def _dir(v: Sequence[float]) -> str:
    i = int(np.argmax(np.abs(v)))
    return ("+" if v[i] > 0 else "-") + "xyz"[i]
