"""Process ``overmold``: a round bladder with helical thread guides, wound with thread,
then overmolded with a skin on the same core (common practice for fibre-reinforced
actuators).

1. ``bladder``: a two-part shell parted on the plane z = 0 through the rod's axis (a
   helical ridge is an undercut for any plane that does not hold the axis), its cavity the
   tube with the guide ridges cut into both halves as grooves; the rod core runs through
   the whole bore, held by a core print through the inlet wall (with a square key) and
   seated in a pocket in the far wall, so the bladder is open at both ends.
2. ``skin``: the wound bladder stays on the core; the core's handle and key sit in the same
   print of a second, larger two-part shell (same inlet wall, so both steps are coaxial by
   construction); its cavity is a cylinder over the ridge crests (or the thread, whichever
   stands higher) plus ``process.skin_mm``, running on beyond the core's tip by the skin
   thickness, so the skin also caps the far end.

With ``process.bladder: half-round`` the bladder is the rod's half above its axis (a D,
flat face down on z = 0, the parting plane of the bladder step, so the lower shell is a
plate and the upper holds the whole curved face), cast around the bore's part above the
flat wall (a segment, the wall even on both faces) as the core; the guide pieces lie on
the curved face only (the thread crosses the flat face lying flat). The strain-limiting
sheet (``process.sheet``) is laid on the thread across the flat face, inset by
``process.cover_margin_mm``, and the skin, a D over the crests or thread plus
``process.skin_mm`` on a slab of thread plus ``process.skin_mm`` below the flat face,
holds it there: the actuator bends towards its flat face. The skin step still parts on
z = 0, now parallel to the skin's flat face, so the key and both shells pull as before.

Actuator frame (mm): x along the rod from the inlet face x = 0, parting plane z = 0, the
upper shell pulling along +z. Only a flat-ended rod with one concentric bore from the inlet
face can be overmolded (the core runs through the whole bladder whatever the bore's length):
the plan refuses anything else, naming the field (exit 2), before any kernel call.
"""

from __future__ import annotations

import math
from dataclasses import replace

from ...errors import Problem
from ...recipe.model import Recipe
from ..lines import LineOf
from ..model import (
    Bladder,
    CastingStep,
    GuidePiece,
    Overmold,
    OvermoldCore,
    OvermoldKind,
    PartingPlane,
    Sheet,
)
from . import casting_process

#: Step names, in pour order (output folders step-1-bladder, step-2-skin).
BLADDER, SKIN = "bladder", "skin"
#: Plain tube left at each end of the bladder before the guides begin (mm): the thread's
#: end wraps lie there, and the ridges stay clear of the mold's end walls.
GUIDE_MARGIN_MM = 3.0
#: Angle kept between a gapped ridge's end and the other ridge's side at a crossing (rad):
#: the pieces never touch, so they are fused to the tube one by one in one boolean (two
#: crossing helical sweeps fused together took over half a minute and often failed).
CROSSING_CLEAR_RAD = 0.25
#: Shortest piece of a gapped ridge worth building (rad).
MIN_PIECE_RAD = 0.05
#: Wall kept between the core's seat and the far wall's outside (mm).
SEAT_LAND_MM = 1.5
#: Wall on each side of the core key in the inlet wall, and how far the square key stands
#: out beyond the round core (mm), as the one-shot core print.
KEY_LAND_MM, KEY_SHOULDER_MM = 1.5, 1.5
#: Nozzle widths of mold kept between neighbouring grooves of one helix: a rib that prints
#: (common practice, from memory: two extrusion widths), and turns far enough apart for the
#: kernel (a single helix 0.4 mm between turns at 1.2 mm ridges lost volume in the fuse;
#: 0.8 mm built cleanly).
RIB_NOZZLES = 2.0
#: Tolerance of the concentric-bore rule (mm).
AXIS_TOL_MM = 1e-6


def _problems(r: Recipe, line: LineOf) -> list[Problem]:
    return overmold_problems(r, line)


@casting_process("overmold", problems=_problems)
def steps(r: Recipe) -> tuple[CastingStep, ...]:
    bl, c = bladder(r), core(r)
    plane = PartingPlane("z", 0.0)
    first = _step(r, OvermoldKind.BLADDER, bl, c, bl.crest_radius_mm, bl.length_mm)
    second = _step(r, OvermoldKind.SKIN, bl, c, skin_radius_mm(r),
                   c.end_x_mm + r.process.skin_mm)
    return (CastingStep(BLADDER, (), (), plane, None, overmold=first),
            CastingStep(SKIN, (), (), plane, None, overmold=second))


