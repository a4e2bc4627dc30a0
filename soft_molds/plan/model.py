"""The typed, immutable plan of a mold set: what the geometry stage builds and what each part
is for. Made from a validated recipe by :func:`soft_molds.plan.plan_mold`; completed by the
choice of a parting plane (``parting: auto``) and by the openings located on the cast.

Frame (mm, world): the body starts at the inlet face x = 0 and lies at x >= 0. In pour
orientation the parting plane's normal axis (y or z) points up: the upper shell lies on its
+ side and pulls along +up, the lower shell pulls along -up, and each core pulls out
through its inlet socket: along -x from the start face x = 0, along +x from the end face.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from enum import StrEnum

import numpy as np

from ..recipe.model import InletFace, Recipe
from ..recipe.outline import PieceOutline, offset_outline
from .layout import Layout

Vec3 = tuple[float, float, float]
Box = tuple[Vec3, Vec3]

AXIS_INDEX = {"x": 0, "y": 1, "z": 2}


def unit(axis: int, sign: float = 1.0) -> Vec3:
    """The unit vector along world axis ``axis`` (0, 1, 2) with ``sign``; never -0.0."""
    v = [0.0, 0.0, 0.0]
    v[axis] = sign
    return (v[0] + 0.0, v[1] + 0.0, v[2] + 0.0)


class Role(StrEnum):
    """What a part is for: ``shell`` parts hold the silicone, the ``core`` forms the voids,
    the ``cast`` is the silicone part itself (a preview, never printed)."""

    SHELL = "shell"
    CORE = "core"
    CAST = "cast"


class ChosenBy(StrEnum):
    RECIPE = "recipe"
    ANALYSIS = "analysis"


class OpeningKind(StrEnum):
    SPRUE = "sprue"
    VENT = "vent"


@dataclass(frozen=True)
class PartingPlane:
    """The plane ``coord[axis] = offset_mm`` (axis "y" or "z"); ``axis`` points up in pour
    orientation."""

    axis: str
    offset_mm: float
    chosen_by: ChosenBy = ChosenBy.RECIPE

    def __post_init__(self) -> None:
        if self.axis not in ("y", "z"):
            raise ValueError(f"parting axis must be y or z, got {self.axis!r}")

    @property
    def w_axis(self) -> int:
        return AXIS_INDEX[self.axis]

    @property
    def up(self) -> Vec3:
        return unit(self.w_axis)

    @property
    def down(self) -> Vec3:
        return unit(self.w_axis, -1.0)


@dataclass(frozen=True)
class PlaneScore:
    """One candidate parting plane, scored on the cast and core meshes by the analysis
    stage: silicone area locked in undercuts by either shell (mm2), core-print area a shell
    would lock (mm2; rigid against rigid, never acceptable), the least draft (deg) and the
    rule it breaks (None: usable)."""

    axis: str
    offset_mm: float
    locked_area_mm2: float
    rigid_locked_area_mm2: float
    min_draft_deg: float
    rule: str | None = None

    @property
    def usable(self) -> bool:
        return self.rule is None and self.rigid_locked_area_mm2 <= 0.0

    def key(self) -> tuple[float, float]:
        """Sort key: least locked area, then the greatest least draft."""
        return (round(self.locked_area_mm2 + self.rigid_locked_area_mm2, 3),
                -round(self.min_draft_deg, 3))


@dataclass(frozen=True)
class Inlet:
    """A tube socket into an end face: centre (y, z) on the face, diameter and depth (mm);
    ``face`` start is x = 0, end is x = the body's length."""

    center_mm: tuple[float, float]
    socket_diameter_mm: float
    socket_depth_mm: float
    face: InletFace = InletFace.START


