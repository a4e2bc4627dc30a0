"""Files of a melted-core build (see :mod:`soft_molds.plan.processes.melted_core`),
written as one variant folder:

- ``step-1-core-mold/``: the core mold's shells and the core as cast (STL, world frame,
  up as poured), the shells' STEP files and print plates;
- ``step-2-silicone/``: the one-shot mold set around the core, as a one-shot build writes
  it (STL and STEP of every part and its own ``manifest.json``); its ``core`` part is the
  core cast in step 1, listed for reference, not printed;
- at the top the casting card (both pours in order, the melt-out) and ``manifest.json``
  listing the steps (:mod:`soft_molds.export.steps_manifest`), written last.
"""

from __future__ import annotations

import hashlib
import os
from collections.abc import Mapping
from pathlib import Path

from ..analysis.findings import verdict
from ..analysis.melted import CoreMoldStep, MeltedMoldSet, SiliconeStep
from ..units import mm3_to_cm3
from ..version import __version__
from .card import CAUTIONS, silicone_pour_line
from .files import json_bytes, write_file_set
from .layered import finding_record, print_lines, step_print_files
from .manifest import MANIFEST_NAME, motion_record
from .steps_manifest import (
    MELTED_FORMAT,
    OpeningRecord,
    ProcessEcho,
    SteppedManifest,
    StepRecord,
    part_records,
    pour_record,
)
from .stl import encode_binary_stl
from .typedjson import to_json
from .writer import encode_mold_set, output_dir

CARD_NAME = "casting-card.md"

#: What the silicone step's folder holds of the one-shot formats: the parts and their CAD
#: files. Its card and print plates would tell the reader to print the core, which this
#: process casts instead; the card at the top takes their place.
SILICONE_FORMATS = ("stl", "step")

#: Cautions of a melted core beyond every card's (common practice).
MELT_CAUTIONS = (
    "Molten wax and molten alloy burn skin: wear heat-resistant gloves and eye "
    "protection, melt in a double boiler or a temperature-controlled pot, never over an "
    "open flame, and keep water away from molten alloy (it spatters).",
    "Overheated wax gives off fumes and can catch fire; molten alloys give off fumes too: "
    "work in a ventilated space, stay below the temperature the material's data sheet "
    "allows and keep a lid at hand to smother a fire. Alloys that contain lead or cadmium "
    "are toxic: follow their safety data sheet for handling and disposal.",
    "A printed mold softens when hot material is poured into it: pour at the lowest "
    "temperature the data sheet allows.",
)

MATERIAL_WORDS = {"wax": "casting wax", "low-melt-alloy": "low-melting alloy"}


def _melt_pour_line(s: CoreMoldStep) -> str:
    q = s.pour
    return (f"{q.portions[0].grams:g} g of {q.portions[0].what} "
            f"({mm3_to_cm3(q.mixed_mm3):.2f} cm3: the core's {mm3_to_cm3(q.cast_mm3):.2f} "
            f"cm3 with the sprue and vents and {q.waste_pct:g} % waste, at "
            f"{q.density_g_cm3:g} g/cm3)")



