"""Manufacturability findings of a layered build (see
:mod:`soft_molds.plan.processes.layered`), measured on each step's meshes.

The one-shot review assumes two shells and a core; a layered step is an open tray (and, for
the chambered step, a post bridge) instead, so its checks are these:

- ``build-volume``, ``flat-face``, ``print-wall``, ``overhang``: every printed part of each
  step on the recipe's printer (:mod:`soft_molds.analysis.printability`);
- ``post-draft``: the least draft of the post bridge's posts against their pull (+z in pour
  orientation), error below the recipe's ``process.draft_deg`` (the build lost draft) or
  below ``checks.min_draft_deg`` (too little to release, common practice 0.5-2 deg);
- ``trapped-air``: each pour fills an open tray with the cavity facing up (+z in pour
  orientation); air rising straight up from every high point of the cast must leave
  without meeting the tray (:mod:`soft_molds.analysis.trapped_air`);
- ``base-layer``: the base pour's thickness measured on its cast against
  ``process.base_mm``, and against ``checks.min_wall_mm`` (it is the wall under the sheet);
- ``sheet-cover``: the silicone beyond the strain-limiting sheet's edge on every side
  (the base cast's outline less the sheet's), against ``checks.min_wall_mm``;
- ``fin-print`` and ``fin-draft``: slits between chambers are formed by fins standing on
  the chambered tray's floor; the one-shot checks' measures (:mod:`.checks.fin_print`,
  :mod:`.checks.fin_draft`) on that tray, its mesh turned back into the actuator frame,
  where it leaves the cast along +z as the one-shot upper shell does (a layered tray has
  no sprue or vent, so ``fin-opening`` has nothing to find).

Frames: pour orientation per step, as the parts are stored; mm, degrees.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import replace
from typing import Protocol

import numpy as np

from ..meshdata import TriMesh
from ..plan.model import Footprint
from ..recipe.kinds.slits import THROUGH_MM
from ..recipe.model import Recipe
from .checks.fin_draft import PICK_TOL_MM, fin_draft_findings, fin_drafts
from .checks.fin_print import fin_print_findings
from .checks.motion_scope import network_motion_notes
from .findings import Finding, Severity, finding
from .layered import LayerStep, is_chambered
from .printability import Printer, PrintPlan, plan_print, print_findings
from .result import Part
from .section import section_segments
from .trapped_air import trapped_air
from .wording import point

#: Slack when comparing the built post draft with the recipe's (deg): the posts' facets
#: are planar, so the mesh carries the draft to float noise; 0.01 deg is far above it.
DRAFT_TOL_DEG = 0.01
#: Slack when comparing the measured base thickness with the recipe's (mm): the bond face
#: and the bottom are planar faces, exact in the mesh to float noise.
THICKNESS_TOL_MM = 1e-3
#: Rising air: pour orientation, the open side of every tray up.
UP = (0.0, 0.0, 1.0)


def recipe_printer(r: Recipe) -> Printer:
    """The recipe's printer limits as the printability planner takes them."""
    pr = r.printer
    return Printer(bed_mm=(float(pr.bed_mm[0]), float(pr.bed_mm[1])), height_mm=pr.height_mm,
                   nozzle_mm=pr.nozzle_mm, perimeters=pr.perimeters,
                   overhang_deg=pr.overhang_deg)


class StepParts(Protocol):
    """A step of a multi-step process as the printing checks read it."""

    @property
    def name(self) -> str: ...

    @property
    def parts(self) -> tuple[Part, ...]: ...


def part_name(s: StepParts, part: str) -> str:
    """How a finding names one step's part, e.g. ``chambered post-bridge``."""
    return f"{s.name} {part}"


Box = tuple[tuple[float, float, float], tuple[float, float, float]]


def print_plans(s: StepParts, printer: Printer, label_boxes: Mapping[str, Box] | None = None
                ) -> dict[str, PrintPlan]:
    """How each printed part of ``s`` lies on the bed (by part name, casts left out);
    ``label_boxes``: the world box of the label cut into a part, whose strokes' thin ribs
    the wall check skips."""
    boxes = label_boxes or {}
    return {p.name: plan_print(p.mesh, part_name(s, p.name), printer,
                               ignore_boxes=[boxes[p.name]] if p.name in boxes else ())
            for p in s.parts if p.role != "cast"}