@dataclass(frozen=True)
class CoreSupport:
    """How the core is held: one round print, both socket plug and the part seated in the
    shells, from ``start_x_mm`` (outside the block, < 0) to the socket floor ``end_x_mm``,
    radius ``radius_mm`` about the inlet centre; and a square ``key_box`` (lo, hi) in the
    block's inlet wall whose flats stop it turning and shoulders stop it sliding. On the
    end face ``start_x_mm`` lies beyond the block's +x face and ``pull_dir`` is +x.
    ``part`` names the core's part (``core``, or ``core-1``, ``core-2``, ... when there are
    several) and ``voids`` the recipe's voids it forms."""

    inlet: Inlet
    start_x_mm: float
    end_x_mm: float
    radius_mm: float
    key_box: Box
    pull_dir: Vec3 = (-1.0, 0.0, 0.0)
    part: str = "core"
    voids: tuple[int, ...] = ()

    @property
    def outward(self) -> float:
        """The sign of x pointing out of the socket's face: -1 start, +1 end."""
        return self.pull_dir[0]


@dataclass(frozen=True)
class GroovePlate:
    """One of the two flat plates that form a ring's open groove (world, mm): the box
    ``box`` (lo, hi) in the parting plane, z in [-t/2, t/2] with t the groove's height,
    from the ring's axis plane y = 0 out past the block's +-y face (its print, clamped
    between the shells, and a grip beyond), less the cylinder of ``hole_radius_mm`` (the
    groove bottom) about the ring's axis through ``hole_center_mm`` (x, y). It pulls along
    ``pull_dir`` (+-y): every point of its half of the groove bottom moves outward or
    along the wall."""

    part: str
    box: Box
    hole_center_mm: tuple[float, float]
    hole_radius_mm: float
    pull_dir: Vec3

    def volume_mm3(self) -> float:
        """Closed form: the box less the half cylinder of the hole."""
        (x0, y0, z0), (x1, y1, z1) = self.box
        half = math.pi * self.hole_radius_mm ** 2 / 2.0
        return (x1 - x0) * ((y1 - y0) * (z1 - z0)) - half * (z1 - z0)


@dataclass(frozen=True)
class Opening:
    """A sprue (pour inlet) or vent where it meets the cavity (mm, world frame).

    ``floor_mm`` is the lowest height (along up) of the cavity ceiling under the mouth,
    where the cut into the mold must start so that no sliver of mold is left between the
    cut and the cavity (``None``: the centre's height)."""

    kind: OpeningKind
    center_mm: Vec3
    radius_mm: float
    floor_mm: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "kind", OpeningKind(self.kind))


@dataclass(frozen=True)
class PartPlan:
    """A part to build: its name (also the file stem), role and pull direction (unit, world;
    None for the cast)."""

    name: str
    role: Role
    pull_dir: Vec3 | None

    @property
    def printable(self) -> bool:
        return self.role is not Role.CAST


#: Straight facets replacing each quarter-circle corner of a post (their vertices on the
#: arc). A tapered prism on straight edges has every side face planar at exactly the
#: draft, so the printed (meshed) post keeps its draft; a rounded corner would become a
#: cone, whose mesh facets lean less than the cone does.
CORNER_FACETS = 4


