"""Files of a layered build (see :mod:`soft_molds.plan.processes.layered`), written as one
variant folder: per step a folder ``step-<n>-<name>/`` with its parts' STL files (pour
orientation), the base step's strain-limiting sheet template (``sheet.svg``, 1:1), and at
the top the casting card (both pours in order) and ``manifest.json`` listing the steps in
order, the verdict and findings of the layered checks (``checks``) and every file's
SHA-256, written last.
"""

from __future__ import annotations

import hashlib
import math
import os
import typing
from collections.abc import Mapping, Sequence
from pathlib import Path

from ..analysis.findings import Finding, verdict
from ..analysis.layered import LayeredMoldSet, LayerStep
from ..analysis.melted import CoreMoldStep, MeltedMoldSet
from ..analysis.overmold import OvermoldMoldSet, OvermoldStep
from ..analysis.plates import PlateItem, posed_vertices
from ..analysis.printability import PrintPlan
from ..plan.model import Footprint
from ..recipe.kinds.channels import Channels
from ..recipe.model import Recipe
from ..recipe.outline import Arc2, Line2
from ..units import mm3_to_cm3
from ..version import __version__
from .card import CAUTIONS
from .files import json_bytes, write_file_set
from .manifest import motion_record
from .plates import plate_files
from .steps_manifest import (
    STEPPED_FORMAT,
    ProcessEcho,
    SteppedManifest,
    StepRecord,
    part_records,
    pour_record,
)
from .stl import encode_binary_stl
from .typedjson import JsonValue, to_json
from .writer import output_dir

MANIFEST_NAME = "manifest.json"
CARD_NAME = "casting-card.md"
SHEET_NAME = "sheet.svg"
#: Length of the sheet template's scale bar (mm): measure it to check the print is 1:1.
SCALE_BAR_MM = 50.0
#: Margin around the outline on the template page (mm).
PAGE_MARGIN_MM = 10.0
#: Straight pieces per degree of a rounded corner on the template (chord error below
#: 0.1 micrometre for the corner radii of a finger).
ARC_STEPS_PER_DEG = 1

SHEETS = {"paper": "paper (ordinary copy paper)", "fabric": "a thin woven fabric"}


def sheet_outline(f: Footprint) -> list[tuple[float, float]]:
    """The outline of ``f`` counter-clockwise (x, y in mm), corners as short chords (a
    plate's arcs too, ARC_STEPS_PER_DEG a degree)."""
    if f.outline is not None:
        return outline_points(f.outline.pieces())
    cx, cy = f.center_mm
    hx, hy = f.size_mm[0] / 2.0, f.size_mm[1] / 2.0
    r = f.corner_radius_mm
    if r <= 0.0:
        return [(cx + hx, cy - hy), (cx + hx, cy + hy), (cx - hx, cy + hy), (cx - hx, cy - hy)]
    pts = []
    n = 90 * ARC_STEPS_PER_DEG
    for k, (sx, sy) in enumerate(((1, -1), (1, 1), (-1, 1), (-1, -1))):
        ox, oy = cx + sx * (hx - r), cy + sy * (hy - r)
        for j in range(n + 1):
            a = math.radians(-90.0 + 90.0 * k + 90.0 * j / n)
            pts.append((ox + r * math.cos(a), oy + r * math.sin(a)))
    return pts


def outline_points(pieces: Sequence[Line2 | Arc2]) -> list[tuple[float, float]]:
    """A chain of lines and arcs as the corners of a polygon (each arc by chords,
    ARC_STEPS_PER_DEG a degree)."""
    pts: list[tuple[float, float]] = []
    for p in pieces:
        if isinstance(p, Line2):
            pts.append(p.start)
            continue
        n = max(1, math.ceil(abs(math.degrees(p.sweep_rad)) * ARC_STEPS_PER_DEG))
        pts += [p.point(j / n) for j in range(n)]
    return pts


