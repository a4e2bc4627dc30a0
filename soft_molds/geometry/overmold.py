"""Solids of the overmold process (see :mod:`soft_molds.plan.processes.overmold`).

Actuator frame (mm): the rod's axis is x from the inlet face x = 0; both steps part on
z = 0 (through the axis), the upper shell pulling along +z; pour orientation is this frame
as it stands (z up). A half-round bladder's flat face lies on z = 0 (down), its core is
the bore's part above the flat wall, and the skin cavity is a D on a slab below the flat
face (see :mod:`soft_molds.plan.processes.overmold`).

The guide ridges are sweeps of their rectangular section along ``cq.Wire.makeHelix`` (a
screw motion: the section stays in a plane through the axis, so the sweep's volume is the
Pappus closed form to about 1e-6). Each section reaches a little into the tube so the
ridge fuses onto it with volume; the pieces of a double guide never meet (see
``guide_pieces``), so all of them are fused to the tube in one boolean.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import cadquery as cq

from ..errors import GeometryError
from ..plan.model import (
    Bladder,
    GuidePiece,
    Opening,
    Overmold,
    OvermoldCore,
    segment_area_mm2,
)
from . import kernel as k

#: How far a ridge's section reaches into the tube below its surface (mm; at most half
#: the bladder wall): enough overlap for a clean fuse, never into the bore.
RIDGE_ROOT_MM = 0.3
#: The sprue and vent cuts start this far inside the cavity (mm), as the one-shot shells'.
CAVITY_OVERLAP_MM = 0.3
#: Relative slack of a ridged solid's volume against its closed form: one helical sweep
#: carries it to about 1e-6, but a sweep over several turns fused to the tube came out
#: 4e-5 short (measured: 3 turns of a single guide; the double guide's shorter pieces fuse
#: to 1e-7). Cutting a long single guide into touching half turns was worse (1.4 % short
#: at a 2 mm pitch), so the slack is 1e-4 and a single guide is one sweep.
RIDGE_VOLUME_TOL = 1e-4
#: Widest face about the axis a round tube's meshed solids keep (deg): its one cylindrical
#: face, pierced by every ridge's footprint, meshed with facets sunk up to 1.5 mm into
#: pits no shell followed; quarter faces mesh within the chord (a half-round's curved
#: face, 180 degrees, meshed cleanly and is left whole).
ROUND_FACE_MAX_DEG = 90.0


@dataclass(frozen=True)
class OvermoldCasts:
    """The solids both steps share (actuator frame): the bladder's outside (tube filled,
    ridges on), the bladder (that less the core), the core, the skin mold's cavity
    (a capped cylinder) and the skin (the cavity less the bladder's outside and the
    core)."""

    outside: cq.Shape
    bladder: cq.Shape
    core: cq.Shape
    skin_cavity: cq.Shape
    skin: cq.Shape


def ridge_piece(bl: Bladder, p: GuidePiece) -> cq.Shape:
    """One guide piece: the section (x from -width/2 to width/2, radius from the tube's
    surface less the root to the crest) swept along its helix."""
    r_o, h, w, pitch = (bl.outer_radius_mm, bl.guide_height_mm, bl.guide_width_mm,
                        bl.guide_pitch_mm)
    root = min(RIDGE_ROOT_MM, (r_o - bl.bore_radius_mm) / 2.0)
    helix = cq.Wire.makeHelix(pitch, pitch * p.span_rad / (2.0 * math.pi), r_o,
                              center=cq.Vector(0, 0, 0), dir=cq.Vector(1, 0, 0),
                              lefthand=p.hand < 0)
    # makeHelix starts at +z and turns by the right-hand rule about +x (left: the other
    # way), so the section sits in the x-z plane at y = 0.
    corners = [(-w / 2.0, r_o - root), (w / 2.0, r_o - root), (w / 2.0, r_o + h),
               (-w / 2.0, r_o + h)]
    section = cq.Wire.makePolygon([cq.Vector(x, 0.0, z) for x, z in corners], close=True)
    solid = cq.Solid.sweep(section, [], helix, makeSolid=True, isFrenet=True)
    solid = solid.rotate(cq.Vector(0, 0, 0), cq.Vector(1, 0, 0),
                         math.degrees(p.hand * p.t0_rad))
    solid = solid.translate(cq.Vector(bl.guide_start_x_mm + pitch * p.t0_rad / (2 * math.pi),
                                      0.0, 0.0))
    a, rho = w * (h + root), r_o + (h - root) / 2.0
    return k.checked(solid, "cast", "sweep a guide ridge", volume_mm3=a * rho * p.span_rad,
                     rel_tol=RIDGE_VOLUME_TOL)


def d_prism(x0_mm: float, length_mm: float, radius_mm: float, flat_z_mm: float,
            part: str) -> cq.Shape:
    """The disc of ``radius_mm`` about the x axis cut by the plane z = ``flat_z_mm`` (its
    part above: a half disc at 0, a segment above 0) or, for ``flat_z_mm`` below 0, the
    half disc above z = 0 on a slab of its width down to ``flat_z_mm``; extruded along +x
    from ``x0_mm`` by ``length_mm``."""
    r, h = radius_mm, flat_z_mm
    # The YZ workplane's local (x, y) is the global (y, z); it extrudes along +x.
    wp = cq.Workplane("YZ", origin=(x0_mm, 0.0, 0.0))
    if h >= 0.0:
        a = math.sqrt(r * r - h * h)
        sketch = wp.moveTo(-a, h).lineTo(a, h).threePointArc((0.0, r), (-a, h)).close()
        area = segment_area_mm2(r, h)
    else:
        sketch = (wp.moveTo(-r, h).lineTo(r, h).lineTo(r, 0.0)
                  .threePointArc((0.0, r), (-r, 0.0)).close())
        area = math.pi * r * r / 2.0 - 2.0 * r * h
    solid = sketch.extrude(length_mm).val()
    if not isinstance(solid, cq.Shape):
        raise GeometryError("extrude a half-round section", "no solid came out", part)
    return k.checked(solid, part, "extrude a half-round section", volume_mm3=area * length_mm)


def build_core(c: OvermoldCore) -> cq.Shape:
    rod: cq.Shape
    if c.flat_z_mm is None:
        rod = k.cylinder(0, (c.start_x_mm, 0.0, 0.0), c.end_x_mm - c.start_x_mm, c.radius_mm)
    else:
        rod = d_prism(c.start_x_mm, c.end_x_mm - c.start_x_mm, c.radius_mm, c.flat_z_mm,
                      "core")
    key = k.box(*c.key_box)
    return k.fuse([rod, key], "core", "build core", volume_mm3=c.volume_mm3())


def build_casts(bladder_step: Overmold, skin_step: Overmold) -> OvermoldCasts:
    bl = bladder_step.bladder
    tube: cq.Shape
    if bl.half_round:
        tube = d_prism(0.0, bl.length_mm, bl.outer_radius_mm, 0.0, "cast")
    else:
        tube = k.cylinder(0, (0.0, 0.0, 0.0), bl.length_mm, bl.outer_radius_mm)
    ridges = [ridge_piece(bl, p) for p in bl.pieces]
    full = bl.outside_area_mm2() * bl.length_mm + bl.ridge_volume_mm3()
    outside = k.fuse([tube, *ridges], "cast", "fuse the guide ridges to the tube",
                     volume_mm3=full, rel_tol=RIDGE_VOLUME_TOL)
    core = build_core(bladder_step.core)
    # The cuts are checked against the fused outside as measured (its closed form was
    # checked above, to RIDGE_VOLUME_TOL): the core's rod fills the bore over the length.
    out_vol = k.volume(outside)
    bore = bl.bore_area_mm2() * bl.length_mm
    bladder = k.cut(outside, [core], "cast", "cut the bore", volume_mm3=out_vol - bore)
    rs, end = skin_step.cavity_radius_mm, skin_step.cavity_end_x_mm
    cavity: cq.Shape
    if skin_step.flat_depth_mm is None:
        cavity = k.cylinder(0, (0.0, 0.0, 0.0), end, rs)
        cavity_vol = math.pi * rs * rs * end
    else:
        cavity = d_prism(0.0, end, rs, -skin_step.flat_depth_mm, "cast")
        cavity_vol = (math.pi * rs * rs / 2.0 + 2.0 * rs * skin_step.flat_depth_mm) * end
    c = skin_step.core
    beyond = c.section_mm2() * (c.end_x_mm - bl.length_mm)
    skin = k.cut(cavity, [outside, core], "cast", "cut the bladder from the skin cavity",
                 volume_mm3=cavity_vol - out_vol - beyond)
    if not bl.half_round:
        # A long single guide's sweep integrates 7e-5 apart once its neighbours are
        # divided (measured): the ridged solids' slack applies.
        bladder, skin = (k.divide_revolved_faces(s, ROUND_FACE_MAX_DEG, "cast",
                                                 "divide the round faces", RIDGE_VOLUME_TOL)
                         for s in (bladder, skin))
    return OvermoldCasts(outside, bladder, core, cavity, skin)


@dataclass(frozen=True)
class OvermoldShells:
    lower: cq.Shape
    upper: cq.Shape
    #: Silicone standing in the sprue and vents when poured to the top face (mm3).
    fill_volume_mm3: float


def build_shells(om: Overmold, cavity: cq.Shape, core: cq.Shape,
                 openings: Sequence[Opening]) -> OvermoldShells:
    """Both shells of one step: the block less the cavity, the core and its key pocket
    (with the fit's clearance), split at z = 0; drafted registration pegs on the lower
    half, sockets for them and the step's sprue and vents cut into the upper."""
    c = om.clearance_mm
    (klo, khi) = om.core.key_box
    pocket = k.box(tuple(a - c for a in klo), tuple(b + c for b in khi))
    block = k.box(om.block_lo, om.block_hi)
    shell = k.cut(block, [cavity, core, pocket], "shell", "cut cavity and core seat")
    lower, upper = k.split_at(shell, 2, 0.0, "shell")
    rk, h = om.key_diameter_mm / 2.0, om.key_height_mm
    rt = 0.7 * rk
    pegs = [k.frustum(2, (x, y, 0.0), h, rk, rt) for x, y in om.keys_xy()]
    sockets = [k.frustum(2, (x, y, -0.01), h + c + 0.01, rk + c, rt + c)
               for x, y in om.keys_xy()]
    peg_vol = len(pegs) * math.pi * h / 3.0 * (rk * rk + rk * rt + rt * rt)
    lower = k.fuse([lower, *pegs], "shell-lower", "add registration keys",
                   volume_mm3=k.volume(lower) + peg_vol)
    top = om.block_hi[2]
    tools, fill = list(sockets), 0.0
    for op in openings:
        x, y, z = op.center_mm
        start = (z if op.floor_mm is None else op.floor_mm) - CAVITY_OVERLAP_MM
        tools.append(k.cylinder(2, (x, y, start), top - start + 0.1, op.radius_mm))
        fill += math.pi * op.radius_mm ** 2 * (top - z)
    before = k.volume(upper)
    upper = k.cut(upper, tools, "shell-upper", "cut key sockets, sprue and vents")
    if not k.volume(upper) < before:
        raise GeometryError("cut key sockets, sprue and vents", "nothing was removed",
                            "shell-upper")
    if not om.bladder.half_round:
        lower, upper = (k.divide_revolved_faces(s, ROUND_FACE_MAX_DEG, part,
                                                "divide the round faces", RIDGE_VOLUME_TOL)
                        for s, part in ((lower, "shell-lower"), (upper, "shell-upper")))
    return OvermoldShells(lower, upper, fill)