@dataclass(frozen=True)
class Post:
    """A drafted post of a layered mold (actuator frame, mm): at the bond face z =
    ``base_z_mm`` a rectangle of ``size_mm`` (x, y) centred on ``center_mm`` (x, y), each
    corner cut along the arc of radius ``corner_radius_mm`` by CORNER_FACETS facets; it
    stands ``height_mm`` into the body (+z) and every side leans in by ``draft_deg``. It
    forms the void ``name`` (the recipe's path). ``angle_deg`` turns the post about the
    vertical line through its centre (counter-clockwise seen from +z; 0: its ``size_mm``
    along x and y), for posts along an arm that does not run along x. A corner radius of
    half the smaller size makes the ends (or the whole post) round."""

    name: str
    center_mm: tuple[float, float]
    size_mm: tuple[float, float]
    corner_radius_mm: float
    base_z_mm: float
    height_mm: float
    draft_deg: float
    angle_deg: float = 0.0

    def outline_mm(self) -> tuple[tuple[float, float], ...]:
        """The section at the bond face, counter-clockwise (x, y)."""
        cx, cy = self.center_mm
        hx, hy = self.size_mm[0] / 2.0, self.size_mm[1] / 2.0
        r = self.corner_radius_mm
        if r <= 0.0:
            pts = [(cx + hx, cy - hy), (cx + hx, cy + hy), (cx - hx, cy + hy),
                   (cx - hx, cy - hy)]
        else:
            pts = []
            for k, (sx, sy) in enumerate(((1, -1), (1, 1), (-1, 1), (-1, -1))):
                ox, oy = cx + sx * (hx - r), cy + sy * (hy - r)
                a0 = -math.pi / 2.0 + k * math.pi / 2.0
                for j in range(CORNER_FACETS + 1):
                    a = a0 + j * (math.pi / 2.0) / CORNER_FACETS
                    p = (ox + r * math.cos(a), oy + r * math.sin(a))
                    # Where a side has no straight part (r = half the size) one corner's
                    # last facet ends where the next one's begins: one point, not two.
                    if not pts or math.dist(p, pts[-1]) > 1e-9:
                        pts.append(p)
            if math.dist(pts[0], pts[-1]) <= 1e-9:
                pts.pop()
        if self.angle_deg == 0.0:  # unturned: the same numbers as always
            return tuple(pts)
        c, s = math.cos(math.radians(self.angle_deg)), math.sin(math.radians(self.angle_deg))
        return tuple((cx + c * (x - cx) - s * (y - cy), cy + s * (x - cx) + c * (y - cy))
                     for x, y in pts)

    def x_span_mm(self) -> tuple[float, float]:
        """Least and greatest x (mm) of the section at the bond face (where the post is
        widest)."""
        if self.angle_deg == 0.0:
            return (self.center_mm[0] - self.size_mm[0] / 2.0,
                    self.center_mm[0] + self.size_mm[0] / 2.0)
        xs = [x for x, _ in self.outline_mm()]
        return (min(xs), max(xs))

    def area_at_mm2(self, t_mm: float) -> float:
        """Section area at height ``t_mm`` above the bond face: the outline with every edge
        moved in by d = t tan(draft), A(d) = A - P d + d^2 sum tan(phi_i / 2) over the
        exterior angles phi_i (a convex polygon's inner parallel; exact while no edge
        vanishes)."""
        d = t_mm * math.tan(math.radians(self.draft_deg))
        pts = self.outline_mm()
        n = len(pts)
        area = 0.5 * sum(pts[i][0] * pts[(i + 1) % n][1] - pts[(i + 1) % n][0] * pts[i][1]
                         for i in range(n))
        edges = [(pts[(i + 1) % n][0] - pts[i][0], pts[(i + 1) % n][1] - pts[i][1])
                 for i in range(n)]
        perim = sum(math.hypot(ex, ey) for ex, ey in edges)
        turn = 0.0
        for i in range(n):
            (ax, ay), (bx, by) = edges[i - 1], edges[i]
            phi = math.atan2(ax * by - ay * bx, ax * bx + ay * by)
            turn += math.tan(phi / 2.0)
        return area - perim * d + d * d * turn

    def volume_mm3(self) -> float:
        """Closed form: the section area is quadratic in height, so Simpson's rule on the
        two end sections and the middle one is exact."""
        h = self.height_mm
        return h / 6.0 * (self.area_at_mm2(0.0) + 4 * self.area_at_mm2(h / 2)
                          + self.area_at_mm2(h))


class LayerKind(StrEnum):
    """``chambered``: the first step, an open tray (floor = the actuator's outer top) with
    a post bridge on its rim; ``base``: the second step, a tray holding the liquid base
    layer the chambered part is pressed into."""

    CHAMBERED = "chambered"
    BASE = "base"


