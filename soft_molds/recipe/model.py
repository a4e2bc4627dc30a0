"""Frozen value objects of a validated recipe.

Frame (all mm): the body's long axis is +x, starting at the inlet face x = 0; y and z are
across it. The mold splits on a plane normal to the parting axis (y or z); in pour
orientation that axis points up, the "upper" shell lies on its + side and pulls along +axis,
the "lower" shell pulls along -axis, and the core pulls out along -x through the inlet.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Mapping
from dataclasses import asdict, dataclass, field
from enum import Enum
from typing import TYPE_CHECKING, Any

from .contracts import BodyKind, VoidKind, bounds_of
from .cuts import SlitCut
from .materials import Blend, Grade
from .primitives import Primitive, RoundedRod

if TYPE_CHECKING:
    from .kinds.annulus import Groove

#: ISO 273 clearance holes, medium series (mm): the fit for a bolt through both shells.
ISO273_MEDIUM_MM = {"M3": 3.4, "M4": 4.5, "M5": 5.5}


class InletFace(str, Enum):
    """The end face a tube socket enters: ``start`` is the x = 0 face (socket along +x),
    ``end`` the x = body length face (socket along -x)."""

    START = "start"
    END = "end"


@dataclass(frozen=True)
class Inlet:
    """Tube socket where a core leaves the body: a round hole into one end face, centred
    at (y, z) = ``center_mm`` on it, ``socket_depth_mm`` deep along the body's axis (mm)."""

    socket_diameter_mm: float
    socket_depth_mm: float
    center_mm: tuple[float, float]  # (y, z) on the face
    face: InletFace = InletFace.START

    @property
    def at_end(self) -> bool:
        return self.face is InletFace.END

    def face_x_mm(self, body_length_mm: float) -> float:
        """x of the face the socket enters (mm): 0 or the body's length."""
        return body_length_mm if self.at_end else 0.0

    def pull_dir(self) -> tuple[float, float, float]:
        """The unit direction a core leaves through this socket: out of its face."""
        return (1.0, 0.0, 0.0) if self.at_end else (-1.0, 0.0, 0.0)

    def socket(self, body_length_mm: float = 0.0) -> RoundedRod:
        """The socket as a primitive; ``body_length_mm`` places an ``end`` socket."""
        x0 = body_length_mm - self.socket_depth_mm if self.at_end else 0.0
        return RoundedRod("x", x0, self.socket_depth_mm, self.center_mm,
                          self.socket_diameter_mm / 2.0, 0.0)

    def echo(self) -> dict[str, Any]:
        """The recipe echo of this inlet: the face only when it is not the default."""
        out: dict[str, Any] = {"socket_diameter_mm": self.socket_diameter_mm,
                               "socket_depth_mm": self.socket_depth_mm,
                               "center_mm": self.center_mm}
        if self.at_end:
            out["face"] = self.face.value
        return out


@dataclass(frozen=True)
class Parting:
    """Parting plane: normal to ``axis`` ("y" or "z") at ``offset_mm`` along it.

    ``axis == "auto"`` (with ``offset_mm`` None) asks the build to choose the plane; the
    mold set then carries the recipe with the chosen plane filled in.
    """

    axis: str
    offset_mm: float | None

    @property
    def auto(self) -> bool:
        return self.axis == "auto"


@dataclass(frozen=True)
class MoldSettings:
    wall_mm: float            # mold material around the cavity, every side
    flange_mm: float          # extra band around the cavity in the parting plane (keys, bolts)
    clearance_mm: float       # per-side gap of every printed fit (keys, core key)
    clamp_bolt: str           # "M3", "M4", "M5" or "none"
    sprue_diameter_mm: float
    funnel_diameter_mm: float
    vent_diameter_mm: float
    key_diameter_mm: float    # registration key base diameter
    key_height_mm: float
    core_handle_mm: float     # how far the core print stands out of the block

    @property
    def clamp_hole_mm(self) -> float | None:
        return ISO273_MEDIUM_MM.get(self.clamp_bolt)


