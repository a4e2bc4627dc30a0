"""Manufacturability findings of an overmold build (see
:mod:`soft_molds.plan.processes.overmold`), measured on each step's meshes:

- ``build-volume``, ``flat-face``, ``print-wall``, ``overhang``: every printed part of each
  step on the recipe's printer (:mod:`soft_molds.analysis.printability`);
- ``skin-wall``: the skin over the guide ridges and the thread, the skin's outer radius
  less the bladder's largest, both from the meshes, against ``checks.min_wall_mm``;
- ``coaxial``: the bladder's bore and the skin mold's cavity share one axis within
  AXIS_TOL_MM (measured on the step-1 cast and the step-2 cast);
- ``guide-width``: the groove a ridge leaves in the printed shell against the nozzle
  (error narrower than one nozzle width; warning under two, common practice for a slot
  that prints open);
- ``release``: each printed part moved along its pull against its step's cast (manifold3d).
  A helical ridge crosses the parting plane at a slant, and a gapped ridge ends in a face
  across it, so a shell half pulled straight off drags slivers of the ridges (measured: up
  to about 1 mm of travel, none once the half is a few mm off); a small locked volume that
  the soft silicone flexes out of (common practice for thread-guide molds) is a warning,
  and the volume is printed. The measure includes the slivers two meshes of one surface
  share (chord-sized; a fraction of a mm3 here);
- ``thread``: the thread to cut per helix (a note);
- ``sheet-cover``: a half-round bladder's strain-limiting sheet, the skin under it and past
  each of its edges against ``checks.min_wall_mm``.

Frame: the actuator frame (mm), z up in pour orientation.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from ..recipe.model import Recipe
from .findings import Finding, Severity, finding
from .layered_checks import part_name, printing_findings, recipe_printer, sheet_cover_finding
from .overmold import TOUCH_MM3, OvermoldStep, Release, ThreadPlan
from .printability import PrintPlan

#: Largest distance between the bladder's axis and the skin mold's (mm).
AXIS_TOL_MM = 0.05
#: Nozzle widths a groove should span to print open (common practice, from memory).
GROOVE_NOZZLES = 2.0


def skin_finding(skin_mm: float, min_wall_mm: float, part: str) -> Finding:
    if skin_mm < min_wall_mm:
        return finding("skin-wall", Severity.ERROR, part,
                       f"the skin over the guides is {skin_mm:.3f} mm, under "
                       f"checks.min_wall_mm = {min_wall_mm:g} mm", value=skin_mm,
                       limit=min_wall_mm)
    return finding("skin-wall", Severity.INFO, part,
                   f"the skin over the guides and thread is {skin_mm:.3f} mm (at least "
                   f"{min_wall_mm:g} mm)", value=skin_mm, limit=min_wall_mm)


def axis_finding(offset_mm: float, part: str) -> Finding:
    if offset_mm > AXIS_TOL_MM:
        return finding("coaxial", Severity.ERROR, part,
                       f"the skin mold's axis is {offset_mm:.3f} mm off the bladder's "
                       f"(at most {AXIS_TOL_MM:g} mm)", value=offset_mm, limit=AXIS_TOL_MM)
    return finding("coaxial", Severity.INFO, part,
                   f"the skin mold and the bladder share one axis to {offset_mm:.4f} mm "
                   f"(at most {AXIS_TOL_MM:g} mm)", value=offset_mm, limit=AXIS_TOL_MM)


def guide_width_finding(width_mm: float, nozzle_mm: float, part: str) -> Finding:
    if width_mm < nozzle_mm:
        return finding("guide-width", Severity.ERROR, part,
                       f"the guide grooves are {width_mm:g} mm wide, narrower than the "
                       f"{nozzle_mm:g} mm nozzle: they will not print",
                       value=width_mm, limit=nozzle_mm)
    need = GROOVE_NOZZLES * nozzle_mm
    if width_mm < need:
        return finding("guide-width", Severity.WARNING, part,
                       f"the guide grooves are {width_mm:g} mm wide, under two nozzle "
                       f"widths ({need:g} mm): they may print closed", value=width_mm,
                       limit=need)
    return finding("guide-width", Severity.INFO, part,
                   f"the guide grooves are {width_mm:g} mm wide (at least {need:g} mm for "
                   f"the {nozzle_mm:g} mm nozzle)", value=width_mm, limit=need)


def release_finding(rel: Release, step: str) -> Finding:
    part = f"{step} {rel.part}"
    pull = "(" + ", ".join(f"{c:g}" for c in rel.pull_dir) + ")"
    if rel.locked_mm3 > TOUCH_MM3:
        return finding("release", Severity.WARNING, part,
                       f"pulled along {pull} it drags {rel.locked_mm3:.2f} mm3 of silicone "
                       f"(most at {rel.at_mm:g} mm of travel): slivers of the guide ridges, "
                       "slanted across its pull; ease the half off, the silicone flexes out",
                       value=rel.locked_mm3, limit=TOUCH_MM3)
    return finding("release", Severity.INFO, part,
                   f"pulled along {pull} it clears the cast (at most {rel.locked_mm3:.4f} "
                   "mm3 shared)", value=rel.locked_mm3, limit=TOUCH_MM3)


def thread_round(t: ThreadPlan) -> str:
    """Where the thread's centre line runs: "18.5 mm" round, or a D's size and perimeter."""
    if t.half_round:
        return f"a {t.diameter_mm:g} mm D, {t.perimeter_mm:.1f} mm around"
    return f"{t.diameter_mm:g} mm"


def thread_finding(t: ThreadPlan, part: str) -> Finding:
    return finding("thread", Severity.INFO, part,
                   f"cut {t.helices} x {t.per_helix_mm:.0f} mm of thread ({t.turns:.2f} "
                   f"turns at {t.pitch_mm:g} mm pitch on {thread_round(t)}, "
                   f"{t.helix_mm:.0f} mm, plus {t.ends_mm:.0f} mm for end wraps and knots)",
                   value=t.total_mm)


def overmold_findings(r: Recipe, steps: Sequence[OvermoldStep], skin_over_guides_mm: float,
                      axis_offset_mm: float, thread: ThreadPlan | None,
                      plans: Sequence[Mapping[str, PrintPlan]],
                      sheet_cover_mm: float | None = None) -> tuple[Finding, ...]:
    """Every finding of an overmold build, step by step in pour order (``plans``: each
    step's :func:`~.layered_checks.print_plans`; ``sheet_cover_mm``: a half-round
    bladder's sheet's, None without one)."""
    printer = recipe_printer(r)
    out: list[Finding] = []
    for s, step_plans in zip(steps, plans, strict=True):
        out.extend(printing_findings(step_plans, printer))
        out.extend(release_finding(rel, s.name) for rel in s.releases)
    first, second = steps
    bl = first.overmold.bladder
    if bl.pieces:
        out.append(guide_width_finding(bl.guide_width_mm, r.printer.nozzle_mm,
                                       part_name(first, "shell-upper")))
    out.append(skin_finding(skin_over_guides_mm, r.checks.min_wall_mm,
                            part_name(second, "cast")))
    out.append(axis_finding(axis_offset_mm, part_name(second, "shell-lower")))
    if thread is not None:
        out.append(thread_finding(thread, part_name(first, "cast")))
    if sheet_cover_mm is not None:
        out.append(sheet_cover_finding(sheet_cover_mm, r.checks.min_wall_mm,
                                       part_name(second, "cast")))
    return tuple(out)
