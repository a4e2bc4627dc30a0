"""Plan -> BRep solids: cast part, removable core and the two shell parts, built exactly as
the casting step of the plan says (core support, layout, openings).

Pour orientation: the parting axis w points up; the lower shell pulls along -w, the
upper shell along +w and carries the sprue and vents; each core (one per group of joined
voids) pulls out through its inlet socket, along -x from the start face x = 0 or along +x
from the end face. All lengths mm.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..errors import GeometryError
from ..plan.layout import MIN_LAND_MM, NOTCH_HALF_HEIGHT_MM, Layout
from ..plan.magnets import MagnetPockets, magnet_pockets
from ..plan.model import CastingStep, CoreSupport, OpeningKind
from ..plan.tags import core_label_text, core_tag, label_margin
from ..recipe.model import MoldSettings, Recipe
from ..recipe.primitives import Primitive
from . import kernel as k
from . import labels

#: A point or direction, world mm: a tuple or a numpy vector.
Point = Sequence[float] | np.ndarray

#: The cut tools for sprue and vents start this far below the lowest point of the
#: ceiling under their mouth, so they always open fully into the cavity and leave no
#: sliver of mold where the ceiling falls away (the overlap is cavity, already empty), mm.
CAVITY_OVERLAP_MM = 0.3


@dataclass(frozen=True)
class CastSolids:
    """Body, cores (in the step's core-support order) and cast; ``volumes_mm3`` holds the
    exact (BRep) volumes: body, void_set, each core by its part name, cast."""

    body: k.Shape
    cores: tuple[k.Shape, ...]
    cast: k.Shape
    volumes_mm3: dict[str, float]

    @property
    def core(self) -> k.Shape:
        """The core of a one-core step."""
        (only,) = self.cores
        return only


#: Smallest glyph height cut; lower faces get no label (mm).
LABEL_MIN_HEIGHT_MM = 3.0


@dataclass(frozen=True)
class Label:
    """A label cut into one part: the text, glyph height used (mm) and the world box
    (lo, hi) that holds it, grown by half a stroke."""

    part: str
    text: str
    height_mm: float
    box: tuple[tuple[float, float, float], tuple[float, float, float]]


def _label_tool(r: Recipe, part: str, centre: Point, right: Point, up: Point,
                room_mm: float, text: str | None = None) -> tuple[k.Shape, Label] | None:
    """The tool that cuts the recipe's label into the flat face through ``centre`` (the
    middle of the text), reading along ``right`` with capitals along ``up`` (outward
    normal right x up); ``room_mm`` is the face's height along ``up``. None when labels are
    off or the face is too low."""
    from ..recipe.strokefont import text_width_mm

    ls = r.label_settings
    h = min(ls.height_mm, room_mm - 2.0 * label_margin(r))
    if ls.mode == "none" or h < LABEL_MIN_HEIGHT_MM:
        return None
    text = r.label_text if text is None else text
    c, rv, uv = (np.asarray(v, dtype=np.float64) for v in (centre, right, up))
    width = text_width_mm(text, h)
    origin = c - rv * (width / 2.0) - uv * (h / 2.0)
    tool = labels.label_solid(text, tuple(origin), tuple(rv), tuple(uv), h, ls.depth_mm,
                              ls.stroke_mm, part)
    n = np.cross(rv, uv)
    corners = [origin + a * rv * width + b * uv * h + t * n
               for a in (0, 1) for b in (0, 1) for t in (-ls.depth_mm, 0.2)]
    grow = ls.stroke_mm / 2.0 + 0.05
    lo = tuple(float(x) - grow for x in np.min(corners, axis=0))
    hi = tuple(float(x) + grow for x in np.max(corners, axis=0))
    return tool, Label(part, text, h, (lo, hi))  # type: ignore[arg-type]


def cut_label(r: Recipe, shape: k.Shape, part: str, centre: Point, right: Point, up: Point,
              room_mm: float, text: str | None = None
               ) -> tuple[k.Shape, Label | None]:
    made = _label_tool(r, part, centre, right, up, room_mm, text)
    if made is None:
        return shape, None
    tool, lab = made
    out, _ = labels.deboss(shape, tool, part, "cut the label",
                           depth_mm=r.label_settings.depth_mm)
    return out, lab


def _axis(i: int, sign: float = 1.0) -> np.ndarray:
    e = np.zeros(3)
    e[i] = sign
    return e


def shell_label_tool(r: Recipe, lay: Layout, part: str, lower: bool
                     ) -> tuple[k.Shape, Label] | None:
    """The tool for the label on the shell's -v side face (no keys, notches or bolts reach
    it), read with up along +w in pour orientation."""
    f = lay.frame
    wa, va = f.w_axis, f.v_axis
    w0, w1 = ((lay.block_lo[wa], lay.parting_w) if lower else (lay.parting_w, lay.block_hi[wa]))
    groove = r.groove()
    if groove is not None:
        # The groove plates leave through that face across the parting plane: the label
        # stays on the shell's face beside them.
        half = groove.height_mm / 2.0
        w0, w1 = (w0, lay.parting_w - half) if lower else (lay.parting_w + half, w1)
    up = _axis(wa)
    normal = _axis(va, -1.0)
    right = np.cross(up, normal)  # so that right x up = the outward normal
    centre = np.zeros(3)
    centre[0] = (lay.block_lo[0] + lay.block_hi[0]) / 2.0
    centre[va] = lay.block_lo[va]
    centre[wa] = (w0 + w1) / 2.0
    return _label_tool(r, part, centre, right, up, w1 - w0)


def label_core(r: Recipe, step: CastingStep, core: k.Shape,
               support: CoreSupport | None = None) -> tuple[k.Shape, Label | None]:
    """Add the grip tab to the print of ``support``'s core (default: the step's first) and
    cut the label into its +w face."""
    parting = step.settled_parting
    support = support or step.core_supports[0]
    core = cut_core_magnet_pocket(r, step, core, support)
    tab = core_tag(r, support, parting, step.core_supports)
    if tab is None:
        return core, None
    lo, hi = tab
    wa = parting.w_axis
    va = 3 - wa
    plate = k.box(lo, hi)
    vol = k.volume(core) + float(np.prod(np.subtract(hi, lo)))
    core = k.fuse([core, plate], support.part, "add the grip tab", volume_mm3=vol)
    centre = [(a + b) / 2.0 for a, b in zip(lo, hi)]
    centre[wa] = hi[wa]
    up = _axis(va)
    normal = _axis(wa)
    right = np.cross(up, normal)
    return cut_label(r, core, support.part, centre, right, up, hi[va] - lo[va],
                     core_label_text(r, support))


def magnet_pocket_tools(pockets: MagnetPockets) -> tuple[k.Shape, k.Shape]:
    """The cut tools of a magnet pair's pockets: (the core's, running up from the key's
    underside; the seat's, running down from the seat's floor). Each starts a little
    outside its face, in the seat's fit gap (empty either way), so it opens cleanly."""
    c = list(pockets.centre_mm)
    a, rp, d = pockets.axis, pockets.radius_mm, pockets.depth_mm
    c[a] = pockets.core_face_mm - 0.1
    core_tool = k.cylinder(a, tuple(c), d + 0.1, rp)
    c[a] = pockets.seat_face_mm - d
    seat_tool = k.cylinder(a, tuple(c), d + 0.1, rp)
    return core_tool, seat_tool