def sheet_svg(outline: Sequence[tuple[float, float]], caption: str) -> bytes:
    """A 1:1 SVG page (user unit = 1 mm) with the cut outline (``id="sheet-outline"``),
    a caption and a scale bar. SVG's y axis points down: y is flipped, so the template lies
    as the part does seen from above."""
    xs, ys = [p[0] for p in outline], [p[1] for p in outline]
    x0, y1 = min(xs) - PAGE_MARGIN_MM, max(ys) + PAGE_MARGIN_MM
    w = max(max(xs) - min(xs), SCALE_BAR_MM) + 2 * PAGE_MARGIN_MM
    h = max(ys) - min(ys) + 2 * PAGE_MARGIN_MM + 16.0
    pts = " ".join(f"{x - x0:.4f},{y1 - y:.4f}" for x, y in outline)
    bar_y = max(ys) - min(ys) + 2 * PAGE_MARGIN_MM
    text = (f'<?xml version="1.0" encoding="UTF-8"?>\n'
            f'<svg xmlns="http://www.w3.org/2000/svg" width="{w:.4f}mm" height="{h:.4f}mm" '
            f'viewBox="0 0 {w:.4f} {h:.4f}">\n'
            f'  <polygon id="sheet-outline" points="{pts}" fill="none" stroke="black" '
            f'stroke-width="0.2"/>\n'
            f'  <line id="scale-bar" x1="{PAGE_MARGIN_MM:.4f}" y1="{bar_y:.4f}" '
            f'x2="{PAGE_MARGIN_MM + SCALE_BAR_MM:.4f}" y2="{bar_y:.4f}" stroke="black" '
            f'stroke-width="0.4"/>\n'
            f'  <text x="{PAGE_MARGIN_MM:.4f}" y="{bar_y + 6:.4f}" font-size="3.5">'
            f'{caption}; the bar is {SCALE_BAR_MM:g} mm: print at 100 %</text>\n'
            f'</svg>\n')
    return text.encode()


def step_files(s: LayerStep, label: str) -> dict[str, bytes]:
    """The STL of every part of ``s`` (pour orientation) and, for a step with a sheet, its
    template."""
    out = {f"{s.folder}/{p.name}.stl": encode_binary_stl(p.mesh, f"{label} {s.name} {p.name}")
           for p in s.parts}
    inset = s.layer.sheet_inset_mm
    if inset is not None:
        out[f"{s.folder}/{SHEET_NAME}"] = sheet_svg(
            sheet_outline(s.layer.footprint.inset(inset)),
            f"{label}: strain-limiting sheet, cut on the line")
    return out


def step_print_files(m: LayeredMoldSet | OvermoldMoldSet | MeltedMoldSet,
                     s: LayerStep | OvermoldStep | CoreMoldStep,
                     plans: Mapping[str, PrintPlan]) -> dict[str, bytes]:
    """For CAD and the printer: the STEP (AP214, mm, pour orientation) of every printed
    part of ``s`` and its print plates (3MF and a top-view PNG per bed, each part in the
    pose its print check chose)."""
    # Imported here: writing the meshes alone must not load the CAD kernel.
    from ..geometry.tessellate import step_bytes

    r = m.recipe
    tag = f"{r.name}-{r.label}-{s.name}"
    out = {f"{s.folder}/{name}.step": step_bytes(s.part(name).brep, f"{tag}-{name}")
           for name in plans}
    items = [PlateItem(r.label, name, posed_vertices(s.part(name).mesh.vertices, plan.down,
                                                     plan.turn_deg))
             for name, plan in plans.items()]
    faces = {(r.label, it.part): s.part(it.part).mesh.faces for it in items}
    bed = (float(r.printer.bed_mm[0]), float(r.printer.bed_mm[1]))
    _, plates = plate_files([items], faces, bed, f"{r.name} {r.label} step {s.index} {s.name}")
    out.update({f"{s.folder}/{name}": data for name, data in plates.items()})
    return out