@dataclass(frozen=True)
class Footprint:
    """The body's section at the bond face (mm, x-y): a rectangle of ``size_mm`` centred
    on ``center_mm`` with corners rounded ``corner_radius_mm`` (a bar); or, for a plate,
    ``outline`` (its lines and arcs), with ``center_mm`` and ``size_mm`` its bounding box
    and no corner radius."""

    center_mm: tuple[float, float]
    size_mm: tuple[float, float]
    corner_radius_mm: float
    outline: PieceOutline | None = None

    @staticmethod
    def of_outline(o: PieceOutline) -> Footprint:
        """The footprint of a plate's outline (its bounds give centre and size)."""
        (x0, y0), (x1, y1) = o.bounds()
        return Footprint(((x0 + x1) / 2.0, (y0 + y1) / 2.0), (x1 - x0, y1 - y0), 0.0, o)

    def inset(self, d_mm: float) -> Footprint:
        """Moved in by ``d_mm`` (out when negative): the parallel curve of a rounded
        rectangle is a rounded rectangle whose corner radius changes by the same amount;
        an outline's is :func:`soft_molds.recipe.outline.offset_outline` (ValueError where
        the offset does not fit: the layered plan refuses that first)."""
        if self.outline is not None:
            moved = offset_outline(self.outline, d_mm)
            if moved is None:
                raise ValueError(f"an offset of {d_mm:g} mm does not fit the outline")
            return Footprint.of_outline(moved)
        lx, ly = self.size_mm
        return Footprint(self.center_mm, (lx - 2 * d_mm, ly - 2 * d_mm),
                         max(self.corner_radius_mm - d_mm, 0.0))

    def fits_offset(self, d_mm: float) -> bool:
        """Whether :meth:`inset` by ``d_mm`` keeps the outline's shape."""
        if self.outline is not None:
            return offset_outline(self.outline, d_mm) is not None
        return min(self.size_mm) > 2.0 * d_mm

    def area_mm2(self) -> float:
        if self.outline is not None:
            return self.outline.area_mm2()
        lx, ly = self.size_mm
        return lx * ly - (4.0 - math.pi) * self.corner_radius_mm ** 2

    def reached_past_by(self, post: Post) -> bool:
        """Whether ``post`` reaches beyond this footprint's edge at the bond face (a groove
        opening on the outline, whose post the tray wall takes in a notch): a corner of its
        outline outside (a plate's outline by its exact distance; a bar's rectangle)."""
        pts = np.asarray(post.outline_mm(), dtype=float)
        if self.outline is not None:
            return bool((self.outline.sdf(pts) > 0.0).any())
        (cx, cy), (lx, ly) = self.center_mm, self.size_mm
        return bool(((np.abs(pts[:, 0] - cx) > lx / 2.0)
                     | (np.abs(pts[:, 1] - cy) > ly / 2.0)).any())


@dataclass(frozen=True)
class Layer:
    """One step of the layered process (actuator frame: the bond face is z =
    ``bond_z_mm``; the chambered layer lies above it, the base layer below). The chambered
    step's parts are built turned over (a half turn about x) into pour orientation, so its
    posts pull along +z; the base step is poured as the actuator stands."""

    kind: LayerKind
    bond_z_mm: float
    footprint: Footprint
    posts: tuple[Post, ...]
    clearance_mm: float
    wall_mm: float
    sheet_inset_mm: float | None = None
    #: Where the post bridge's overflow hole goes (x, y; None: no room for one or no
    #: bridge).
    overflow_xy_mm: tuple[float, float] | None = None

    def notched_posts(self) -> tuple[Post, ...]:
        """The posts the tray wall takes in a notch: those reaching past the footprint."""
        return tuple(p for p in self.posts if self.footprint.reached_past_by(p))

    @property
    def turned_over(self) -> bool:
        return self.kind is LayerKind.CHAMBERED


class OvermoldKind(StrEnum):
    """``bladder``: the first pour, the ridged tube around the rod core; ``skin``: the
    second, the skin cast over the wound bladder on the same core."""

    BLADDER = "bladder"
    SKIN = "skin"


