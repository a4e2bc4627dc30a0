"""Files of an overmold build (see :mod:`soft_molds.plan.processes.overmold`), written as
one variant folder: per step a folder ``step-<n>-<name>/`` with its parts' STL files
(actuator frame, z up as poured), and at the top the casting card (both pours in order,
the thread in between) and ``manifest.json`` listing the steps in order, the thread, the
verdict and findings of the overmold checks (``checks``) and every file's SHA-256, written
last.
"""

from __future__ import annotations

import hashlib
import os
import typing
from collections.abc import Mapping
from pathlib import Path

from ..analysis.findings import verdict
from ..analysis.layered import LayeredMoldSet
from ..analysis.melted import MeltedMoldSet
from ..analysis.overmold import WRAP_TURNS_PER_END, OvermoldMoldSet, OvermoldStep
from ..analysis.overmold_checks import thread_round
from ..units import mm3_to_cm3
from ..version import __version__
from .card import CAUTIONS, silicone_pour_line
from .files import json_bytes, write_file_set
from .layered import (
    SHEET_NAME,
    SHEETS,
    finding_record,
    print_lines,
    sheet_svg,
    step_print_files,
)
from .steps_manifest import (
    OVERMOLD_FORMAT,
    OpeningRecord,
    ProcessEcho,
    SteppedManifest,
    StepRecord,
    ThreadRecord,
    part_records,
    pour_record,
)
from .stl import encode_binary_stl
from .typedjson import JsonValue, to_json
from .writer import output_dir

MANIFEST_NAME = "manifest.json"
CARD_NAME = "casting-card.md"

#: Cautions of this process beyond every card's (common practice).
THREAD_CAUTIONS = (
    "Wind the thread snug but not tight: a thread pulled hard cuts into the cured bladder "
    "and, when pressurised, a cut starts a tear.",
    "The core stays in the bladder until the skin has cured: pulling it between the pours "
    "lets the bladder sag off centre and the skin comes out thin on one side.",
)


def step_files(s: OvermoldStep, label: str) -> dict[str, bytes]:
    """The STL of every part of ``s`` and, for the skin over a half-round bladder with a
    sheet, the sheet's 1:1 template (the layered process's)."""
    out = {f"{s.folder}/{p.name}.stl": encode_binary_stl(p.mesh, f"{label} {s.name} {p.name}")
           for p in s.parts}
    sheet = s.overmold.sheet
    if sheet is not None:
        out[f"{s.folder}/{SHEET_NAME}"] = sheet_svg(
            sheet.outline_xy(), f"{label}: strain-limiting sheet, cut on the line")
    return out



def card_text(m: OvermoldMoldSet, files: Mapping[str, bytes]) -> bytes:
    r = m.recipe
    g = r.material.silicone
    first, second = m.steps
    om = first.overmold
    bl = om.bladder
    t = m.thread
    cure = (f"Let it cure for at least {g.demold_h:g} h at room temperature (the grade's "
            f"demold time; pot life {g.pot_life_min:g} min) before opening the shell.")
    lines = [f"# Casting card: {r.name} {r.label} (overmold, two pours)", "",
             r.description, "",
             f"Silicone: {g.name}. The finished actuator holds "
             f"{mm3_to_cm3(m.silicone_volume_mm3):.2f} cm3 (bladder and skin).", "",
             "## Steps, in order", "",
             f"1. {first.folder}: the bladder, {silicone_pour_line(first.pour)}. Push the core "
             f"through the lower shell's inlet wall until its square key sits in its pocket "
             f"and its tip in the seat of the far wall; close the upper shell on the registration "
             f"keys, clamp, and pour through the sprue until silicone rises in every vent "
             f"({len(first.openings) - 1} vents). {cure} Open the shell; leave the "
             f"bladder on the core."]
    if t is not None:
        pattern = ("two opposite-handed helices (one along each guide; where they cross, "
                   "one guide is gapped: lay that thread over the other)"
                   if t.helices == 2 else "one helix along the guide")
        if bl.half_round:
            pattern += (" over the curved face; across the flat face lay it straight and "
                        "flat from the end of one ridge to the start of the next")
        lines.append(
            f"2. Wind the thread: cut {t.helices} piece(s) of {t.per_helix_mm:.0f} mm "
            f"({t.helix_mm:.0f} mm along {t.turns:.2f} turns at {t.pitch_mm:g} mm pitch on "
            f"{thread_round(t)}, the thread's centre line beside the ridges, plus "
            f"{t.ends_mm:.0f} mm for {WRAP_TURNS_PER_END} wraps at each end and the knots). Wind "
            f"{pattern}, starting {bl.guide_start_x_mm:g} mm from the inlet face; tie "
            f"off each end with its wraps on the plain tube there.")
    n = 3 if t is not None else 2
    sheet = second.overmold.sheet
    if sheet is not None:
        length, width = sheet.size_mm
        lines.append(
            f"{n}. Lay the strain-limiting sheet: cut {SHEETS[sheet.material]} to "
            f"{length:g} x {width:g} mm on the line of {second.folder}/{SHEET_NAME} (printed "
            f"at 100 %: measure its scale bar), lay it on the thread across the bladder's "
            f"flat face, {sheet.x0_mm:g} mm in from the inlet face, the far end and both "
            f"edges, and tack it there with a few dabs of mixed silicone so it stays on "
            f"when the bladder goes in flat face down.")
        n += 1
    lines += [
        f"{n}. Place the bladder, still on the core, in {second.folder}'s lower shell: the "
        f"core's key in the same pocket of the inlet wall as before, so the bladder lies "
        f"on the skin mold's axis.",
        f"{n + 1}. {second.folder}: the skin, {silicone_pour_line(second.pour)}. Close the "
        f"upper shell, pour until every vent shows silicone; the skin covers the guides by "
        f"{m.skin_over_guides_mm:.2f} mm and caps the far end"
        + ("" if sheet is None else f", and holds the sheet against the flat face under "
           f"at least {m.sheet_cover_mm or 0.0:.2f} mm") + f". {cure} Open the shell "
        f"and pull the core out through the inlet.", "",
        "The bore opens on the inlet face: seal a tube into it with a drop of the same "
        "silicone." + ("" if sheet is None else " Inflated, the actuator bends towards "
                       "its flat face: the thread keeps the bladder from ballooning, the "
                       "sheet keeps the flat face from stretching."), "",
        "## Parts to print", ""]
    lines += print_lines(m, files)
    lines += ["", "## Checks", ""]
    lines += [f"- {f.severity}: {f.check} ({f.part}): {f.message}" for f in m.findings] \
        or ["- no findings"]
    lines += ["", "## Cautions", ""]
    lines += [f"- {c}" for c in (*CAUTIONS, *THREAD_CAUTIONS)]
    return ("\n".join(lines) + "\n").encode()