def card_text(m: MeltedMoldSet, files: Mapping[str, bytes]) -> bytes:
    r = m.recipe
    g = r.material.silicone
    first, second = m.steps
    what = MATERIAL_WORDS[r.core.material]
    vents = len(first.openings) - 1
    lines = [f"# Casting card: {r.name} {r.label} (melted core, two pours)", "",
             r.description, "",
             f"Core: {what}, {mm3_to_cm3(m.core_volume_mm3):.2f} cm3, "
             f"{m.core_mass_g:.1f} g at {first.pour.density_g_cm3:g} g/cm3. "
             f"Silicone: {g.name}; the finished actuator holds "
             f"{mm3_to_cm3(m.silicone_volume_mm3):.2f} cm3.", ""]
    for f in m.support:
        way = "floats up" if f.floats else "sinks"
        lines += [f"In the liquid silicone the core {way} with a net "
                  f"{abs(f.net_force_n):.3f} N ({f.immersed_mm3:.0f} mm3 of it inside the "
                  f"body), held by {len(f.supports)} support(s), its core print.", ""]
    lines += [
        "## Steps, in order", "",
        f"1. Print the core mold: {first.folder}/shell-lower and shell-upper (poses and "
        "plates below).",
        f"2. Pour the core: coat the cavity thinly with a release agent suited to {what}, "
        f"close the halves on the keys and clamp them; melt {_melt_pour_line(first)} and "
        f"pour it through the sprue until it shows in every vent ({vents} vents). Follow "
        f"the {what}'s data sheet for the pouring temperature. It shrinks as it sets: top "
        "up the sprue while it sinks (common practice).",
        "3. Demold the core: once it has cooled through to room temperature, open the "
        "halves (pry at the notches) and lift the core out by its print; cut the sprue "
        "and vent stubs off flush and keep its surface free of dents.",
        f"4. Place the core: seat its print in {second.folder}'s lower shell (the square "
        "key in its pocket), coat the shells with a release agent suited to silicone and "
        "close the upper shell on the keys, then clamp.",
        f"5. Pour the silicone: {silicone_pour_line(second.pour)}. Mix, degas and pour "
        "through the sprue until silicone shows in every vent.",
        f"6. Cure: at least {g.demold_h:g} h at room temperature (the grade's demold time; "
        f"pot life {g.pot_life_min:g} min), then open the shells. Keep the cure below the "
        f"{what}'s softening point: no heat to speed it up.",
        f"7. Melt out: cut the core print off flush at the socket, stand the cast "
        f"inlet-down over a catch tray and warm it until the {what} runs out through the "
        "socket (follow the wax's data sheet for the temperature; stay well below what "
        "the silicone's data sheet allows).",
        "8. Flush: while the cast is still warm, flush hot water through the socket until "
        "no more of the core comes out (shake out the last beads of an alloy), then dry "
        "the cast and push the tube into the socket.", "",
        "## Parts to print", ""]
    lines += print_lines(m, files)
    lines += [f"- {second.folder}: shell-lower, shell-upper (their STL and STEP files); "
              f"its core.stl is the core cast in step 1, not printed", ""]
    lines += ["## Checks", ""]
    lines += [f"- {f.severity}: {f.check} ({f.part}): {f.message}" for f in m.findings] \
        or ["- no findings"]
    lines += ["", "## Cautions", ""]
    lines += [f"- {c}" for c in (*MELT_CAUTIONS, *CAUTIONS)]
    return ("\n".join(lines) + "\n").encode()


def _openings(s: CoreMoldStep | SiliconeStep) -> tuple[OpeningRecord, ...]:
    return tuple(OpeningRecord(str(o.kind), (float(o.center_mm[0]), float(o.center_mm[1]),
                                             float(o.center_mm[2])), o.radius_mm)
                 for o in s.openings)


def manifest_of(m: MeltedMoldSet, files: Mapping[str, bytes]) -> SteppedManifest:
    r = m.recipe
    first, second = m.steps
    records = (
        StepRecord(first.index, first.name, first.folder,
                   part_records(first.folder, first.parts, files), pour_record(first.pour),
                   None, _openings(first),
                   {rel.part: rel.locked_mm3 for rel in first.releases}),
        StepRecord(second.index, second.name, second.folder,
                   part_records(second.folder, second.parts, files),
                   pour_record(second.pour), None, _openings(second)))
    return SteppedManifest(
        MELTED_FORMAT, __version__, r.name, r.label, m.plan.source_params_sha256,
        ProcessEcho({"kind": "melted-core", "core": dict(r.core.params())}),
        m.silicone_volume_mm3, records,
        None if m.motion is None else motion_record(m.motion), None, None, None,
        verdict(m.findings), tuple(finding_record(f) for f in m.findings),
        {k: hashlib.sha256(v).hexdigest() for k, v in sorted(files.items())})


def encode_melted(m: MeltedMoldSet) -> dict[str, bytes]:
    """Every file of ``m`` (relative path -> bytes), the manifest last."""
    first, second = m.steps
    label = m.recipe.label_text
    files = {f"{first.folder}/{p.name}.stl":
             encode_binary_stl(p.mesh, f"{label} {first.name} {p.name}")
             for p in first.parts}
    if m.print_plans:
        files.update(step_print_files(m, first, m.print_plans[0]))
    inner = encode_mold_set(second.molds, SILICONE_FORMATS).files
    files.update({f"{second.folder}/{name}": data for name, data in inner.items()})
    files[CARD_NAME] = card_text(m, files)
    files[MANIFEST_NAME] = json_bytes(to_json(manifest_of(m, files)))
    return files


def write_melted(m: MeltedMoldSet, root: str | os.PathLike[str] = "out") -> list[Path]:
    """Write ``m`` under ``root/<recipe>/<label>/`` as a whole (see
    :func:`soft_molds.export.files.write_file_set`)."""
    directory = output_dir(root, m.recipe.name, m.recipe.label)
    return write_file_set(directory, encode_melted(m), last=MANIFEST_NAME, subfolders=True)