@dataclass(frozen=True)
class GuidePiece:
    """One piece of a helical guide ridge (actuator frame, mm, rad): the ridge's section,
    ``width`` along x by ``height`` out of the bladder, in a plane through the x axis,
    screwed about +x: at helix angle t it is turned by ``hand`` x t about +x (the right
    hand rule; 0 = +z) and moved to x = start + pitch t / (2 pi). The piece spans t in
    [``t0_rad``, ``t1_rad``]."""

    hand: int
    t0_rad: float
    t1_rad: float

    @property
    def span_rad(self) -> float:
        return self.t1_rad - self.t0_rad


def segment_area_mm2(radius_mm: float, flat_z_mm: float) -> float:
    """Area of the part of a disc of ``radius_mm`` about the origin above the chord at
    z = ``flat_z_mm`` (closed form: r^2 acos(h / r) - h sqrt(r^2 - h^2)); at h = 0 the half
    disc, pi r^2 / 2."""
    r, h = radius_mm, flat_z_mm
    return r * r * math.acos(h / r) - h * math.sqrt(r * r - h * h)


@dataclass(frozen=True)
class Bladder:
    """The first pour (actuator frame, mm): a tube x in [0, ``length_mm``] between
    ``bore_radius_mm`` and ``outer_radius_mm`` about the x axis, with guide ridges whose
    helices start at x = ``guide_start_x_mm``. ``half_round``: only the half above the
    flat face z = 0 (a D, flat face down), around the bore's part above z = the wall
    (``outer_radius_mm - bore_radius_mm``), so the wall is even on both faces; its guide
    pieces lie on the curved face only."""

    outer_radius_mm: float
    bore_radius_mm: float
    length_mm: float
    guide_pitch_mm: float
    guide_height_mm: float
    guide_width_mm: float
    guide_start_x_mm: float
    pieces: tuple[GuidePiece, ...]
    half_round: bool = False

    @property
    def wall_mm(self) -> float:
        return self.outer_radius_mm - self.bore_radius_mm

    @property
    def crest_radius_mm(self) -> float:
        """Radius of the ridges' crests (the outer radius with no guides)."""
        return self.outer_radius_mm + (self.guide_height_mm if self.pieces else 0.0)

    def ridge_volume_mm3(self) -> float:
        """Closed form (Pappus' theorem for a screw motion): a plane section of area A in a
        plane through the axis, screwed through angle T, sweeps A x rho_c x T, rho_c the
        section's centroid radius; the pieces never overlap."""
        a = self.guide_width_mm * self.guide_height_mm
        rho = self.outer_radius_mm + self.guide_height_mm / 2.0
        return a * rho * sum(p.span_rad for p in self.pieces)

    def outside_area_mm2(self) -> float:
        """The section's outline filled: the disc, or the half disc of a D."""
        full = math.pi * self.outer_radius_mm ** 2
        return full / 2.0 if self.half_round else full

    def bore_area_mm2(self) -> float:
        """The bore's section: its disc, or its part above the flat wall (a segment)."""
        if self.half_round:
            return segment_area_mm2(self.bore_radius_mm, self.wall_mm)
        return math.pi * self.bore_radius_mm ** 2

    def volume_mm3(self) -> float:
        """The tube, (outside - bore) x L (pi (R^2 - r^2) L when round), plus the ridges."""
        return ((self.outside_area_mm2() - self.bore_area_mm2()) * self.length_mm
                + self.ridge_volume_mm3())


@dataclass(frozen=True)
class OvermoldCore:
    """The rod core (actuator frame, mm): radius ``radius_mm`` about the x axis from
    ``start_x_mm`` (the handle's end, outside the inlet wall) to ``end_x_mm`` (its tip,
    seated in the bladder mold's far wall), with a square key ``key_box`` (lo, hi corners)
    in the inlet wall; the same core and key locate both steps. ``flat_z_mm``: a
    half-round bladder's core, the rod's part above z = ``flat_z_mm`` (a segment)."""

    radius_mm: float
    start_x_mm: float
    end_x_mm: float
    key_box: tuple[Vec3, Vec3]
    flat_z_mm: float | None = None

    def section_mm2(self) -> float:
        if self.flat_z_mm is None:
            return math.pi * self.radius_mm ** 2
        return segment_area_mm2(self.radius_mm, self.flat_z_mm)

    def volume_mm3(self) -> float:
        (x0, y0, z0), (x1, y1, z1) = self.key_box
        rod = self.section_mm2() * (self.end_x_mm - self.start_x_mm)
        key = (x1 - x0) * ((y1 - y0) * (z1 - z0) - self.section_mm2())
        return rod + key