def printing_findings(plans: Mapping[str, PrintPlan], printer: Printer) -> list[Finding]:
    """Bed fit, flat face, wall thickness and overhang of every printed part of a step
    (``plans``: :func:`print_plans`)."""
    out: list[Finding] = []
    for plan in plans.values():
        found = print_findings(plan, printer)
        if not any(f.check == "print-wall" for f in found):
            # A sound wall is worth a note too: the table then lists every printed part.
            sx, sy, sz = plan.size_mm
            found.append(finding(
                "print-wall", Severity.INFO, plan.part,
                f"thinnest wall {plan.min_wall_mm:.2f} mm (at least {printer.min_wall_mm:.2f}"
                f" mm); prints {sx:.1f} x {sy:.1f} x {sz:.1f} mm", value=plan.min_wall_mm,
                limit=printer.min_wall_mm, where=plan.min_wall_where_mm))
        out.extend(found)
    return out


def post_draft_finding(least_deg: float, set_deg: float, min_deg: float, part: str
                       ) -> Finding:
    """The posts' least measured draft (deg) against the set draft and the house minimum:
    an error below either (with ``DRAFT_TOL_DEG`` slack on the set draft), else a note."""
    if least_deg < set_deg - DRAFT_TOL_DEG:
        return finding("post-draft", Severity.ERROR, part,
                       f"least post draft {least_deg:.3f} deg is below the set "
                       f"process.draft_deg = {set_deg:g} deg", value=least_deg, limit=set_deg)
    if least_deg < min_deg:
        return finding("post-draft", Severity.ERROR, part,
                       f"least post draft {least_deg:.3f} deg is below checks.min_draft_deg "
                       f"= {min_deg:g} deg: the posts may not release from the silicone",
                       value=least_deg, limit=min_deg)
    return finding("post-draft", Severity.INFO, part,
                   f"posts release along +z with at least {least_deg:.3f} deg of draft "
                   f"(set {set_deg:g} deg, minimum {min_deg:g} deg)",
                   value=least_deg, limit=max(set_deg, min_deg))


def air_findings(s: LayerStep) -> list[Finding]:
    """High points of the step's cast that no ray straight up leaves the open tray from."""
    tray = part_name(s, "tray")
    air = trapped_air(s.part("cast").mesh, UP, s.part("tray").mesh)
    out = [finding("trapped-air", Severity.ERROR, tray,
                   f"air is trapped under a high point of the cast at "
                   f"{point(hp.position_mm)} (the tray closes over it)",
                   value=hp.height_mm, where=hp.position_mm) for hp in air.trapped]
    out.append(finding("trapped-air", Severity.INFO, tray,
                       f"{len(air.high_points)} high point(s) of the pour, "
                       f"{len(air.trapped)} under the tray (poured open side up)",
                       value=float(len(air.trapped)), limit=0.0))
    return out


def base_thickness_mm(s: LayerStep) -> float:
    """The base pour's thickness (mm): its cast's extent along z (bottom to bond face)."""
    lo, hi = s.part("cast").mesh.bbox_mm()
    return float(hi[2] - lo[2])


def base_layer_finding(measured_mm: float, set_mm: float, min_wall_mm: float, part: str
                       ) -> Finding:
    """The base layer against the recipe's thickness and the thinnest wall accepted."""
    if abs(measured_mm - set_mm) > THICKNESS_TOL_MM:
        return finding("base-layer", Severity.ERROR, part,
                       f"base layer {measured_mm:.3f} mm thick, not process.base_mm = "
                       f"{set_mm:g} mm", value=measured_mm, limit=set_mm)
    if measured_mm < min_wall_mm:
        return finding("base-layer", Severity.ERROR, part,
                       f"base layer {measured_mm:.3f} mm thick is under checks.min_wall_mm "
                       f"= {min_wall_mm:g} mm", value=measured_mm, limit=min_wall_mm)
    return finding("base-layer", Severity.INFO, part,
                   f"base layer {measured_mm:.3f} mm thick (process.base_mm = {set_mm:g} mm, "
                   f"at least {min_wall_mm:g} mm)", value=measured_mm, limit=min_wall_mm)


def sheet_cover_mm(s: LayerStep, sheet: Footprint) -> float:
    """The least silicone beyond the sheet's edge (mm): the base cast's outline at the bond
    face less the sheet's, side by side (the cast's bounding box in x and y; the bond face
    lies above the bottom rounding, so there the section is the full footprint). At a
    rounded corner the gap is the same (the sheet's corner is the footprint's parallel
    curve), so the four sides give the least."""
    if sheet.outline is not None:
        return plate_sheet_cover_mm(s, sheet)
    lo, hi = s.part("cast").mesh.bbox_mm()
    (cx, cy), (lx, ly) = sheet.center_mm, sheet.size_mm
    return float(min(cx - lx / 2.0 - lo[0], hi[0] - (cx + lx / 2.0),
                     cy - ly / 2.0 - lo[1], hi[1] - (cy + ly / 2.0)))