def _pour_line(s: LayerStep) -> str:
    q = s.pour
    weigh = ", ".join(f"{p.what} {p.grams:g} g" for p in q.portions)
    return (f"{mm3_to_cm3(q.cast_mm3):.2f} cm3 of silicone "
            f"({mm3_to_cm3(q.mixed_mm3):.2f} cm3 mixed with {q.waste_pct:g} % waste: {weigh})")


def card_text(m: LayeredMoldSet, files: Mapping[str, bytes]) -> bytes:
    r = m.recipe
    first, second = m.steps
    sheet = SHEETS.get(r.process.sheet)
    lines = [f"# Casting card: {r.name} {r.label} (layered, two pours)", "",
             r.description, "",
             f"Silicone: {r.material.silicone.name}. The finished actuator holds "
             f"{mm3_to_cm3(m.silicone_volume_mm3):.2f} cm3.", "", "## Pours, in order", "",
             f"1. {first.folder}: the chambered layer, {_pour_line(first)}. Fill the tray to "
             f"its rim, lower the post bridge straight down onto the rim (its skirt locates "
             f"it; the excess rises through the overflow hole) and let it cure. Pull the "
             f"bridge straight up, then lift the part out of the tray.",
             f"2. {second.folder}: the base layer, {_pour_line(second)}. Pour the weighed "
             f"base into the tray's pocket (it fills it to the bond face, where the wider "
             f"guide begins)"
             + (f", lay the sheet of {sheet} cut to {SHEET_NAME} on the liquid base"
                if sheet is not None else "")
             + ", press the cured chambered part face down into the guide with a flat "
             "plate until the plate rests on the tray's rim, and let it cure.", "",
             "Posts drafted "
             f"{r.process.draft_deg:g} deg (least measured on the mesh: "
             f"{first.least_post_draft_deg:.3f} deg).", "",
             mouth_text(r), ""]
    lines += _motion_lines(m)
    lines += ["## Parts to print", ""]
    lines += print_lines(m, files)
    lines += ["", "## Checks", ""]
    # Every finding of both steps, errors first (the order the build keeps), so what the
    # manifest records is what the person at the bench reads.
    lines += [f"- {f.severity}: {f.check} ({f.part}): {f.message}" for f in m.findings] \
        or ["- no findings"]
    lines += ["", "## Cautions", ""]
    lines += [f"- {c}" for c in CAUTIONS]
    return ("\n".join(lines) + "\n").encode()


def mouth_text(r: Recipe) -> str:
    """Where the tube goes: the inlet face, or a channel network's mouth on the outline
    with no socket (x, y in mm; on a hub, the mouth's bearing from its centre, deg
    counter-clockwise from +x)."""
    v = r.voids[0] if r.voids else None
    if not isinstance(v, Channels) or r.inlets:
        return ("The feed groove opens on the inlet face: seal a tube into it with a drop "
                "of the same silicone.")
    x0, y0 = v.mouth_mm()
    where = f"x = {_r2(x0):g}, y = {_r2(y0):g} mm"
    hub = getattr(r.body, "hub_center_mm", None)
    centre = hub() if hub is not None else None
    if centre is not None:
        bearing = math.degrees(math.atan2(y0 - centre[1], x0 - centre[0])) % 360.0
        radius = getattr(r.body, "hub_diameter_mm", 0.0) / 2.0
        on_edge = abs(math.dist((x0, y0), centre) - radius) < 1e-3
        where = (f"on the hub's edge at {_r2(bearing):g} deg, {where}" if on_edge else
                 f"at {_r2(bearing):g} deg from the hub's centre, {where}")
    return (f"The feed groove opens on the body's outline {where} (there is no socket): "
            "seal a tube into it with a drop of the same silicone.")


def _r2(x: float) -> float:
    return round(float(x), 2) + 0.0  # + 0.0: no "-0.0" in the text


def _r4(x: float) -> float:
    return round(float(x), 4) + 0.0  # + 0.0: no "-0.0" in the file