@dataclass(frozen=True)
class Sheet:
    """The strain-limiting sheet of a half-round bladder (actuator frame, mm): a rectangle
    x in [``x0_mm``, ``x1_mm``], |y| <= ``half_width_mm`` in the plane z = ``z_mm`` (on the
    thread across the flat face), of ``material`` ("paper" or "fabric"); its thickness is
    neglected."""

    material: str
    x0_mm: float
    x1_mm: float
    half_width_mm: float
    z_mm: float

    @property
    def size_mm(self) -> tuple[float, float]:
        return (self.x1_mm - self.x0_mm, 2.0 * self.half_width_mm)

    def outline_xy(self) -> tuple[tuple[float, float], ...]:
        """Its corners counter-clockwise seen from +z (x, y in mm)."""
        h = self.half_width_mm
        return ((self.x0_mm, -h), (self.x1_mm, -h), (self.x1_mm, h), (self.x0_mm, h))


@dataclass(frozen=True)
class Overmold:
    """One step of the overmold process (actuator frame, mm; parting plane z = 0 through
    the core's axis, the upper shell pulls +z, the lower -z). The cavity: the bladder
    (``bladder`` step) or a cylinder of ``cavity_radius_mm`` from x = 0 to
    ``cavity_end_x_mm`` (``skin`` step, the far end capped). A half-round bladder's
    (``flat_depth_mm`` set): the half cylinder above z = 0 on a slab reaching down to
    z = -``flat_depth_mm`` (0 for the bladder step: its flat face lies in the parting
    plane; the skin's flat face lies parallel to it, below); ``sheet``: the sheet the
    skin step holds against the bladder's flat face."""

    kind: OvermoldKind
    bladder: Bladder
    core: OvermoldCore
    cavity_radius_mm: float
    cavity_end_x_mm: float
    wall_mm: float
    flange_mm: float
    clearance_mm: float
    key_diameter_mm: float
    key_height_mm: float
    flat_depth_mm: float | None = None
    sheet: Sheet | None = None

    @property
    def block_lo(self) -> Vec3:
        c = self.cavity_radius_mm
        below = c if self.flat_depth_mm is None else self.flat_depth_mm
        return (-self.wall_mm, -(c + self.wall_mm + self.flange_mm), -(below + self.wall_mm))

    @property
    def block_hi(self) -> Vec3:
        c = self.cavity_radius_mm
        return (self.cavity_end_x_mm + self.wall_mm, c + self.wall_mm + self.flange_mm,
                c + self.wall_mm)

    def keys_xy(self) -> tuple[tuple[float, float], ...]:
        """Registration keys in the flange on both sides, a quarter of the block in from
        each end (x, y)."""
        (x0, _, _), (x1, y1, _) = self.block_lo, self.block_hi
        y = y1 - self.flange_mm / 2.0
        xs = (x0 + (x1 - x0) / 4.0, x1 - (x1 - x0) / 4.0)
        return tuple((x, s * y) for x in xs for s in (-1.0, 1.0))


@dataclass(frozen=True)
class CoreMold:
    """The first step of a melted core (``core.kind: melted``): a two-part shell around
    the core of the silicone step's core support ``core_part`` (the same solid, print,
    key and grip tab included), void-less, parted on the silicone step's plane; the core
    is cast in ``material`` (``core.material``). Its cast part is the core itself."""

    core_part: str
    material: str


