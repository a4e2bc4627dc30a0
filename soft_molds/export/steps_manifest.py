"""The manifest of a variant cast in several steps (``manifest.json`` at the top of its
folder), typed: written from these dataclasses and read back into them, so the sweep's
cache and reports read fields, never keys.

Frames: every part's ``pull_dir`` is a unit vector in the step's pour orientation (+z up).
Volumes in mm³, masses in g, angles in degrees. ``files`` maps every other file of the
variant (``step-<n>-<name>/<part>.stl``, the card, ...) to its SHA-256 (hex).
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

from ..analysis.casting import Quantities
from ..analysis.findings import Finding, Verdict, verdict
from ..analysis.result import Part
from ..version import __version__
from .manifest import MANIFEST_NAME, ManifestError, MotionRecord
from .typedjson import JsonValue, ShapeError, from_json

#: The ``format`` word of a stepped manifest, per process (a one-shot manifest has none).
STEPPED_FORMAT = "soft-molds layered manifest"
OVERMOLD_FORMAT = "soft-molds overmold manifest"
MELTED_FORMAT = "soft-molds melted-core manifest"
STEPPED_FORMATS = (STEPPED_FORMAT, OVERMOLD_FORMAT, MELTED_FORMAT)


@dataclass(frozen=True)
class StepPartRecord:
    name: str
    role: str
    file: str                 # relative to the variant folder
    printable: bool
    volume_mm3: float         # exact (solid) volume
    pull_dir: tuple[float, float, float] | None
    step: str | None = None   # its STEP file (printed parts), relative to the variant folder


@dataclass(frozen=True)
class PortionRecord:
    what: str
    grams: float


@dataclass(frozen=True)
class StepPourRecord:
    cast_mm3: float
    mixed_mm3: float
    mixed_g: float
    portions: tuple[PortionRecord, ...]


@dataclass(frozen=True)
class OpeningRecord:
    kind: str                 # sprue or vent
    center_mm: tuple[float, float, float]
    radius_mm: float


@dataclass(frozen=True)
class StepRecord:
    """One pour. ``least_post_draft_deg``: a layered chambered step's least post draft;
    ``openings``: sprue and vents of a closed shell; ``release_locked_mm3``: per part, the
    cast it drags when pulled (overmold shells over the thread guides)."""

    index: int                # 1-based, pour order
    name: str
    folder: str
    parts: tuple[StepPartRecord, ...]
    pour: StepPourRecord
    least_post_draft_deg: float | None
    openings: tuple[OpeningRecord, ...] = ()
    release_locked_mm3: Mapping[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class ThreadRecord:
    """The thread to cut for an overmolded bladder's guides (mm)."""

    helices: int
    turns: float
    diameter_mm: float
    pitch_mm: float
    per_helix_mm: float
    total_mm: float


@dataclass(frozen=True)
class ProcessEcho:
    """The recipe's ``process`` block as the build used it (kept whole for the reader;
    its keys differ between processes)."""

    data: Mapping[str, JsonValue]

    @property
    def kind(self) -> str:
        return str(self.data.get("kind", ""))

    def json_value(self) -> JsonValue:
        return dict(self.data)

    @classmethod
    def from_json_value(cls, data: JsonValue, where: str) -> ProcessEcho:
        if not isinstance(data, dict) or not isinstance(data.get("kind"), str):
            raise ShapeError(where, "expected an object with a string 'kind'")
        return cls(data)


@dataclass(frozen=True)
class SteppedManifest:
    format: str
    version: str
    recipe: str
    label: str
    params_sha256: str        # the recipe as given
    process: ProcessEcho
    actuator_volume_mm3: float
    steps: tuple[StepRecord, ...]
    motion: MotionRecord | None   # the finished actuator's predicted motion
    thread: ThreadRecord | None   # overmold: the thread for the guides
    skin_over_guides_mm: float | None
    axis_offset_mm: float | None
    verdict: Verdict
    checks: tuple[Finding, ...]
    files: Mapping[str, str] = field(default_factory=dict)

    @property
    def mixed_grams(self) -> tuple[float, ...]:
        """Every portion to weigh, all steps in pour order (g)."""
        return tuple(p.grams for s in self.steps for p in s.pour.portions)


def part_records(folder: str, parts: Sequence[Part], files: Mapping[str, bytes]
                 ) -> tuple[StepPartRecord, ...]:
    """The records of one step's ``parts`` (in step folder ``folder``); a part's STEP file
    is named when ``files`` holds it."""
    def step_file(name: str) -> str | None:
        f = f"{folder}/{name}.step"
        return f if f in files else None

    return tuple(StepPartRecord(p.name, p.role, f"{folder}/{p.name}.stl", p.role != "cast",
                                p.brep_volume_mm3,
                                None if p.pull_dir is None else
                                (float(p.pull_dir[0]), float(p.pull_dir[1]),
                                 float(p.pull_dir[2])), step_file(p.name))
                 for p in parts)


def pour_record(q: Quantities) -> StepPourRecord:
    """One pour's silicone as the manifest records it."""
    return StepPourRecord(q.cast_mm3, q.mixed_mm3, q.mixed_g,
                          tuple(PortionRecord(p.what, p.grams) for p in q.portions))


def read_stepped_manifest(path: str | os.PathLike[str]) -> SteppedManifest:
    """The stepped manifest at ``path`` (the file or its folder). Raises
    :class:`ManifestError` naming the file and key when it is missing, not JSON, of another
    format or tool version, misshapen, or its verdict disagrees with its checks."""
    p = Path(path)
    if p.is_dir():
        p = p / MANIFEST_NAME
    try:
        data = json.loads(p.read_bytes().decode("utf-8"))
    except FileNotFoundError:
        raise ManifestError(p, "", "no such file") from None
    except (OSError, UnicodeDecodeError, ValueError) as exc:
        raise ManifestError(p, "", f"cannot read it as JSON: {exc}") from None
    if not isinstance(data, dict) or data.get("format") not in STEPPED_FORMATS:
        raise ManifestError(p, "format", f"expected one of {', '.join(STEPPED_FORMATS)}")
    if data.get("version") != __version__:
        raise ManifestError(p, "version", f"written by soft_molds {data.get('version')!r}; "
                            f"this is {__version__} (build the variant again)")
    try:
        man = from_json(SteppedManifest, data)
    except ShapeError as exc:
        raise ManifestError(p, exc.where, exc.problem) from None
    if man.verdict is not verdict(man.checks):
        raise ManifestError(p, "verdict", f"{man.verdict} disagrees with its checks")
    return man