def _motion_lines(m: LayeredMoldSet) -> list[str]:
    """The predicted bend at the working pressure, with the model's name (an estimate)."""
    mo = m.motion
    if mo is None:
        return []
    at = mo.at_working
    where = (f"about {at.angle_deg:.0f} deg of tip bend at {at.pressure_kpa:g} kPa"
             if at is not None else f"no prediction at the working pressure (the curve stops "
             f"at {mo.valid_to_kpa:.0f} kPa: {mo.stop})")
    return [f"Predicted motion ({mo.model}, an estimate for comparing variants, not a "
            f"rating): {where}; {mo.linear_deg_per_kpa:.3f} deg per kPa at small pressure.",
            ""]


def print_lines(m: LayeredMoldSet | OvermoldMoldSet | MeltedMoldSet,
                files: Mapping[str, bytes]) -> list[str]:
    """Per step, each printed part with the face it is printed on and where its plates
    are (the STEP beside it for CAD)."""
    out = []
    steps: Sequence[LayerStep | OvermoldStep | CoreMoldStep] = (
        m.steps[:1] if isinstance(m, MeltedMoldSet) else m.steps)
    for s, plans in zip(steps, m.print_plans):
        for name, plan in plans.items():
            d = ", ".join(f"{c:g}" for c in (round(x, 3) + 0.0 for x in plan.down))
            out.append(f"- {s.folder}/{name}: face ({d}) on the bed, turned "
                       f"{plan.turn_deg:g} deg; {s.folder}/{name}.step for CAD")
        plates = sorted(f for f in files if f.startswith(f"{s.folder}/") and f.endswith(".3mf"))
        if plates:
            out.append(f"- {s.folder}: print plates {', '.join(plates)} (a top-view PNG "
                       "beside each)")
    return out or ["- see each step's folder"]


def _round4(x: float | None) -> float | None:
    return None if x is None else _r4(x)


def finding_record(f: Finding) -> Finding:
    """One finding as the manifest writes it (figures to 0.1 micrometre or 0.0001 deg, as
    a one-shot manifest does)."""
    w = f.where_mm
    return Finding(f.check, f.severity, f.part, _round4(f.value), _round4(f.limit),
                   None if w is None else (_r4(w[0]), _r4(w[1]), _r4(w[2])), f.message)


def _step_record(s: LayerStep, files: Mapping[str, bytes]) -> StepRecord:
    parts = part_records(s.folder, s.parts, files)
    pour = pour_record(s.pour)
    return StepRecord(s.index, s.name, s.folder, parts, pour, s.least_post_draft_deg)


def manifest_of(m: LayeredMoldSet, files: dict[str, bytes]) -> SteppedManifest:
    r = m.recipe
    return SteppedManifest(
        STEPPED_FORMAT, __version__, r.name, r.label, m.plan.source_params_sha256,
        ProcessEcho(typing.cast("dict[str, JsonValue]", r.process.params())),
        m.silicone_volume_mm3, tuple(_step_record(s, files) for s in m.steps),
        None if m.motion is None else motion_record(m.motion), None, None, None,
        verdict(m.findings),
        tuple(finding_record(f) for f in m.findings),
        {k: hashlib.sha256(v).hexdigest() for k, v in sorted(files.items())})


def encode_layered(m: LayeredMoldSet) -> dict[str, bytes]:
    """Every file of ``m`` (relative path -> bytes), the manifest last."""
    files: dict[str, bytes] = {}
    for i, s in enumerate(m.steps):
        files.update(step_files(s, m.recipe.label_text))
        if m.print_plans:
            files.update(step_print_files(m, s, m.print_plans[i]))
    files[CARD_NAME] = card_text(m, files)
    files[MANIFEST_NAME] = json_bytes(to_json(manifest_of(m, files)))
    return files


def write_layered(m: LayeredMoldSet, root: str | os.PathLike[str] = "out") -> list[Path]:
    """Write ``m`` under ``root/<recipe>/<label>/`` as a whole (see
    :func:`soft_molds.export.files.write_file_set`)."""
    directory = output_dir(root, m.recipe.name, m.recipe.label)
    return write_file_set(directory, encode_layered(m), last=MANIFEST_NAME, subfolders=True)