@dataclass(frozen=True)
class CastingStep:
    """One pour: the mold that is closed around the core(s) and filled.

    ``parting`` and ``layout`` are None only while a ``parting: auto`` plane is still to be
    chosen; ``openings`` is empty until the analysis stage has located the high points."""

    name: str
    inlets: tuple[Inlet, ...]
    core_supports: tuple[CoreSupport, ...]
    parting: PartingPlane | None
    layout: Layout | None
    candidates: tuple[PlaneScore, ...] = ()
    openings: tuple[Opening, ...] = ()
    #: Set for the steps of the layered process (trays instead of two shells and a core).
    layer: Layer | None = None
    #: Set for the steps of the overmold process (two shells about the rod core each).
    overmold: Overmold | None = None
    #: Set for the core mold of a melted core (two shells, no core, the core as the cast).
    core_mold: CoreMold | None = None
    #: The two plates forming a ring's open groove (no core then), in part order.
    plates: tuple[GroovePlate, ...] = ()

    @property
    def parts(self) -> tuple[PartPlan, ...]:
        """shell-lower, shell-upper, the core(s), cast, in the order files and reports list them;
        for a layered step tray, post-bridge (chambered only) and cast, pulls in pour
        orientation."""
        if self.layer is not None:
            down, up = unit(2, -1.0), unit(2)
            bridge = ((PartPlan("post-bridge", Role.CORE, up),)
                      if self.layer.kind is LayerKind.CHAMBERED else ())
            return (PartPlan("tray", Role.SHELL, down), *bridge,
                    PartPlan("cast", Role.CAST, None))
        p = self.settled_parting
        if self.core_mold is not None:
            return (PartPlan("shell-lower", Role.SHELL, p.down),
                    PartPlan("shell-upper", Role.SHELL, p.up),
                    PartPlan("cast", Role.CAST, None))
        if self.overmold is not None and self.overmold.kind is OvermoldKind.SKIN:
            # The core stays in the bladder from the first step: nothing new to print.
            return (PartPlan("shell-lower", Role.SHELL, p.down),
                    PartPlan("shell-upper", Role.SHELL, p.up),
                    PartPlan("cast", Role.CAST, None))
        if self.plates:
            return (PartPlan("shell-lower", Role.SHELL, p.down),
                    PartPlan("shell-upper", Role.SHELL, p.up),
                    *(PartPlan(g.part, Role.CORE, g.pull_dir) for g in self.plates),
                    PartPlan("cast", Role.CAST, None))
        return (PartPlan("shell-lower", Role.SHELL, p.down),
                PartPlan("shell-upper", Role.SHELL, p.up),
                *((PartPlan(c.part, Role.CORE, c.pull_dir) for c in self.core_supports)
                  if self.core_supports else (PartPlan("core", Role.CORE, unit(0, -1.0)),)),
                PartPlan("cast", Role.CAST, None))

    @property
    def settled_parting(self) -> PartingPlane:
        if self.parting is None:
            raise ValueError(f"step {self.name}: the parting plane is not chosen yet")
        return self.parting

    @property
    def settled_layout(self) -> Layout:
        if self.layout is None:
            raise ValueError(f"step {self.name}: the layout waits for the parting plane")
        return self.layout


@dataclass(frozen=True)
class MoldPlan:
    """Every casting step of one variant, in pour order. ``recipe`` carries the chosen
    parting plane once there is one; ``source_params_sha256`` is the hash of the recipe as
    given (so an auto-parted variant is recognised as up to date)."""

    recipe: Recipe
    source_params_sha256: str
    steps: tuple[CastingStep, ...]

    @property
    def step(self) -> CastingStep:
        """The one step of a one-shot process."""
        if len(self.steps) != 1:
            raise ValueError(f"{len(self.steps)} casting steps; name the one you mean")
        return self.steps[0]

    def with_step(self, step: CastingStep, recipe: Recipe | None = None) -> MoldPlan:
        steps = tuple(step if s.name == step.name else s for s in self.steps)
        return replace(self, steps=steps, recipe=recipe or self.recipe)