@dataclass(frozen=True)
class Checks:
    min_wall_mm: float        # thinnest silicone wall accepted anywhere
    min_draft_deg: float      # walls with less draft are reported (deg)
    core_safety_factor: float  # on the elongation at break, for pulling the core out
    core_slenderness_max: float  # free length / narrowest width of the core


@dataclass(frozen=True)
class Material:
    """The silicone: the recipe's ``material`` values and the grade they resolve to
    (``silicone``: table grade, measured overrides and blend applied; see
    :mod:`.materials`)."""

    grade: str
    table_file: str | None
    shore_a: float | None
    youngs_modulus_mpa: float | None
    density_g_cm3: float | None
    elongation_pct: float | None
    blend_with: str | None
    target_shore_a: float | None
    silicone: Grade
    blend: Blend | None = None

    @property
    def elongation_at_break_pct(self) -> float:
        return self.silicone.elongation_pct


@dataclass(frozen=True)
class Inflate:
    """Working (gauge) pressure in kPa, or None when the recipe gives none."""

    working_pressure_kpa: float | None


@dataclass(frozen=True)
class CastingSettings:
    waste_pct: float              # silicone mixed beyond the mold's fill (%)
    scale_resolution_g: float     # weights are rounded up to this (g)
    infill_pct: float             # of the printed mold parts, for the print estimate (%)
    filament_density_g_cm3: float


@dataclass(frozen=True)
class LabelSettings:
    """The label cut into every printed part: ``mode`` deboss or none, the recipe ``tag``
    (resolved: never None), glyph ``height_mm``, ``depth_mm`` and ``stroke_mm``."""

    mode: str
    tag: str
    height_mm: float
    depth_mm: float
    stroke_mm: float


@dataclass(frozen=True)
class PrinterSettings:
    """FDM printer limits: bed (x, y) and height (mm), nozzle (mm), wall perimeters and the
    steepest overhang from vertical (deg)."""

    bed_mm: tuple[float, float]
    height_mm: float
    nozzle_mm: float
    perimeters: int
    overhang_deg: float


@dataclass(frozen=True)
class MeshSettings:
    chord_mm: float           # largest distance between a facet and the true surface
    angle_deg: float          # largest angle between neighbouring facet normals on a curve


@dataclass(frozen=True)
class Process:
    """How the actuator is cast: ``kind`` "one-shot", "layered" or "overmold".

    Layered: the draft on the first step's posts (deg), the base layer's thickness (mm,
    from the body's bottom to the bond face), the strain-limiting sheet's inset from the
    footprint (mm) and the sheet ("paper", "fabric" or "none"). Overmold: the skin's
    thickness (mm), the thread guides ("none", "single", "double"), their helix pitch,
    ridge height and width (mm), the thread's diameter (mm) and the bladder's section
    ("round" or "half-round"); a half-round bladder also reads the sheet and its inset."""

    kind: str = "one-shot"
    draft_deg: float = 1.0
    base_mm: float = 4.0
    cover_margin_mm: float = 2.0
    sheet: str = "paper"
    skin_mm: float = 1.5
    guides: str = "double"
    guide_pitch_mm: float = 6.0
    guide_height_mm: float = 0.8
    guide_width_mm: float = 1.2
    thread_diameter_mm: float = 0.5
    bladder: str = "round"

    @property
    def layered(self) -> bool:
        return self.kind == "layered"

    @property
    def multi_step(self) -> bool:
        """Cast in more than one pour: built and written step by step."""
        return self.kind != "one-shot"

    def params(self) -> dict[str, Any]:
        """The values of this kind of process (a layered recipe's hash is the same as
        before the overmold fields existed, and a round bladder's as before the half-round
        one)."""
        names = (LAYERED_FIELDS if self.layered else OVERMOLD_FIELDS
                 + (HALF_ROUND_FIELDS if self.bladder == "half-round" else ()))
        values = asdict(self)
        return {"kind": self.kind, **{n: values[n] for n in names}}