#: Spacing (mm) of the points on a plate's sheet edge measured against the cast's outline.
SHEET_EDGE_SPACING_MM = 0.5


def plate_sheet_cover_mm(s: LayerStep, sheet: Footprint) -> float:
    """The least silicone beyond the edge of a plate's sheet (mm): the base cast's mesh cut
    by the plane midway through its thickness (its sides are upright, so every section is
    the outline), and the least distance from points on the sheet's edge to those cut
    segments."""
    assert sheet.outline is not None
    mesh = s.part("cast").mesh
    lo, hi = mesh.bbox_mm()
    z = (lo[2] + hi[2]) / 2.0
    segs, _ = section_segments(mesh, "z", z)
    edge = sheet.outline.boundary(SHEET_EDGE_SPACING_MM)
    a, b = segs[:, 0], segs[:, 1]
    ab = b - a
    out = np.inf
    for chunk in np.array_split(edge, max(1, len(edge) // 256)):
        q = chunk[:, None, :]
        t = np.clip(np.sum((q - a) * ab, axis=2) / np.maximum(np.sum(ab * ab, axis=1), 1e-30),
                    0.0, 1.0)
        d = np.linalg.norm(q - (a + t[..., None] * ab), axis=2)
        out = min(out, float(d.min()))
    return out


def sheet_cover_finding(cover_mm: float, min_wall_mm: float, part: str) -> Finding:
    """Silicone beyond the sheet's edge against the thinnest wall accepted."""
    if cover_mm < min_wall_mm:
        return finding("sheet-cover", Severity.ERROR, part,
                       f"the sheet comes within {cover_mm:.3f} mm of the outside, under "
                       f"checks.min_wall_mm = {min_wall_mm:g} mm (widen "
                       f"process.cover_margin_mm)", value=cover_mm, limit=min_wall_mm)
    return finding("sheet-cover", Severity.INFO, part,
                   f"the sheet is covered by at least {cover_mm:.3f} mm of silicone on every "
                   f"side (at least {min_wall_mm:g} mm)", value=cover_mm, limit=min_wall_mm)


def layered_findings(r: Recipe, steps: Sequence[LayerStep],
                     plans: Sequence[Mapping[str, PrintPlan]]) -> tuple[Finding, ...]:
    """Every finding of a layered build, step by step in pour order (``plans``: each
    step's :func:`print_plans`)."""
    printer = recipe_printer(r)
    out: list[Finding] = []
    for s, step_plans in zip(steps, plans, strict=True):
        out.extend(printing_findings(step_plans, printer))
        if is_chambered(s.layer):
            assert s.least_post_draft_deg is not None
            out.append(post_draft_finding(s.least_post_draft_deg, r.process.draft_deg,
                                          r.checks.min_draft_deg,
                                          part_name(s, "post-bridge")))
        out.extend(air_findings(s))
        if not is_chambered(s.layer):
            cast = part_name(s, "cast")
            out.append(base_layer_finding(base_thickness_mm(s), r.process.base_mm,
                                          r.checks.min_wall_mm, cast))
            inset = s.layer.sheet_inset_mm
            if inset is not None:
                cover = sheet_cover_mm(s, s.layer.footprint.inset(inset))
                out.append(sheet_cover_finding(cover, r.checks.min_wall_mm, cast))
        elif r.outer_cuts():
            out.extend(fin_findings(r, s, printer))
    out.extend(network_motion_notes(r))
    return tuple(out)


def fin_findings(r: Recipe, s: LayerStep, printer: Printer) -> list[Finding]:
    """The slits' fins on the chambered tray: printable, and drafted along its pull."""
    cuts = r.outer_cuts()
    tray = part_name(s, "tray")
    mesh = s.part("tray").mesh
    # The tray is stored turned over (a half turn about x); turned back, its fins hang
    # from the actuator's top face and leave the cast along +z.
    back = TriMesh(mesh.vertices * np.array([1.0, -1.0, -1.0]), mesh.faces)
    least, where = fin_drafts(back, cuts, (0.0, 0.0, 1.0), None, THROUGH_MM + PICK_TOL_MM)
    found = (fin_print_findings(cuts, printer)
             + fin_draft_findings(least, where, r.checks.min_draft_deg))
    return [replace(f, part=tray) for f in found]