def cut_core_magnet_pocket(r: Recipe, step: CastingStep, core: k.Shape,
                           support: CoreSupport) -> k.Shape:
    """The blind pocket for the magnet in the underside of ``support``'s print key (none
    without magnets); cut once the parting, and so the pour's up, is settled."""
    pockets = magnet_pockets(r, support, step.settled_parting)
    if pockets is None:
        return core
    tool, _ = magnet_pocket_tools(pockets)
    vol = k.volume(core) - math.pi * pockets.radius_mm ** 2 * pockets.depth_mm
    return k.cut(core, [tool], support.part, "cut the magnet pocket", volume_mm3=vol)


def label_plates(r: Recipe, step: CastingStep, plates: Sequence[k.Shape]
                 ) -> tuple[tuple[k.Shape, ...], tuple[Label, ...]]:
    """The recipe's label cut into the top face (+z) of each plate's grip, beyond the
    block's face, read outward along the plate's pull (none where the grip is too short
    for the least glyph, or the plate thinner than three label depths)."""
    lay = step.settled_layout
    out, labs = [], []
    for shape, g in zip(plates, step.plates):
        (x0, y0, _), (x1, y1, z1) = g.box
        sign = g.pull_dir[1]
        face = lay.block_hi[1] if sign > 0 else lay.block_lo[1]
        tip = y1 if sign > 0 else y0
        if z1 * 2.0 < 3.0 * r.label_settings.depth_mm:
            out.append(shape)
            continue
        centre = ((x0 + x1) / 2.0, (face + tip) / 2.0, z1)
        up = (0.0, sign, 0.0)
        right = (sign, 0.0, 0.0)  # right x up = +z, the face's outward normal
        shape, lab = cut_label(r, shape, g.part, centre, right, up, abs(tip - face))
        out.append(shape)
        if lab is not None:
            labs.append(lab)
    return tuple(out), tuple(labs)