def _step(r: Recipe, kind: OvermoldKind, bl: Bladder, c: OvermoldCore, cavity_radius_mm: float,
          cavity_end_x_mm: float) -> Overmold:
    m = r.mold
    om = Overmold(kind, bl, c, cavity_radius_mm, cavity_end_x_mm, m.wall_mm, m.flange_mm,
                  m.clearance_mm, m.key_diameter_mm, m.key_height_mm)
    if not bl.half_round:
        return om
    if kind is OvermoldKind.BLADDER:
        return replace(om, flat_depth_mm=0.0)
    return replace(om, flat_depth_mm=skin_flat_depth_mm(r), sheet=sheet(r))


def half_round(r: Recipe) -> bool:
    return r.process.bladder == "half-round"


def skin_flat_depth_mm(r: Recipe) -> float:
    """How far a half-round skin's flat face lies below the bladder's (mm): the thread
    lying flat across it, then the skin."""
    return r.process.thread_diameter_mm + r.process.skin_mm


def sheet(r: Recipe) -> Sheet | None:
    """The strain-limiting sheet of a half-round bladder (None: ``sheet: none``): on the
    thread across the flat face, ``cover_margin_mm`` inside the flat face's edges and the
    bladder's ends."""
    p = r.process
    if not half_round(r) or p.sheet == "none":
        return None
    big, _, length = radii_mm(r)
    m = p.cover_margin_mm
    return Sheet(p.sheet, m, length - m, big - m, -p.thread_diameter_mm)


def radii_mm(r: Recipe) -> tuple[float, float, float]:
    """(outer radius, bore radius, length) of the rod and its bore (mm)."""
    body, bore = r.body, r.voids[0]
    return (body.diameter_mm / 2.0, bore.diameter_mm / 2.0,  # type: ignore[attr-defined]
            body.length_mm)  # type: ignore[attr-defined]


def skin_radius_mm(r: Recipe) -> float:
    """The skin mold's cavity radius: the skin thickness over whichever stands higher, the
    ridge crests or the thread lying on the bladder."""
    big, _, _ = radii_mm(r)
    p = r.process
    under = max(p.guide_height_mm if p.guides != "none" else 0.0, p.thread_diameter_mm)
    return big + under + p.skin_mm


def on_curved_face(pieces: tuple[GuidePiece, ...]) -> tuple[GuidePiece, ...]:
    """The parts of ``pieces`` on a D's curved face: a piece at helix angle t points along
    cos t on z for either hand (0 = +z), so the curved face is t within pi/2 of 2 pi k;
    each part ends in the plane z = 0, flush with the flat face."""
    out = []
    for p in pieces:
        k = math.floor((p.t0_rad + math.pi / 2.0) / (2.0 * math.pi))
        while 2.0 * math.pi * k - math.pi / 2.0 < p.t1_rad:
            lo = max(p.t0_rad, 2.0 * math.pi * k - math.pi / 2.0)
            hi = min(p.t1_rad, 2.0 * math.pi * k + math.pi / 2.0)
            if hi - lo >= MIN_PIECE_RAD:
                out.append(GuidePiece(p.hand, lo, hi))
            k += 1
    return tuple(out)


def crossing_gap_rad(r: Recipe) -> float:
    """Half the angle a gapped ridge leaves open at a crossing: where the two ridges'
    centre lines are a ridge width apart along x (they close at pitch / pi per radian),
    plus CROSSING_CLEAR_RAD."""
    p = r.process
    return p.guide_width_mm * math.pi / p.guide_pitch_mm + CROSSING_CLEAR_RAD


def guide_pieces(r: Recipe) -> tuple[GuidePiece, ...]:
    """The guide ridges as pieces. Single: one right-handed helix. Double: a right- and a
    left-handed helix from the same start; they cross wherever t = k pi, and each crossing
    leaves one of them whole and the other gapped (the right at even k, the left at odd k),
    so no two pieces meet."""
    p = r.process
    _, _, length = radii_mm(r)
    total = 2.0 * math.pi * (length - 2.0 * GUIDE_MARGIN_MM) / p.guide_pitch_mm
    if p.guides == "none" or total <= 0.0:
        return ()
    if p.guides == "single":
        return (GuidePiece(1, 0.0, total),)
    gap = crossing_gap_rad(r)
    out = []
    for hand, parity in ((1, 0), (-1, 1)):
        centres = [k * math.pi for k in range(int(total / math.pi) + 2)
                   if k % 2 == parity and k * math.pi < total + gap]
        edges = [-math.inf, *centres, math.inf]
        for a, b in zip(edges[:-1], edges[1:]):
            lo, hi = max(0.0, a + gap), min(total, b - gap)
            if hi - lo >= MIN_PIECE_RAD:
                out.append(GuidePiece(hand, lo, hi))
    return tuple(out)


