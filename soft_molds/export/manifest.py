"""``manifest.json``: what a build wrote and why, as a typed value.

:class:`Manifest` mirrors the file field by field (frozen records, keys in file order).
:func:`manifest_of` makes it from a built :class:`~soft_molds.moldset.MoldSet`,
:func:`manifest_bytes` writes it (deterministic JSON, see
:func:`~soft_molds.export.files.json_bytes`) and :func:`read_manifest` reads one back,
checking every key and type and raising :class:`ManifestError` naming the file and the
first bad key.

Units: mm, mm2, mm3, degrees, kPa, MPa, g, g/cm3, minutes and hours, as each name says.
Frame: world (see DEVELOPERS.md); ``*_uv_mm`` are (u, v) on the parting plane, where
(u, v, w) = (x, the other in-plane axis, the parting axis). Figures are rounded as noted
beside each record, so that the same recipe gives the same bytes.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import typing
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from enum import StrEnum
from pathlib import Path
from typing import TYPE_CHECKING

from ..analysis.findings import Finding, Verdict, verdict
from ..analysis.motion.model import MotionKind, StopReason
from ..errors import SoftMoldsError
from ..version import __version__
from .files import json_bytes
from .typedjson import JsonValue, ShapeError, convert, from_json, to_json

if TYPE_CHECKING:
    from ..analysis.casting import CastingPlan
    from ..analysis.motion import MotionCurve, MotionPoint
    from ..analysis.pressure import WallPressure
    from ..analysis.printability import PrintPlan
    from ..analysis.result import BuiltMoldSet, Part
    from ..plan.model import PlaneScore
    from ..recipe.model import Recipe

MANIFEST_NAME = "manifest.json"
UNITS = "mm"

Vec2 = tuple[float, float]
Vec3 = tuple[float, float, float]


class ManifestError(SoftMoldsError):
    """A manifest that cannot be used: missing, not JSON, wrong shape or another version.

    ``path`` is the file, ``key`` the path of the bad value inside it (``""`` for the
    file as a whole), ``problem`` what is wrong."""

    def __init__(self, path: str | os.PathLike[str], key: str, problem: str):
        self.path = str(path)
        self.key = key
        self.problem = problem
        super().__init__(f"{self.path}: {key}: {problem}" if key else f"{self.path}: {problem}")


# --- the records, in file order ----------------------------------------------------------


@dataclass(frozen=True)
class PartRecord:
    """One solid: its files, BRep and mesh volume (mm3, 1e-3), world box (mm, 1e-4),
    triangle count and pull direction (unit vector; None for the cast)."""

    name: str
    role: str
    file: str
    step: str
    volume_mm3: float
    mesh_volume_mm3: float
    bbox_mm: tuple[Vec3, Vec3]
    triangles: int
    pull_dir: Vec3 | None
    printable: bool
    watertight: bool


@dataclass(frozen=True)
class OpeningRecord:
    """A sprue or vent: ``kind``, mouth centre (mm) and diameter (mm), both to 1e-4."""

    kind: str
    at_mm: Vec3
    diameter_mm: float


@dataclass(frozen=True)
class PourRecord:
    """Pour orientation: ``up`` (unit vector), funnel diameter as cut, the openings."""

    up: Vec3
    funnel_diameter_mm: float | None
    openings: tuple[OpeningRecord, ...]


@dataclass(frozen=True)
class PlaneRecord:
    """One candidate parting plane (``parting: auto``) and its score; ``rejected`` names the
    recipe rule it breaks, if any; the first candidate is the one chosen."""

    axis: str
    offset_mm: float
    locked_area_mm2: float
    core_locked_area_mm2: float
    min_draft_deg: float
    rejected: str | None
    chosen: bool


class ChosenBy(StrEnum):
    RECIPE = "recipe"
    ANALYSIS = "analysis"


@dataclass(frozen=True)
class PartingRecord:
    axis: str
    offset_mm: float
    chosen_by: ChosenBy
    candidates: tuple[PlaneRecord, ...]


@dataclass(frozen=True)
class ClampRecord:
    """Clamp bolts through both shells; no hole size for ``bolt: none``."""

    bolt: str
    hole_diameter_mm: float | None
    holes_uv_mm: tuple[Vec2, ...]


@dataclass(frozen=True)
class LabelRecord:
    part: str
    text: str
    height_mm: float
    depth_mm: float


@dataclass(frozen=True)
class PrintRecord:
    """How a printable part goes on the bed: ``down`` is the world vector of the face put on
    the bed, ``turn_deg`` the turn about the vertical, ``size_mm`` its size on the bed."""

    down: Vec3
    turn_deg: float
    size_mm: Vec3
    fits: bool
    contact_area_mm2: float
    overhang_area_mm2: float
    min_wall_mm: float


@dataclass(frozen=True)
class PortionRecord:
    """One component to weigh out: ``g`` grams (rounded up to the scale's resolution) and
    ``ml`` millilitres; ``mix_by`` says which the data sheet mixes by."""

    what: str
    g: float
    ml: float
    mix_by: str


@dataclass(frozen=True)
class BlendRecord:
    """Two grades mixed to a target Shore A: fractions of ``first`` by volume and weight."""

    first: str
    second: str = field(metadata={"json": "with"})
    target_shore_a: float
    volume_fraction_first: float
    weight_fraction_first: float


@dataclass(frozen=True)
class PrintEstimateRecord:
    """Filament for one printed part (an estimate; the slicer's figure wins)."""

    part: str
    volume_mm3: float
    infill_pct: float
    mass_g_estimate: float


@dataclass(frozen=True)
class CastingRecord:
    """The silicone to weigh and its handling times, and the filament to print."""

    grade: str
    shore: str
    scale: str
    hardness: float
    cure: str
    density_g_cm3: float
    mix_ratio: Vec2
    mix_by: str
    note: str
    cast_volume_mm3: float
    fill_volume_mm3: float
    waste_pct: float
    mixed_volume_mm3: float
    mixed_mass_g: float
    portions: tuple[PortionRecord, ...]
    pot_life_min: float
    demold_h: float
    blend: BlendRecord | None
    prints: tuple[PrintEstimateRecord, ...]


@dataclass(frozen=True)
class WallRecord:
    """The weakest wall of one group under inflation: limit pressure (kPa, None when the
    wall has no limit point) and its margin over the working pressure."""

    group: str
    shape: str
    thickness_mm: float
    span_mm: float
    limit_kpa: float | None
    margin: float | None
    thick_wall: bool


@dataclass(frozen=True)
class PressureRecord:
    youngs_modulus_mpa: float | None
    working_pressure_kpa: float | None
    walls: tuple[WallRecord, ...]


@dataclass(frozen=True)
class MotionPointRecord:
    """One point of the predicted curve: pressure (kPa, 1e-3), tip angle (degrees, 1e-3),
    extension (mm, 1e-4) and the largest fibre stretch (1e-4)."""

    pressure_kpa: float
    angle_deg: float
    extension_mm: float
    max_stretch: float


@dataclass(frozen=True)
class MotionRecord:
    """The predicted motion (an estimate; see :mod:`soft_molds.analysis.motion`): the model
    and what it read (active x range, the governing section's silicone area, second moment,
    pressure area and lever arm, rounded to 1e-4), the small-pressure slopes (1e-6), where
    the curve stops and why, the point at the working pressure and the curve."""

    model: str
    kind: MotionKind
    youngs_modulus_mpa: float
    active_from_mm: float
    active_to_mm: float
    sections: int
    bend_dir: Vec2
    at_x_mm: float
    silicone_area_mm2: float
    second_moment_mm4: float
    pressure_area_mm2: float
    lever_arm_mm: float
    linear_deg_per_kpa: float
    linear_mm_per_kpa: float
    limit_kpa: float | None
    valid_to_kpa: float
    stop: StopReason
    working_pressure_kpa: float | None
    at_working: MotionPointRecord | None
    points: tuple[MotionPointRecord, ...]


@dataclass(frozen=True)
class InletRecord:
    """One tube socket as the recipe echo lists it: its face (``start``: x = 0, ``end``:
    x = the body's length), centre (y, z) on that face, diameter and depth (mm). Core
    ``core-n`` leaves through inlet n (``core`` through the only one)."""

    face: str
    center_mm: Vec2
    socket_diameter_mm: float
    socket_depth_mm: float


@dataclass(frozen=True)
class RecipeEcho:
    """The resolved recipe as the manifest echoes it (``Recipe.params()``, JSON-shaped).

    It is kept whole so a reader can see every value the build used; code reads it only
    through the typed accessors here, which :func:`read_manifest` checks on reading."""

    data: Mapping[str, JsonValue]

    @property
    def inlet_center_mm(self) -> Vec2:
        """Centre of the first tube socket on its face (y, z), mm."""
        return _inlet_center(self.data, "params")

    @property
    def inlets(self) -> tuple[InletRecord, ...]:
        """Every tube socket, in recipe order (the ``inlet`` block or the ``inlets`` list)."""
        return _inlets(self.data, "params")

    @property
    def core_magnets_mm(self) -> tuple[float, float] | None:
        """The disc magnets' (diameter, thickness) in mm when a magnet pair holds each
        core (``core.support`` magnets or both), else None."""
        core = self.data.get("core")
        if not isinstance(core, dict) or core.get("support") not in ("magnets", "both"):
            return None
        d, t = core.get("magnet_diameter_mm"), core.get("magnet_thickness_mm")
        if not isinstance(d, (int, float)) or not isinstance(t, (int, float)):
            return None
        return float(d), float(t)

    @property
    def core_dissolved(self) -> bool:
        """Whether the core is dissolved out rather than pulled (``core.kind``)."""
        core = self.data.get("core")
        return isinstance(core, dict) and core.get("kind") == "dissolved"

    @property
    def bed_mm(self) -> Vec2:
        """The printer's bed (x, y), mm."""
        printer = self.data.get("printer")
        bed = printer.get("bed_mm") if isinstance(printer, dict) else None
        return typing.cast(Vec2, convert(Vec2, bed, "params.printer.bed_mm"))

    def json_value(self) -> JsonValue:
        return dict(self.data)

    @classmethod
    def from_json_value(cls, data: JsonValue, where: str) -> RecipeEcho:
        if not isinstance(data, dict):
            raise ShapeError(where, "expected an object")
        _inlets(data, where)
        return cls(data)


def _inlet_center(data: Mapping[str, JsonValue], where: str) -> Vec2:
    """The first socket's centre; with no socket (an open groove, fed through its collar)
    the body's middle, y = z = 0, where a ring's axis plane lies."""
    inlets = _inlets(data, where)
    return inlets[0].center_mm if inlets else (0.0, 0.0)


def _inlets(data: Mapping[str, JsonValue], where: str) -> tuple[InletRecord, ...]:
    """The echo's inlets: its ``inlet`` object, or each item of its ``inlets`` list."""
    if "inlets" in data and "inlet" not in data:
        items = data.get("inlets")
        # An open groove has no socket: an empty list (the collar feeds it).
        if not isinstance(items, list):
            raise ShapeError(f"{where}.inlets", "missing or not a list")
        named = [(f"{where}.inlets[{i}]", item) for i, item in enumerate(items)]
    else:
        named = [(f"{where}.inlet", data.get("inlet"))]
    out = []
    for path, item in named:
        if not isinstance(item, dict):
            raise ShapeError(path, "missing or not an object")
        face = item.get("face", "start")
        if face not in ("start", "end"):
            raise ShapeError(f"{path}.face", f"expected start or end, got {face!r}")
        out.append(InletRecord(
            str(face), typing.cast(Vec2, convert(Vec2, item.get("center_mm"),
                                                 f"{path}.center_mm")),
            typing.cast(float, convert(float, item.get("socket_diameter_mm"),
                                       f"{path}.socket_diameter_mm")),
            typing.cast(float, convert(float, item.get("socket_depth_mm"),
                                       f"{path}.socket_depth_mm"))))
    return tuple(out)


@dataclass(frozen=True)
class CollarRecord:
    """What the rigid collar closing a ring's open groove must be, and what the groove
    does (mm, mm2, N): the collar's bore is the ring's outer diameter; the groove bottom's
    diameter, height and area (2 pi r h); its area seen across a diameter (2 r h) and the
    force with which each half of the bore wall is pushed towards the other per kPa of
    gauge pressure (p x that projected area)."""

    inner_diameter_mm: float
    groove_bottom_diameter_mm: float
    groove_height_mm: float
    groove_area_mm2: float
    projected_area_mm2: float
    squeeze_n_per_kpa: float


@dataclass(frozen=True)
class Manifest:
    """Everything ``manifest.json`` says, typed. ``files`` maps every other file written
    beside it to its SHA-256 (hex); it is empty until the files are encoded."""

    recipe: str
    label: str
    tool_version: str
    units: str
    params_sha256: str
    source_params_sha256: str  # the recipe as given (before parting: auto was filled in)
    parts: tuple[PartRecord, ...]
    silicone_volume_mm3: float
    void_volume_mm3: float
    body_volume_mm3: float
    pour: PourRecord
    parting: PartingRecord
    registration_keys_uv_mm: tuple[Vec2, ...]
    clamp: ClampRecord
    labels: tuple[LabelRecord, ...]
    checks: tuple[Finding, ...]
    verdict: Verdict
    prints: Mapping[str, PrintRecord] = field(metadata={"json": "print"})
    casting: CastingRecord | None
    pressure: PressureRecord
    motion: MotionRecord | None
    params: RecipeEcho
    #: Set for a ring with an open groove (closed by a collar after the cure).
    collar: CollarRecord | None = field(default=None, metadata={"optional": True})
    files: Mapping[str, str] = field(default_factory=dict)

    @property
    def inlet_center_mm(self) -> Vec2:
        """Centre of the tube socket on the inlet face (y, z), mm (from the recipe echo)."""
        return self.params.inlet_center_mm

    def part(self, name: str) -> PartRecord:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)

    def with_files(self, files: Mapping[str, bytes]) -> Manifest:
        """This manifest recording the SHA-256 of ``files`` (name -> bytes), by name."""
        return replace(self, files={name: hashlib.sha256(data).hexdigest()
                                    for name, data in sorted(files.items())})

    def to_json(self) -> dict[str, JsonValue]:
        """The manifest as ``json.loads`` would give it back (a fresh dict)."""
        data = to_json(self)
        assert isinstance(data, dict)
        return data


def manifest_bytes(man: Manifest) -> bytes:
    """The bytes of ``manifest.json`` for ``man``."""
    return json_bytes(man.to_json())


# --- reading ------------------------------------------------------------------------------

_SHA256 = re.compile(r"[0-9a-f]{64}")


def read_manifest(path: str | os.PathLike[str], *, any_version: bool = False) -> Manifest:
    """The manifest at ``path`` (a ``manifest.json`` or the folder holding one).

    Raises :class:`ManifestError` naming the file and the key when the file is missing or
    unreadable, is not JSON (a truncated write), lacks a key, has one of the wrong type or
    one this version does not write, or is inconsistent (verdict against checks, digests
    that are not SHA-256). A manifest written by another version of soft_molds is refused
    unless ``any_version``: its layout may differ and its figures came from other code.
    """
    p = Path(path)
    if p.is_dir():
        p = p / MANIFEST_NAME
    try:
        text = p.read_bytes().decode("utf-8")
    except FileNotFoundError:
        raise ManifestError(p, "", "no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ManifestError(p, "", f"cannot read it: {exc}") from None
    try:
        data = json.loads(text)
    except ValueError as exc:
        raise ManifestError(p, "", f"not valid JSON (truncated or damaged?): {exc}") from None
    return parse_manifest(data, p, any_version=any_version)


def parse_manifest(data: object, source: str | os.PathLike[str] = MANIFEST_NAME, *,
                   any_version: bool = False) -> Manifest:
    """``data`` (a ``json.loads`` result) as a :class:`Manifest`; see :func:`read_manifest`.
    ``source`` names the file in error messages."""
    if not isinstance(data, dict):
        raise ManifestError(source, "", "expected a JSON object")
    version = data.get("tool_version")
    if not any_version and isinstance(version, str) and version != __version__:
        raise ManifestError(source, "tool_version",
                            f"written by soft_molds {version!r}; this is {__version__}, "
                            "which reads only its own manifests (build the variant again)")
    try:
        man = from_json(Manifest, data)
    except ShapeError as exc:
        raise ManifestError(source, exc.where, exc.problem) from None
    _check_consistent(man, source)
    return man


def _check_consistent(man: Manifest, source: str | os.PathLike[str]) -> None:
    if man.units != UNITS:
        raise ManifestError(source, "units", f"expected {UNITS!r}, got {man.units!r}")
    for key in ("params_sha256", "source_params_sha256"):
        if not _SHA256.fullmatch(getattr(man, key)):
            raise ManifestError(source, key, "expected 64 lower-case hex digits (SHA-256)")
    for name, digest in man.files.items():
        if not _SHA256.fullmatch(digest):
            raise ManifestError(source, f"files.{name}",
                                "expected 64 lower-case hex digits (SHA-256)")
    if man.verdict is not verdict(man.checks):
        raise ManifestError(source, "verdict", f"says {str(man.verdict)!r} but the checks "
                            f"make it {str(verdict(man.checks))!r}")


# --- making it from a build ---------------------------------------------------------------


def manifest_of(molds: BuiltMoldSet) -> Manifest:
    """The manifest of ``molds`` with no ``files`` yet (see :meth:`Manifest.with_files`)."""
    r = molds.recipe
    lay = molds.layout
    review = molds.review
    assert r.parting.offset_mm is not None, "the build fills in parting: auto"
    return Manifest(
        recipe=r.name,
        label=r.label,
        tool_version=__version__,
        units=UNITS,
        params_sha256=r.params_sha256(),
        source_params_sha256=molds.source_params_sha256 or r.params_sha256(),
        parts=tuple(_part(p) for p in molds.parts),
        silicone_volume_mm3=round(molds.silicone_volume_mm3, 3),
        void_volume_mm3=round(molds.void_volume_mm3, 3),
        body_volume_mm3=round(molds.volumes_mm3["body"], 3),
        pour=PourRecord(
            up=molds.pour_up,
            funnel_diameter_mm=(None if molds.funnel_diameter_mm is None
                                else round(molds.funnel_diameter_mm, 4)),
            openings=tuple(OpeningRecord(o.kind, _vec3(o.center_mm, 4),
                                         round(2 * o.radius_mm, 4)) for o in molds.openings)),
        parting=PartingRecord(
            r.parting.axis, r.parting.offset_mm,
            ChosenBy.ANALYSIS if molds.parting_candidates else ChosenBy.RECIPE,
            tuple(_plane(c, i == 0) for i, c in enumerate(molds.parting_candidates))),
        registration_keys_uv_mm=tuple(_vec2(k, 4) for k in lay.keys_uv),
        clamp=ClampRecord(r.mold.clamp_bolt, r.mold.clamp_hole_mm,
                          tuple(_vec2(b, 4) for b in lay.bolts_uv)),
        labels=tuple(LabelRecord(lab.part, lab.text, round(lab.height_mm, 3),
                                 r.label_settings.depth_mm) for lab in molds.labels),
        checks=tuple(_finding(f) for f in molds.findings),
        verdict=verdict(molds.findings),
        prints={} if review is None else {n: _print(p) for n, p in review.prints.items()},
        casting=None if molds.casting is None else _casting(molds.casting),
        pressure=PressureRecord(
            None if review is None or review.modulus_mpa is None
            else round(review.modulus_mpa, 4),
            r.inflate.working_pressure_kpa,
            tuple(_wall(w, r.inflate.working_pressure_kpa) for w in molds.pressures)),
        motion=None if molds.motion is None else motion_record(molds.motion),
        params=RecipeEcho(json.loads(json_bytes(r.params()))),
        collar=_collar(r),
    )


def _collar(r: Recipe) -> CollarRecord | None:
    g = r.groove()
    if g is None:
        return None
    return CollarRecord(round(2.0 * g.outer_radius_mm, 4), round(2.0 * g.bottom_radius_mm, 4),
                        round(g.height_mm, 4), round(g.bottom_area_mm2(), 3),
                        round(g.projected_area_mm2(), 3), round(g.squeeze_n_per_kpa(), 5))


# ``+ 0.0`` below turns a rounded -0.0 into 0.0 (only where the file has always done so:
# changing it would change the bytes of every manifest).


def _vec2(v: tuple[float, ...], nd: int) -> Vec2:
    return (float(round(v[0], nd)), float(round(v[1], nd)))


def _vec3(v: tuple[float, ...], nd: int, plus: float = -0.0) -> Vec3:
    # plus=0.0 also turns a rounded -0.0 into 0.0 (-0.0 leaves every value as it is).
    return (float(round(v[0], nd)) + plus, float(round(v[1], nd)) + plus,
            float(round(v[2], nd)) + plus)


def _part(p: Part) -> PartRecord:
    lo, hi = p.mesh.bbox_mm()
    return PartRecord(
        p.name, p.role, p.stl_name, p.step_name, round(p.brep_volume_mm3, 3),
        round(p.report.volume_mm3, 3), (_vec3(lo, 4), _vec3(hi, 4)), int(p.mesh.triangle_count),
        None if p.pull_dir is None else (p.pull_dir[0], p.pull_dir[1], p.pull_dir[2]),
        p.role != "cast", p.report.watertight)


def _plane(c: PlaneScore, chosen: bool) -> PlaneRecord:
    return PlaneRecord(c.axis, round(c.offset_mm, 4) + 0.0, round(c.locked_area_mm2, 3) + 0.0,
                       round(c.rigid_locked_area_mm2, 3) + 0.0, round(c.min_draft_deg, 3) + 0.0,
                       c.rule, chosen)


def _finding(f: Finding) -> Finding:
    def r(x: float | None) -> float | None:
        return None if x is None else round(float(x), 4) + 0.0

    where = None if f.where_mm is None else _vec3(tuple(map(float, f.where_mm)), 4, 0.0)
    return Finding(f.check, f.severity, f.part, r(f.value), r(f.limit), where, f.message)


def _print(plan: PrintPlan) -> PrintRecord:
    return PrintRecord(
        _vec3(plan.down, 6, 0.0), round(plan.turn_deg, 3) + 0.0, _vec3(plan.size_mm, 3, 0.0),
        plan.fits, round(plan.contact_area_mm2, 2) + 0.0,
        round(plan.overhang_area_mm2, 2) + 0.0, round(plan.min_wall_mm, 3) + 0.0)


def _casting(plan: CastingPlan) -> CastingRecord:
    q, g, b = plan.quantities, plan.grade, plan.blend
    return CastingRecord(
        grade=g.name, shore=f"{g.scale}{g.hardness:g}", scale=g.scale,
        hardness=round(g.hardness, 3), cure=g.cure, density_g_cm3=round(g.density_g_cm3, 4),
        mix_ratio=(g.mix_ratio[0], g.mix_ratio[1]), mix_by=g.mix_by, note=g.note,
        cast_volume_mm3=round(q.cast_mm3, 3), fill_volume_mm3=round(q.fill_mm3, 3),
        waste_pct=q.waste_pct, mixed_volume_mm3=round(q.mixed_mm3, 3),
        mixed_mass_g=round(q.mixed_g, 3),
        portions=tuple(PortionRecord(p.what, p.grams, p.ml, p.by) for p in q.portions),
        pot_life_min=g.pot_life_min, demold_h=g.demold_h,
        blend=None if b is None else BlendRecord(
            b.first.name, b.second.name, b.target_shore_a,
            round(b.volume_fraction_first, 4), round(b.weight_fraction_first, 4)),
        prints=tuple(PrintEstimateRecord(pe.part, round(pe.volume_mm3, 1), pe.infill_pct,
                                         round(pe.mass_g, 1)) for pe in plan.prints))


def _wall(w: WallPressure, working_kpa: float | None) -> WallRecord:
    margin = w.margin(working_kpa)
    return WallRecord(w.group, w.shape, round(w.thickness_mm, 3), round(2 * w.radius_mm, 3),
                      None if w.limit_kpa is None else round(w.limit_kpa, 1),
                      None if margin is None else round(margin, 3), w.thick)


def _motion_point(p: MotionPoint) -> MotionPointRecord:
    return MotionPointRecord(round(p.pressure_kpa, 3) + 0.0, round(p.angle_deg, 3) + 0.0,
                             round(p.extension_mm, 4) + 0.0, round(p.max_stretch, 4))


def motion_record(m: MotionCurve) -> MotionRecord:
    i = m.inputs
    return MotionRecord(
        model=m.model, kind=m.kind, youngs_modulus_mpa=round(i.youngs_modulus_mpa, 4),
        active_from_mm=round(i.active_from_mm, 4), active_to_mm=round(i.active_to_mm, 4),
        sections=i.sections,
        bend_dir=(round(i.bend_dir[0], 6) + 0.0, round(i.bend_dir[1], 6) + 0.0),
        at_x_mm=round(i.at_x_mm, 4),
        silicone_area_mm2=round(i.silicone_area_mm2, 4),
        second_moment_mm4=round(i.second_moment_mm4, 4),
        pressure_area_mm2=round(i.pressure_area_mm2, 4),
        lever_arm_mm=round(i.lever_arm_mm, 4) + 0.0,
        linear_deg_per_kpa=round(m.linear_deg_per_kpa, 6) + 0.0,
        linear_mm_per_kpa=round(m.linear_mm_per_kpa, 6) + 0.0,
        limit_kpa=None if m.limit_kpa is None else round(m.limit_kpa, 3),
        valid_to_kpa=round(m.valid_to_kpa, 3), stop=m.stop,
        working_pressure_kpa=m.working_pressure_kpa,
        at_working=None if m.at_working is None else _motion_point(m.at_working),
        points=tuple(_motion_point(p) for p in m.points))