def _step_record(s: OvermoldStep, files: Mapping[str, bytes]) -> StepRecord:
    parts = part_records(s.folder, s.parts, files)
    pour = pour_record(s.pour)
    openings = tuple(OpeningRecord(str(o.kind), (float(o.center_mm[0]), float(o.center_mm[1]),
                                                 float(o.center_mm[2])), o.radius_mm)
                     for o in s.openings)
    return StepRecord(s.index, s.name, s.folder, parts, pour, None, openings,
                      {rel.part: rel.locked_mm3 for rel in s.releases})


def manifest_of(m: OvermoldMoldSet, files: dict[str, bytes]) -> SteppedManifest:
    r = m.recipe
    t = m.thread
    thread = None if t is None else ThreadRecord(t.helices, t.turns, t.diameter_mm,
                                                 t.pitch_mm, t.per_helix_mm, t.total_mm)
    return SteppedManifest(
        OVERMOLD_FORMAT, __version__, r.name, r.label, m.plan.source_params_sha256,
        ProcessEcho(typing.cast("dict[str, JsonValue]", r.process.params())),
        m.silicone_volume_mm3, tuple(_step_record(s, files) for s in m.steps), None, thread,
        m.skin_over_guides_mm, m.axis_offset_mm, verdict(m.findings),
        tuple(finding_record(f) for f in m.findings),
        {k: hashlib.sha256(v).hexdigest() for k, v in sorted(files.items())})


def encode_overmold(m: OvermoldMoldSet) -> dict[str, bytes]:
    """Every file of ``m`` (relative path -> bytes), the manifest last."""
    files: dict[str, bytes] = {}
    for i, s in enumerate(m.steps):
        files.update(step_files(s, m.recipe.label_text))
        if m.print_plans:
            files.update(step_print_files(m, s, m.print_plans[i]))
    files[CARD_NAME] = card_text(m, files)
    files[MANIFEST_NAME] = json_bytes(to_json(manifest_of(m, files)))
    return files


def write_overmold(m: OvermoldMoldSet, root: str | os.PathLike[str] = "out") -> list[Path]:
    """Write ``m`` under ``root/<recipe>/<label>/`` as a whole (see
    :func:`soft_molds.export.files.write_file_set`)."""
    directory = output_dir(root, m.recipe.name, m.recipe.label)
    return write_file_set(directory, encode_overmold(m), last=MANIFEST_NAME, subfolders=True)


def write_steps(m: LayeredMoldSet | OvermoldMoldSet | MeltedMoldSet,
                root: str | os.PathLike[str] = "out") -> list[Path]:
    """Write a multi-step build by its process."""
    if isinstance(m, OvermoldMoldSet):
        return write_overmold(m, root)
    if isinstance(m, MeltedMoldSet):
        from .melted import write_melted

        return write_melted(m, root)
    from .layered import write_layered

    return write_layered(m, root)