@dataclass(frozen=True)
class ShellSolids:
    lower: k.Shape
    upper: k.Shape
    funnel_diameter_mm: float | None  # as cut (None: no sprue)
    fill_volume_mm3: float = 0.0      # silicone standing in sprue, funnel and vents when
    #                                   poured to the top face (from each mouth's centre up)
    labels: tuple[Label, ...] = ()


def funnel_radius(lay: Layout, m: MoldSettings, at_uv: tuple[float, float],
                  sprue_r: float) -> float:
    """The pour funnel's rim radius (mm): the recipe's, shrunk so that a land of
    MIN_LAND_MM stays to every clamp hole and to the block's edges; the bare sprue radius
    when no useful funnel fits."""
    f = lay.frame
    room = [at_uv[0] - lay.block_lo[0], lay.block_hi[0] - at_uv[0],
            at_uv[1] - lay.block_lo[f.v_axis], lay.block_hi[f.v_axis] - at_uv[1]]
    rb = (m.clamp_hole_mm or 0.0) / 2.0
    room += [math.dist(at_uv, b) - rb for b in lay.bolts_uv]
    r = min(m.funnel_diameter_mm / 2.0, min(room) - MIN_LAND_MM)
    return r if r >= sprue_r + 0.5 else sprue_r


def frustum_volume(h: float, r1: float, r2: float) -> float:
    return math.pi * h / 3.0 * (r1 * r1 + r1 * r2 + r2 * r2)


def build_body(r: Recipe) -> k.Shape:
    """The body: the union of its primitives, less the recipe's outside cuts (slits), so
    the cast has open gaps there and the shell beside them fills them with fins."""
    body = k.fuse([k.build_primitive(p, "body") for p in r.body_primitives()], "body",
                  "build body")
    groove = r.groove()
    if groove is not None:
        # An open groove reaches past the outer face: it removes its revolved rectangle
        # up to that face (Pappus), the rest of the tool is outside the body.
        ring = k.volume(body)
        return k.cut(body, [k.build_primitive(p, "body") for p in r.outer_primitives()],
                     "body", "cut the open groove", volume_mm3=ring - groove.volume_mm3(),
                     rel_tol=1e-4)
    cuts = r.outer_cuts()
    if not cuts:
        return body
    return k.cut(body, [k.build_slit(c, "body") for c in cuts], "body", "cut the slits")


def build_plates(step: CastingStep) -> tuple[k.Shape, ...]:
    """The plates of an open groove, in the step's order: each box less the groove
    bottom's cylinder (a half cylinder of it lies in the box)."""
    out = []
    for g in step.plates:
        lo, hi = g.box
        cx, cy = g.hole_center_mm
        hole = k.cylinder(2, (cx, cy, lo[2] - 1.0), hi[2] - lo[2] + 2.0, g.hole_radius_mm)
        out.append(k.cut(k.box(lo, hi), [hole], g.part, "cut the groove bottom",
                         volume_mm3=g.volume_mm3()))
    return tuple(out)