def bladder(r: Recipe) -> Bladder:
    big, small, length = radii_mm(r)
    p = r.process
    if half_round(r):
        return Bladder(big, small, length, p.guide_pitch_mm, p.guide_height_mm,
                       p.guide_width_mm, GUIDE_MARGIN_MM, on_curved_face(guide_pieces(r)),
                       half_round=True)
    return Bladder(big, small, length, p.guide_pitch_mm, p.guide_height_mm,
                   p.guide_width_mm, GUIDE_MARGIN_MM, guide_pieces(r))


def core(r: Recipe) -> OvermoldCore:
    """The rod core: the bore's radius, from the handle (``mold.core_handle_mm`` outside
    the inlet wall) to its tip seated in the far wall, a land of SEAT_LAND_MM short of the
    outside; the square key centred in the inlet wall. A half-round bladder's core is the
    rod's part above the flat wall, its key standing KEY_SHOULDER_MM beyond it on every
    side and reaching as far below z = 0, so the parting plane still splits its pocket."""
    big, small, length = radii_mm(r)
    wall = r.mold.wall_mm
    key_len = min(6.0, wall - 2 * KEY_LAND_MM)
    x0 = -wall / 2.0 - key_len / 2.0
    half = small + KEY_SHOULDER_MM
    start, end = -wall - r.mold.core_handle_mm, length + wall - SEAT_LAND_MM
    if half_round(r):
        key = ((x0, -half, -KEY_SHOULDER_MM), (x0 + key_len, half, half))
        return OvermoldCore(small, start, end, key, flat_z_mm=big - small)
    key = ((x0, -half, -half), (x0 + key_len, half, half))
    return OvermoldCore(small, start, end, key)


def half_round_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """A sheet only on a half-round bladder (a round one has no flat face to hold it); a
    half-round core at least ``checks.min_wall_mm`` high above the flat wall; a sheet
    whose edge lies at least ``checks.min_wall_mm`` inside the inlet face, and that is
    left with a size after its inset."""
    p, c = r.process, r.checks
    if not half_round(r):
        if "process.sheet" in r.lines and p.sheet != "none":
            return [Problem("process.sheet", "needs a flat face to lie on: only a half-round "
                            "bladder takes a strain-limiting sheet", line("process.sheet"),
                            p.sheet, "none, or process.bladder: half-round")]
        return []
    big, small, length = radii_mm(r)
    out: list[Problem] = []
    if 2.0 * small - big < c.min_wall_mm:
        out.append(Problem("voids[0].diameter_mm", "leaves the half-round core lower than "
                           "checks.min_wall_mm above the bladder's flat wall",
                           line("voids[0].diameter_mm"), 2 * small,
                           f"at least body.diameter_mm / 2 + checks.min_wall_mm = "
                           f"{big + c.min_wall_mm:g} mm"))
    if p.sheet == "none":
        return out
    m = p.cover_margin_mm
    if m < c.min_wall_mm:
        out.append(Problem("process.cover_margin_mm", "leaves the sheet's edge closer than "
                           "checks.min_wall_mm to the inlet face", line("process.cover_margin_mm"),
                           m, f"at least {c.min_wall_mm:g} mm"))
    elif m >= min(big, length / 2.0):
        out.append(Problem("process.cover_margin_mm", "leaves no sheet on the flat face",
                           line("process.cover_margin_mm"), m,
                           f"less than {min(big, length / 2.0):g} mm"))
    return out