@dataclass(frozen=True)
class CoreSettings:
    """What becomes of the core after the cure: ``kind`` "pulled" (drawn out through its
    socket), "dissolved" (printed in a water-soluble filament and dissolved out through
    the socket) or "melted" (cast in ``material``, "wax" or "low-melt-alloy", in a core
    mold the tool also makes, and melted out through the socket). Dissolved and melted
    cores are lost cores, never pulled."""

    kind: str = "pulled"
    material: str = "wax"
    #: What holds the core: "prints", "magnets" or "both" (see :attr:`magnets`).
    support: str = "prints"
    magnet_diameter_mm: float = 2.0
    magnet_thickness_mm: float = 1.0
    #: Pocket diameter minus magnet diameter (mm): negative is a press fit.
    press_fit_mm: float = -0.1

    @property
    def magnets(self) -> bool:
        """A disc magnet pair holds the core: one in the print's key, one in the seat."""
        return self.support != "prints"

    @property
    def lost(self) -> bool:
        return self.kind != "pulled"

    @property
    def melted(self) -> bool:
        return self.kind == "melted"

    def params(self) -> dict[str, Any]:
        """The echo of a lost core: the material only where it is read (a melted core), so
        a dissolved core hashes as before the material existed; the magnet fields only
        with magnets, so a core held by its print hashes as before they existed."""
        magnets = ({"support": self.support, "magnet_diameter_mm": self.magnet_diameter_mm,
                    "magnet_thickness_mm": self.magnet_thickness_mm,
                    "press_fit_mm": self.press_fit_mm} if self.magnets else {})
        return {"kind": self.kind, **({"material": self.material} if self.melted else {}),
                **magnets}


#: The process fields each multi-step kind reads.
LAYERED_FIELDS = ("draft_deg", "base_mm", "cover_margin_mm", "sheet")
OVERMOLD_FIELDS = ("skin_mm", "guides", "guide_pitch_mm", "guide_height_mm",
                   "guide_width_mm", "thread_diameter_mm")
#: Further fields a half-round overmold reads: its section, the strain-limiting sheet laid
#: on its flat face and the sheet's inset (shared with the layered process).
HALF_ROUND_FIELDS = ("bladder", "sheet", "cover_margin_mm")