def build_cast(r: Recipe, step: CastingStep, body: k.Shape | None = None) -> CastSolids:
    """Void set, cores and cast part (the body minus the cores) for ``r``: one core per
    core support of the step, formed by its group of voids and held by its print."""
    if body is None:
        body = build_body(r)
    if not step.core_supports:
        # No core (an open groove cut from the body, formed by plates): the body is the
        # cast.
        vol = k.volume(body)
        return CastSolids(body, (), body, {"body": vol, "void_set": 0.0, "cast": vol})
    sockets = r.sockets()
    all_voids = r.void_primitives()
    vols = {"body": k.volume(body), "void_set": 0.0}
    cores = []
    for sup in step.core_supports:
        j = step.inlets.index(sup.inlet)
        group = sup.voids or tuple(range(len(all_voids)))
        core, void_vol = _build_core(sup, [p for i in group for p in all_voids[i]], sockets[j])
        vols["void_set"] += void_vol
        vols[sup.part] = k.volume(core)
        cores.append(core)
    rel_tol = k.VOLUME_REL_TOL
    if getattr(type(r.body), "CURVED_INLET_FACE", False):
        # The kernel's default volume integration misses up to ~2e-5 of a ring whose
        # curved face a socket crosses (measured: 0.17 mm3 of 14 109; integrated at 1e-9
        # the cast matches the closed form to 1e-8), so the cut is held to 1e-4.
        rel_tol = 1e-4
        # A socket entering a curved face (a ring's outer face, touching the plane x = 0
        # along a line) starts on that plane: the sliver between plane and face is mold,
        # not cast, and leaves the void set.
        for sock in sockets:
            sliver = k.cut(k.build_primitive(sock, "voids"), [body], "voids",
                           "socket outside a curved face", solids=None)
            vols["void_set"] -= k.volume(sliver)
    what = "cut voids from body" if len(cores) == 1 else "cut every core's voids from body"
    cast = k.cut(body, cores, "cast", what, volume_mm3=vols["body"] - vols["void_set"],
                 rel_tol=rel_tol)
    vols["cast"] = k.volume(cast)
    return CastSolids(body, tuple(cores), cast, vols)


def _build_core(sup: CoreSupport, void_prims: list[Primitive], socket_prim: Primitive
                ) -> tuple[k.Shape, float]:
    """One core (its voids, the print through its socket and the square key) and the
    volume of its void set (voids and socket, mm3)."""
    # Voids may meet only in the tube socket (two rows on one socket): any number of
    # solids here, one once the socket joins them.
    voids = k.fuse([k.build_primitive(p, "voids") for p in void_prims], "voids", "fuse voids",
                   solids=None)
    socket = k.build_primitive(socket_prim, "voids")
    void_set = k.fuse([voids, socket], "voids", "join voids to the inlet socket")
    cy, cz = sup.inlet.center_mm
    # One cylinder is both the socket plug inside the body and the core print outside it.
    x0 = min(sup.start_x_mm, sup.end_x_mm)
    print_cyl = k.cylinder(0, (x0, cy, cz), abs(sup.end_x_mm - sup.start_x_mm), sup.radius_mm)
    key_lo, key_hi = sup.key_box
    key_box = k.box(key_lo, key_hi)
    core = k.fuse([voids, print_cyl, key_box], sup.part, "build core")
    return core, k.volume(void_set)