def overmold_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """What keeps ``r`` from the overmold process: a flat-ended rod body, one concentric
    bore through it, a bladder wall and skin no thinner than ``checks.min_wall_mm``, guides
    whose pitch leaves room between turns and whose ridges stay low against the wall."""
    kind = getattr(r.body, "KIND", "?")
    if kind != "rod":
        return [Problem("body.kind", "cannot be overmolded", line("body.kind"), kind, "rod")]
    out: list[Problem] = []
    if r.body.end_round_mm > 0.0:  # type: ignore[attr-defined]
        out.append(Problem("body.end_round_mm", "must be 0 to overmold (the bladder's flat "
                           "ends sit on the molds' end walls)", line("body.end_round_mm"),
                           r.body.end_round_mm, "0"))  # type: ignore[attr-defined]
    if len(r.inlets) != 1 or r.inlet.at_end:
        # The rod core leaves through one socket on the x = 0 face in both steps.
        path = "inlets" if "inlets" in r.lines else "inlet.face"
        return [*out, Problem(path, "cannot be overmolded", line(path),
                              ", ".join(i.face.value for i in r.inlets),
                              "one inlet on the start face (x = 0)")]
    kinds = [getattr(v, "KIND", "?") for v in r.voids]
    if kinds != ["bore"]:
        return [*out, Problem("voids", "cannot be overmolded", line("voids"),
                              ", ".join(kinds) or "none", "one bore")]
    big, small, length = radii_mm(r)
    bore = r.voids[0]
    cy, cz = bore.center_mm  # type: ignore[attr-defined]
    if abs(cy) > AXIS_TOL_MM or abs(cz) > AXIS_TOL_MM:
        out.append(Problem("voids[0].center_mm", "is off the rod's axis (the core must be "
                           "concentric)", line("voids[0].center_mm"), f"({cy:g}, {cz:g})",
                           "(0, 0)"))
    # The bore may stop short of the far end (a recipe's voids stay inside the body): the
    # core runs on through the far end regardless, and the skin caps it there.
    if bore.start_mm > AXIS_TOL_MM:  # type: ignore[attr-defined]
        out.append(Problem("voids[0].start_mm", "does not start at the inlet face (the core "
                           "runs through the bladder)", line("voids[0].start_mm"),
                           bore.start_mm, "0"))  # type: ignore[attr-defined]
    p, c = r.process, r.checks
    if big - small < c.min_wall_mm:
        out.append(Problem("voids[0].diameter_mm", "leaves the bladder wall thinner than "
                           "checks.min_wall_mm", line("voids[0].diameter_mm"),
                           2 * small, f"at most {2 * (big - c.min_wall_mm):g} mm"))
    if p.skin_mm < c.min_wall_mm:
        out.append(Problem("process.skin_mm", "is thinner than checks.min_wall_mm",
                           line("process.skin_mm"), p.skin_mm,
                           f"at least {c.min_wall_mm:g} mm"))
    out += half_round_problems(r, line)
    if p.guides == "none":
        return out
    rib = RIB_NOZZLES * r.printer.nozzle_mm
    if p.guide_pitch_mm < p.guide_width_mm + rib:
        out.append(Problem("process.guide_pitch_mm", "is below the ridge width plus the "
                           "mold's rib between turns", line("process.guide_pitch_mm"),
                           p.guide_pitch_mm, f"at least process.guide_width_mm + "
                           f"{RIB_NOZZLES:g} x printer.nozzle_mm = "
                           f"{p.guide_width_mm + rib:g} mm"))
    elif p.guides == "double" and math.pi - 2.0 * crossing_gap_rad(r) < MIN_PIECE_RAD:
        need = p.guide_width_mm * math.pi / (math.pi / 2.0 - CROSSING_CLEAR_RAD
                                             - MIN_PIECE_RAD / 2.0)
        out.append(Problem("process.guide_pitch_mm", "leaves no ridge between the crossings "
                           "of a double guide", line("process.guide_pitch_mm"),
                           p.guide_pitch_mm, f"at least {need:.3g} mm"))
    wall = big - small
    if p.guide_height_mm > wall / 2.0:
        # Rule of thumb, from memory: a ridge taller than half the wall stiffens the
        # bladder like a rib instead of guiding the thread.
        out.append(Problem("process.guide_height_mm", "is taller than the bladder wall "
                           "allows (half the wall)", line("process.guide_height_mm"),
                           p.guide_height_mm, f"at most {wall / 2.0:g} mm"))
    if length - 2.0 * GUIDE_MARGIN_MM < p.guide_pitch_mm:
        out.append(Problem("process.guide_pitch_mm", "leaves less than one turn of guide "
                           "on the rod", line("process.guide_pitch_mm"), p.guide_pitch_mm,
                           f"at most {length - 2.0 * GUIDE_MARGIN_MM:g} mm"))
    return out