@dataclass(frozen=True)
class Recipe:
    """A validated recipe. ``body`` and ``voids`` are instances of registered kinds (see
    :mod:`.contracts` for what they provide and the frame they share)."""

    name: str
    label: str
    description: str
    body: BodyKind
    voids: tuple[VoidKind, ...]
    inlets: tuple[Inlet, ...]
    parting: Parting
    mold: MoldSettings
    checks: Checks
    mesh: MeshSettings
    material: Material
    inflate: Inflate
    casting: CastingSettings
    label_settings: LabelSettings
    printer: PrinterSettings
    source: str = ""
    process: Process = field(default_factory=Process)
    core: CoreSettings = field(default_factory=CoreSettings)
    #: Voids cut from the outside (``slits``), listed after ``voids`` in the recipe: not
    #: part of any core, removed from the body itself (:meth:`outer_cuts`).
    outer: tuple[VoidKind, ...] = ()
    #: Field path -> source line, for problems found after loading (the plan stage's).
    lines: Mapping[str, int] = field(default_factory=dict, compare=False, repr=False)

    @property
    def inlet(self) -> Inlet:
        """The first inlet (the only one of a recipe with an ``inlet`` block; the layered
        process has one feed)."""
        return self.inlets[0]

    def inlet_path(self, i: int) -> str:
        """The recipe path of inlet ``i``: ``inlets[i]``, or ``inlet`` when the recipe
        wrote the one-socket block."""
        return f"inlets[{i}]" if "inlets" in self.lines else "inlet"

    def sockets(self) -> tuple[RoundedRod, ...]:
        """Every inlet's tube socket as a primitive, in recipe order (mm, world)."""
        length = self.body_length_mm
        return tuple(i.socket(length) for i in self.inlets)

    @property
    def label_text(self) -> str:
        """What is cut into the parts: the recipe tag and the variant label."""
        return f"{self.label_settings.tag} {self.label}".strip()

    def body_primitives(self) -> tuple[Primitive, ...]:
        return self.body.primitives()

    def body_bounds(self) -> tuple[tuple[float, float, float], tuple[float, float, float]]:
        """The body's axis-aligned bounds (lo, hi), mm, derived from its primitives."""
        return bounds_of(self.body_primitives())

    @property
    def body_length_mm(self) -> float:
        """Extent along x from the inlet face (mm)."""
        lo, hi = self.body_bounds()
        return hi[0] - lo[0]

    def void_primitives(self) -> tuple[tuple[Primitive, ...], ...]:
        """Primitives per void entry, in recipe order (without the inlet socket)."""
        length = self.body_length_mm
        return tuple(v.primitives(length) for v in self.voids)

    def groove(self) -> Groove | None:
        """The open groove of a ring cuff (an ``annulus`` with ``opens_to: outside``), or
        None: its figures (mm)."""
        for v in self.outer:
            groove = getattr(v, "groove", None)
            if groove is not None:
                found: Groove = groove()
                return found
        return None

    def outer_primitives(self) -> tuple[Primitive, ...]:
        """The solids cut from the body by outside voids that are not slit rows (an open
        groove), in recipe order (mm, world)."""
        length = self.body_length_mm
        return tuple(p for v in self.outer for p in v.primitives(length))

    def outer_cuts(self) -> tuple[SlitCut, ...]:
        """Every cut of the ``outer`` voids, in recipe order (mm, world)."""
        return tuple(c for v in self.outer for c in v.cuts(self.body, self.voids))  # type: ignore[attr-defined]

    def params(self) -> dict[str, Any]:
        """Every value that shapes the output, as plain JSON-ready data."""
        def kind_dict(obj: BodyKind | VoidKind) -> dict[str, Any]:
            values = asdict(obj)  # type: ignore[call-overload]
            # Fields added later are echoed only when set off their default.
            for f in obj.FIELDS:
                if not f.echo_default and values[f.name] == f.default:
                    del values[f.name]
            return {"kind": obj.KIND, **values}

        return {
            "name": self.name,
            "label": self.label,
            "body": kind_dict(self.body),
            "voids": [kind_dict(v) for v in (*self.voids, *self.outer)],
            # One inlet on the start face echoes as the ``inlet`` block always did (so the
            # hash and manifest of such a recipe do not change); several as ``inlets``.
            # An open groove has no socket (the collar feeds it): an empty ``inlets``.
            **({"inlet": self.inlets[0].echo()}
               if len(self.inlets) == 1 and not self.inlets[0].at_end
               else {"inlets": [i.echo() for i in self.inlets]}),
            "parting": asdict(self.parting),
            "mold": asdict(self.mold),
            "checks": asdict(self.checks),
            "mesh": asdict(self.mesh),
            "material": asdict(self.material),
            "inflate": asdict(self.inflate),
            "casting": asdict(self.casting),
            "label_settings": asdict(self.label_settings),
            "printer": asdict(self.printer),
            # A one-shot recipe's values (and so its hash and manifest) are the same with
            # or without a process block.
            **({"process": self.process.params()} if self.process.multi_step else {}),
            # Likewise a pulled core (the default) hashes as before the core block existed.
            # Magnets, set off the default, echo too (with them a pulled core's block).
            **({"core": self.core.params()} if self.core.lost or self.core.magnets else {}),
        }

    @property
    def multi_step(self) -> bool:
        """Built and written step by step: a multi-step process, or a melted core (its core
        mold is a step of its own before the silicone's)."""
        return self.process.multi_step or self.core.melted

    def params_sha256(self) -> str:
        canon = json.dumps(self.params(), sort_keys=True, separators=(",", ":"))
        return hashlib.sha256(canon.encode()).hexdigest()