def build_shells(r: Recipe, step: CastingStep, cs: CastSolids) -> ShellSolids:
    """Both shells of ``step``: the block of its layout split at its parting plane, keys,
    clamp holes, notches, the core seat, and the step's openings cut into the upper shell."""
    lay = step.settled_layout
    f = lay.frame
    m = r.mold
    wa = f.w_axis
    block = k.box(lay.block_lo, lay.block_hi)
    c = m.clearance_mm
    pockets = [k.box(tuple(a - c for a in klo), tuple(b + c for b in khi))
               for klo, khi in (sup.key_box for sup in step.core_supports)]
    w_lo, w_hi = lay.block_lo[wa], lay.block_hi[wa]
    tools = [cs.body, *cs.cores, *pockets, *build_plates(step)]
    # The seat's magnet pockets lie wholly below the parting plane: the lower shell's.
    for sup in step.core_supports:
        mp = magnet_pockets(r, sup, step.settled_parting)
        if mp is not None:
            tools.append(magnet_pocket_tools(mp)[1])
    if m.clamp_hole_mm is not None:
        for u, v in lay.bolts_uv:
            tools.append(k.cylinder(wa, f.world(u, v, w_lo - 1.0), w_hi - w_lo + 2.0,
                                    m.clamp_hole_mm / 2.0))
    for (u, v, du, dv) in lay.notches:
        lo = f.world(u - du / 2, v - dv / 2, lay.parting_w - NOTCH_HALF_HEIGHT_MM)
        hi = f.world(u + du / 2, v + dv / 2, lay.parting_w + NOTCH_HALF_HEIGHT_MM)
        tools.append(k.box(tuple(min(a, b) for a, b in zip(lo, hi)),
                           tuple(max(a, b) for a, b in zip(lo, hi))))
    # The labels are cut last (see labels.deboss); they stop short of the parting plane.
    made = [shell_label_tool(r, lay, name, lower=name == "shell-lower")
            for name in ("shell-lower", "shell-upper")]
    shell_labels = tuple(m[1] for m in made if m is not None)
    shell = k.cut(block, tools, "shell", "cut cavity, core seat, clamp holes, pry notches")
    lower, upper = k.split_at(shell, wa, lay.parting_w, "shell")

    # Registration keys: drafted pegs on the lower part, sockets with clearance above.
    rk, h = m.key_diameter_mm / 2.0, m.key_height_mm
    rt = 0.7 * rk
    pegs, sockets = [], []
    for u, v in lay.keys_uv:
        pegs.append(k.frustum(wa, f.world(u, v, lay.parting_w), h, rk, rt))
        sockets.append(k.frustum(wa, f.world(u, v, lay.parting_w - 0.01), h + c + 0.01,
                                 rk + c, rt + c))
    peg_vol = sum(frustum_volume(h, rk, rt) for _ in pegs)
    lower = k.fuse([lower, *pegs], "shell-lower", "add registration keys",
                   volume_mm3=k.volume(lower) + peg_vol)

    up_tools = list(sockets)
    top = w_hi
    funnel_d = None
    fill = 0.0
    for op in step.openings:
        p = list(op.center_mm)
        floor = op.floor_mm
        start_w = (p[wa] if floor is None else floor) - CAVITY_OVERLAP_MM
        u, v = p[0], p[f.v_axis]
        rise = top - p[wa]
        if op.kind is OpeningKind.SPRUE:
            funnel_r = funnel_radius(lay, m, (u, v), op.radius_mm)
            funnel_d = 2.0 * funnel_r
            depth = 0.6 * rise if funnel_r > op.radius_mm else 0.0
            if depth > 0.0:
                up_tools.append(k.frustum(wa, f.world(u, v, top + 0.1), depth + 0.1, funnel_r,
                                          op.radius_mm, sign=-1.0))
            up_tools.append(k.cylinder(wa, f.world(u, v, start_w), top - start_w - depth + 0.2,
                                       op.radius_mm))
            fill += (math.pi * op.radius_mm ** 2 * (rise - depth)
                     + frustum_volume(depth, funnel_r, op.radius_mm))
        else:
            up_tools.append(k.cylinder(wa, f.world(u, v, start_w), top - start_w + 0.1,
                                       op.radius_mm))
            fill += math.pi * op.radius_mm ** 2 * rise
    before = k.volume(upper)
    upper = k.cut(upper, up_tools, "shell-upper", "cut key sockets, sprue and vents")
    if not k.volume(upper) < before:
        raise GeometryError("cut key sockets, sprue and vents", "nothing was removed",
                            "shell-upper")
    depth = r.label_settings.depth_mm
    for m_ in made:
        if m_ is not None and m_[1].part == "shell-lower":
            lower, _ = labels.deboss(lower, m_[0], "shell-lower", "cut the label", depth)
        elif m_ is not None:
            upper, _ = labels.deboss(upper, m_[0], "shell-upper", "cut the label", depth)
    return ShellSolids(lower, upper, funnel_d, fill, shell_labels)
