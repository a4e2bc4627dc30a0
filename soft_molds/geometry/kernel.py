"""Thin, checked wrappers over the CAD kernel (cadquery/OCCT). Only the geometry package
imports cadquery or its OCP bindings, once per process.

OCCT booleans can report success on invalid input and hand back a wrong solid, so every
step here checks validity, solid count and, where known, the volume (kernel-notes).
"""

from __future__ import annotations

import functools
import math
import weakref
from collections.abc import Callable, Sequence

import cadquery as cq
from OCP.Bnd import Bnd_Box
from OCP.BRepAlgoAPI import BRepAlgoAPI_Cut, BRepAlgoAPI_Fuse, BRepAlgoAPI_Splitter
from OCP.BRepBndLib import BRepBndLib
from OCP.BRepBuilderAPI import BRepBuilderAPI_MakeEdge
from OCP.GC import GC_MakeArcOfEllipse
from OCP.gp import gp_Ax2, gp_Dir, gp_Elips, gp_Pnt
from OCP.ShapeUpgrade import ShapeUpgrade_ShapeDivideAngle

from ..errors import GeometryError
from ..recipe.cuts import OVERSHOOT_MM, SlitCut
from ..recipe.outline import Arc2, Ellipse, Line2
from ..recipe.primitives import (
    AXES,
    Extruded,
    MeshSolid,
    Primitive,
    ProfileLine,
    Revolved,
    RoundedBox,
    RoundedRing,
    RoundedRod,
    Slab,
    TurnedBar,
)

Shape = cq.Shape
_DIRS = {0: cq.Vector(1, 0, 0), 1: cq.Vector(0, 1, 0), 2: cq.Vector(0, 0, 1)}


_PARALLEL = True


def set_parallel(flag: bool) -> None:
    """Let OCCT spread booleans and meshing over threads (the default) or keep each on the
    calling thread: a pool of one worker per core runs faster that way, and the results
    are the same either way (a test compares the bytes)."""
    global _PARALLEL
    _PARALLEL = bool(flag)


def parallel() -> bool:
    return _PARALLEL


def solids_of(shape: cq.Shape) -> list[cq.Solid]:
    return list(shape.Solids())


#: The volume (mm3) measured when this module checked a shape, by the shape object's
#: identity; an entry goes when its shape does. Measuring a volume integrates over every
#: face, so each solid is measured once, where it is made (see :func:`volume`).
_VOLUMES: dict[int, tuple[weakref.ref[cq.Shape], float]] = {}


def _remember(shape: cq.Shape, vol: float) -> float:
    key = id(shape)
    _VOLUMES[key] = (weakref.ref(shape, lambda _ref: _VOLUMES.pop(key, None)), vol)
    return vol


def _remembered(shape: cq.Shape) -> float | None:
    entry = _VOLUMES.get(id(shape))
    return entry[1] if entry is not None and entry[0]() is shape else None


def _measured(shape: cq.Shape, known_volume: float | None) -> float:
    """``shape``'s volume (mm3): ``known_volume`` when the caller measured it, the one
    remembered from an earlier check, or measured now; remembered for later."""
    if known_volume is None:
        known_volume = _remembered(shape)
    return _remember(shape, float(shape.Volume()) if known_volume is None else known_volume)


#: Relative part of the slack allowed between a measured volume and the one expected.
#: ``Shape.Volume()`` integrates over every face with a fixed number of Gauss points (no
#: adaptive refinement), which is inexact on trimmed curved faces: on the upper shells of
#: rods 30, 60, 200 and 400 mm across (a half-cylinder cavity pierced by sprue and vents)
#: it was off the adaptive integration (``BRepGProp.VolumeProperties_s`` at a relative
#: 1e-10) by 0.9e-6 to 2.7e-6 of the volume, and a label cut into another face changed
#: that error by up to 1.0e-6 of the volume (measured with cadquery 2.8 / OCP 7.9). The
#: expected figure of a cut is itself a measured volume less a closed-form one, so two
#: such errors add up: 1e-5 covers twice the largest seen. The error scales with the
#: part (the integrand is the position over the area), so a relative slack fits it.
VOLUME_REL_TOL = 1e-5
#: Absolute part of the slack, per mm2 of the part's surface (mm): every face is placed
#: only to within the kernel's tolerance (``Precision::Confusion`` is 1e-7 mm; booleans
#: grow edge tolerances beyond it), so a volume is uncertain by about its area times a
#: length of that order. It matters for small parts, where the relative slack vanishes.
VOLUME_SKIN_MM = 1e-6


def volume_slack(shape: cq.Shape, expected_mm3: float, rel_tol: float = VOLUME_REL_TOL
                 ) -> float:
    """Largest accepted difference (mm3) between ``shape``'s measured volume and
    ``expected_mm3``: ``rel_tol`` of the expected volume plus its area (mm2) times
    ``VOLUME_SKIN_MM``."""
    return rel_tol * abs(expected_mm3) + VOLUME_SKIN_MM * float(shape.Area())


def volume_off(shape: cq.Shape, measured_mm3: float, expected_mm3: float,
               rel_tol: float = VOLUME_REL_TOL) -> bool:
    """Whether ``measured_mm3`` misses ``expected_mm3`` by more than :func:`volume_slack`;
    the area is integrated only when the relative slack alone is exceeded."""
    off = abs(measured_mm3 - expected_mm3)
    return off > rel_tol * abs(expected_mm3) and off > volume_slack(shape, expected_mm3,
                                                                     rel_tol)


def checked(shape: cq.Shape, part: str, step: str, solids: int | None = 1,
            volume_mm3: float | None = None, rel_tol: float = VOLUME_REL_TOL,
            known_valid: bool = False, known_volume: float | None = None) -> cq.Shape:
    """Return ``shape`` normalised to one Solid (when ``solids == 1``) after checking it:
    valid, the expected number of solids, positive volume, and ``volume_mm3`` when given."""
    if shape is None or shape.isNull():
        raise GeometryError(step, "the kernel returned an empty shape", part)
    if not known_valid and not shape.isValid():
        raise GeometryError(step, "the kernel returned an invalid solid", part)
    found = solids_of(shape)
    if solids is not None and len(found) != solids:
        raise GeometryError(step, f"expected {solids} solid(s), got {len(found)}", part)
    if solids == 1:
        shape = found[0]
    vol = _measured(shape, known_volume)
    if vol <= 0:
        raise GeometryError(step, f"non-positive volume {vol:.6g} mm3", part)
    if volume_mm3 is not None and volume_off(shape, vol, volume_mm3, rel_tol):
        raise GeometryError(step, f"volume {vol:.6f} mm3, expected {volume_mm3:.6f} mm3", part)
    return shape


def box(lo: Sequence[float], hi: Sequence[float]) -> cq.Solid:
    lo_v = cq.Vector(*lo)
    size = [b - a for a, b in zip(lo, hi)]
    return cq.Solid.makeBox(size[0], size[1], size[2], pnt=lo_v)


def cylinder(axis: int, start: Sequence[float], length: float, radius: float) -> cq.Solid:
    return cq.Solid.makeCylinder(radius, length, cq.Vector(*start), _DIRS[axis])


def frustum(axis: int, start: Sequence[float], height: float, r_base: float, r_top: float,
            sign: float = 1.0) -> cq.Solid:
    d = _DIRS[axis] * sign
    return cq.Solid.makeCone(r_base, r_top, height, cq.Vector(*start), d)


@functools.lru_cache(maxsize=64)
def _rounded_box_at_origin(size: tuple[float, float, float], radius: float) -> cq.Shape:
    sx, sy, sz = size
    solid = cq.Solid.makeBox(sx, sy, sz, pnt=cq.Vector(-sx / 2, -sy / 2, -sz / 2))
    if radius <= 0:
        return solid
    # Fillet the primitive before any boolean: fillets on fused results fail (kernel-notes).
    return checked(solid.fillet(radius, solid.Edges()), "primitive", "round box edges")


def _rounded_box(p: RoundedBox, part: str) -> cq.Shape:
    """Chambers of one row are equal: fillet one and place copies (the fillet is the costly
    step, and copies of one checked solid need no new check)."""
    try:
        base = _rounded_box_at_origin(tuple(p.size_mm), p.radius_mm)
    except GeometryError as exc:
        raise GeometryError(exc.step, exc.detail, part) from exc
    return base.translate(cq.Vector(*p.center_mm))


def _rounded_rod(p: RoundedRod, part: str) -> cq.Shape:
    """Revolve the rounded (t, rho) rectangle: one recipe handles every end rounding from
    sharp to full hemispheres without a fillet operation."""
    a = AXES[p.axis]
    r, f, length = p.radius_mm, p.end_radius_mm, p.length_mm
    if f <= 0:
        start = [0.0, 0.0, 0.0]
        start[a] = p.start_mm
        others = [i for i in range(3) if i != a]
        for k, i in enumerate(others):
            start[i] = p.center_mm[k]
        return cylinder(a, start, length, r)
    # Profile in the local XY plane: X along the rod axis, Y radial; revolved about X.
    wp = cq.Workplane("XY").moveTo(0, 0)
    if r - f > 1e-9:
        wp = wp.lineTo(0, r - f)
    wp = wp.radiusArc((f, r), f)
    if length - 2 * f > 1e-9:
        wp = wp.lineTo(length - f, r)
    wp = wp.radiusArc((length, r - f), f)
    if r - f > 1e-9:
        wp = wp.lineTo(length, 0)
    made = wp.close().revolve(360, (0, 0, 0), (1, 0, 0)).val()
    if not isinstance(made, cq.Shape):
        raise GeometryError("revolve rounded rod", "the kernel returned no solid", part)
    solid = checked(made, part, "revolve rounded rod")
    # Local X -> world axis a; then move to the start and the axis position.
    if a == 1:
        solid = solid.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 0, 1), 90)
    elif a == 2:
        solid = solid.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 1, 0), -90)
    offset = [0.0, 0.0, 0.0]
    offset[a] = p.start_mm
    others = [i for i in range(3) if i != a]
    for k, i in enumerate(others):
        offset[i] = p.center_mm[k]
    return solid.translate(cq.Vector(*offset))


#: Angle (deg) the seams of a revolved profile are turned about x, away from y = 0 and z = 0.
SEAM_TURN_DEG = 45.0


def _revolved(p: Revolved, part: str) -> cq.Shape:
    """Revolve the profile outline (lines and rounding arcs in the local XY plane: X along
    the axis, Y the radius) about the x axis, closed along the axis; checked against the
    volume of the same outline by discs (Pappus)."""
    pieces = p.pieces()
    wp = cq.Workplane("XY").moveTo(*pieces[0].start)
    for piece in pieces:
        if isinstance(piece, ProfileLine):
            wp = wp.lineTo(*piece.end)
        else:
            wp = wp.threePointArc(piece.mid(), piece.end)
    made = wp.close().revolve(360, (0, 0, 0), (1, 0, 0)).val()
    if not isinstance(made, cq.Shape):
        raise GeometryError("revolve profile", "the kernel returned no solid", part)
    # The revolved faces' seams lie in the profile's plane; turned off both parting planes
    # through the axis (y = 0, z = 0), the split never runs along them.
    made = made.rotate(cq.Vector(0, 0, 0), cq.Vector(1, 0, 0), SEAM_TURN_DEG)
    return checked(made, part, "revolve profile", volume_mm3=p.volume_mm3())


#: Angle (rad) from the y axis where a closed round outline's edges meet: off both cross
#: planes through its centre, where a parting plane may run (as SEAM_TURN_DEG does for
#: revolved bodies).
SEAM_ANGLE_RAD = math.pi / 4.0


def _section_wire(e: Extruded, x: float, scale: float) -> cq.Wire:
    """The outline of ``e`` scaled about its scale centre by ``scale``, in the plane at
    ``x``: lines and three-point arcs; a circle or an ellipse as two halves that meet at
    SEAM_ANGLE_RAD and opposite it."""
    cy, cz = e.scale_center_mm

    def at(y: float, z: float) -> cq.Vector:
        return cq.Vector(x, cy + scale * (y - cy), cz + scale * (z - cz))

    o = e.outline
    if isinstance(o, Ellipse):
        return cq.Wire.assembleEdges([_half_ellipse(at, o, k) for k in (0, 1)])
    pieces = o.pieces()
    if _one_circle(pieces):
        assert isinstance(pieces[0], Arc2)
        (ay, az), r = pieces[0].center, pieces[0].radius
        pts = [at(ay + r * math.cos(SEAM_ANGLE_RAD + k * math.pi / 2),
                  az + r * math.sin(SEAM_ANGLE_RAD + k * math.pi / 2)) for k in range(4)]
        return cq.Wire.assembleEdges([cq.Edge.makeThreePointArc(pts[0], pts[1], pts[2]),
                                      cq.Edge.makeThreePointArc(pts[2], pts[3], pts[0])])
    edges = []
    for piece in pieces:
        if isinstance(piece, Line2):
            edges.append(cq.Edge.makeLine(at(*piece.start), at(*piece.end)))
        else:
            edges.append(cq.Edge.makeThreePointArc(at(*piece.start), at(*piece.point(0.5)),
                                                   at(*piece.end)))
    return cq.Wire.assembleEdges(edges)


def _one_circle(pieces: tuple[Line2 | Arc2, ...]) -> bool:
    """Whether the outline is arcs of one circle only (a circle)."""
    first = pieces[0]
    return isinstance(first, Arc2) and all(
        isinstance(p, Arc2) and abs(p.radius - first.radius) < 1e-9 and
        math.dist(p.center, first.center) < 1e-9 for p in pieces)


def _half_ellipse(at: Callable[[float, float], cq.Vector], o: Ellipse, k: int) -> cq.Edge:
    """Half (``k`` = 0 or 1) of the ellipse, from the angle SEAM_ANGLE_RAD + k pi on, in
    the section plane that ``at`` maps (y, z) into."""
    (ey, ez), a, b = o.center, o.semi_y_mm, o.semi_z_mm
    c = at(ey, ez)
    p_y, p_z = at(ey + a, ez), at(ey, ez + b)
    major, minor = (p_y, p_z) if a >= b else (p_z, p_y)
    xdir = (major - c).normalized()
    ydir = cq.Vector(1, 0, 0).cross(xdir)
    ax = gp_Ax2(gp_Pnt(c.x, c.y, c.z), gp_Dir(1, 0, 0), gp_Dir(xdir.x, xdir.y, xdir.z))
    elips = gp_Elips(ax, (major - c).Length, (minor - c).Length)
    # The angle from y, as a parameter of a curve whose own first axis may be z.
    t0 = SEAM_ANGLE_RAD + k * math.pi
    start = at(ey + a * math.cos(t0), ez + b * math.sin(t0)) - c
    u0 = math.atan2(start.dot(ydir) / (minor - c).Length, start.dot(xdir) / (major - c).Length)
    curve = GC_MakeArcOfEllipse(elips, u0, u0 + math.pi, True).Value()
    return cq.Edge(BRepBuilderAPI_MakeEdge(curve).Edge())


def _extruded(p: Extruded, part: str) -> cq.Shape:
    """A prism (the outline's face pushed along x), or a ruled loft between the start
    section and the scaled tip section; checked against the closed-form volume."""
    x0, x1 = p.start_mm, p.start_mm + p.length_mm
    start = _section_wire(p, x0, 1.0)
    try:
        if p.tip_scale == 1.0:
            face = cq.Face.makeFromWires(start)
            made: cq.Shape = cq.Solid.extrudeLinear(face, cq.Vector(p.length_mm, 0, 0))
        else:
            made = cq.Solid.makeLoft([start, _section_wire(p, x1, p.tip_scale)], ruled=True)
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        raise GeometryError("sweep section", f"the kernel failed: {exc}", part) from exc
    return checked(made, part, "sweep section", volume_mm3=p.volume_mm3(), rel_tol=1e-6)


def _slab(p: Slab, part: str) -> cq.Shape:
    """The outline's face at z0 pushed up by the thickness; checked against the
    closed-form volume."""
    return outline_prism(p.outline.pieces(), p.z0_mm, p.z0_mm + p.thickness_mm, part,
                         "extrude plate", p.volume_mm3())


def outline_prism(pieces: Sequence[Line2 | Arc2], z0: float, z1: float, part: str, step: str,
                  volume_mm3: float) -> cq.Shape:
    """A closed chain of lines and arcs in the x-y plane (mm) pushed from z0 to z1: lines
    and three-point arcs (an arc over a half turn as two halves, whose three points then
    stay well apart); checked against ``volume_mm3`` to 1e-6."""
    def at(x: float, y: float) -> cq.Vector:
        return cq.Vector(x, y, z0)

    edges = []
    for piece in pieces:
        if isinstance(piece, Line2):
            edges.append(cq.Edge.makeLine(at(*piece.start), at(*piece.end)))
        elif abs(piece.sweep_rad) > math.pi:
            halves = ((0.0, 0.25, 0.5), (0.5, 0.75, 1.0))
            edges += [cq.Edge.makeThreePointArc(*(at(*piece.point(f)) for f in h))
                      for h in halves]
        else:
            edges.append(cq.Edge.makeThreePointArc(at(*piece.start), at(*piece.point(0.5)),
                                                   at(*piece.end)))
    try:
        face = cq.Face.makeFromWires(cq.Wire.assembleEdges(edges))
        made = cq.Solid.extrudeLinear(face, cq.Vector(0, 0, z1 - z0))
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        raise GeometryError(step, f"the kernel failed: {exc}", part) from exc
    return checked(made, part, step, volume_mm3=volume_mm3, rel_tol=1e-6)


def build_slit(c: SlitCut, part: str) -> cq.Shape:
    """The slit's tool: its xz section (lines and three-point arcs, exact) pushed along y
    over its span; checked against the closed-form volume of the whole tool."""
    y0 = c.center_y_mm - c.span_mm / 2.0

    def at(x: float, z: float) -> cq.Vector:
        return cq.Vector(x, y0, z)

    edges = [cq.Edge.makeLine(at(*pts[0]), at(*pts[1])) if kind == "line"
             else cq.Edge.makeThreePointArc(at(*pts[0]), at(*pts[1]), at(*pts[2]))
             for kind, pts in c.outline_xz()]
    try:
        face = cq.Face.makeFromWires(cq.Wire.assembleEdges(edges))
        made = cq.Solid.extrudeLinear(face, cq.Vector(0, c.span_mm, 0))
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        raise GeometryError("build slit", f"the kernel failed: {exc}", part) from exc
    whole = c.section_area_mm2(c.top_z_mm + OVERSHOOT_MM) * c.span_mm
    if c.angle_deg != 0.0:  # a slit across a turned row: turned about its centre
        made = made.rotate(cq.Vector(c.center_x_mm, c.center_y_mm, 0.0),
                           cq.Vector(c.center_x_mm, c.center_y_mm, 1.0), c.angle_deg)
    return checked(made, part, "build slit", volume_mm3=whole, rel_tol=1e-6)


def build_primitive(p: Primitive, part: str) -> cq.Shape:
    if isinstance(p, RoundedBox):
        return _rounded_box(p, part)
    if isinstance(p, RoundedRod):
        return _rounded_rod(p, part)
    if isinstance(p, Revolved):
        return _revolved(p, part)
    if isinstance(p, Extruded):
        return _extruded(p, part)
    if isinstance(p, RoundedRing):
        return _rounded_ring(p, part)
    if isinstance(p, TurnedBar):
        return _turned_bar(p, part)
    if isinstance(p, Slab):
        return _slab(p, part)
    if isinstance(p, MeshSolid):
        from .stepbody import imported_solid  # it imports this module

        return imported_solid(p, part)
    raise GeometryError("build primitive", f"unknown primitive {type(p).__name__}", part)


def _turned_bar(p: TurnedBar, part: str) -> cq.Shape:
    """Built along +x at the origin (a filleted box, or the rounded rectangle section
    swept along x), turned about z and moved; checked against the closed-form volume."""
    lx, ly, lz, r = p.length_mm, p.width_mm, p.height_mm, p.radius_mm
    made: object
    if p.round_ends:
        try:
            made = _rounded_box_at_origin((lx, ly, lz), r)
        except GeometryError as exc:
            raise GeometryError(exc.step, exc.detail, part) from exc
    else:
        wp = cq.Workplane("YZ", origin=(-lx / 2.0, 0.0, 0.0))
        if r > 0.0:
            made = wp.sketch().rect(ly, lz).vertices().fillet(r).finalize().extrude(lx).val()
        else:
            made = wp.rect(ly, lz).extrude(lx).val()
    if not isinstance(made, cq.Shape):
        raise GeometryError("turned bar", "the kernel returned no solid", part)
    made = made.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 0, 1), p.angle_deg)
    made = made.translate(cq.Vector(*p.center_mm))
    return checked(made, part, "turned bar", volume_mm3=p.volume_mm3(), rel_tol=1e-6)


def _rounded_ring(p: RoundedRing, part: str) -> cq.Shape:
    """Revolve the rounded (radius, z) rectangle about the ring's axis: drawn in the local
    XY plane (X the radius, Y the height) and turned about Y, then stood up with Y along
    world z; checked against the closed-form volume (Pappus)."""
    f = p.round_mm
    r0, r1, h = p.inner_radius_mm, p.outer_radius_mm, p.height_mm
    s = math.sqrt(0.5)
    wp = cq.Workplane("XY").moveTo(r0 + f, 0.0)
    if f > 0.0:
        wp = wp.lineTo(r1 - f, 0.0).threePointArc((r1 - f + f * s, f - f * s), (r1, f))
        wp = wp.lineTo(r1, h - f).threePointArc((r1 - f + f * s, h - f + f * s), (r1 - f, h))
        wp = wp.lineTo(r0 + f, h).threePointArc((r0 + f - f * s, h - f + f * s), (r0, h - f))
        wp = wp.lineTo(r0, f).threePointArc((r0 + f - f * s, f - f * s), (r0 + f, 0.0))
        wire = wp.wire()
    else:
        wire = wp.lineTo(r1, 0.0).lineTo(r1, h).lineTo(r0, h).close()
    try:
        made = wire.revolve(360, (0, 0, 0), (0, 1, 0)).val()
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        raise GeometryError("revolve ring", f"the kernel failed: {exc}", part) from exc
    if not isinstance(made, cq.Shape):
        raise GeometryError("revolve ring", "the kernel returned no solid", part)
    # Local Y -> world z; the seam (the profile's meridian) turned off both planes through
    # the axis along x and y, where a parting plane may run (as SEAM_TURN_DEG).
    made = made.rotate(cq.Vector(0, 0, 0), cq.Vector(1, 0, 0), 90)
    made = made.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 0, 1), SEAM_TURN_DEG)
    made = made.translate(cq.Vector(p.center_mm[0], p.center_mm[1], p.z0_mm))
    return checked(made, part, "revolve ring", volume_mm3=p.volume_mm3(), rel_tol=1e-6)


def fuse(shapes: Sequence[cq.Shape], part: str, step: str,
         volume_mm3: float | None = None, solids: int | None = 1,
         rel_tol: float = VOLUME_REL_TOL) -> cq.Shape:
    """Fuse many solids in one boolean (one by one grows quadratically, kernel-notes).
    ``solids``: how many separate solids the result must have (None: any number, e.g. voids
    that meet only in the tube socket, fused with it later)."""
    if not shapes:
        raise GeometryError(step, "nothing to fuse", part)
    if len(shapes) == 1:
        return checked(shapes[0], part, step, volume_mm3=volume_mm3, rel_tol=rel_tol)
    try:
        out = shapes[0]._bool_op((shapes[0],), shapes[1:], BRepAlgoAPI_Fuse(),
                                 parallel=_PARALLEL)
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        raise GeometryError(step, f"fuse failed: {exc}", part) from exc
    shape, valid, vol = _clean(out)
    # One solid is returned as that solid whatever was asked: the same result as before
    # the count was left open, so the booleans downstream see the same input.
    found = len(solids_of(shape))
    return checked(shape, part, step, 1 if found == 1 else solids, volume_mm3=volume_mm3,
                   rel_tol=rel_tol, known_valid=valid, known_volume=vol)


def cut(base: cq.Shape, tools: Sequence[cq.Shape], part: str, step: str,
        solids: int | None = 1, volume_mm3: float | None = None,
        clean: bool = True, rel_tol: float = VOLUME_REL_TOL) -> cq.Shape:
    """Cut every tool from ``base`` in one boolean. ``clean=False`` skips merging coplanar
    faces afterwards: right for a last cut of many small faces (a label), where merging
    costs more than the cut and gains nothing."""
    if not tools:
        return base
    try:
        raw = base._bool_op((base,), tools, BRepAlgoAPI_Cut(), parallel=_PARALLEL)
    except Exception as exc:
        raise GeometryError(step, f"cut failed: {exc}", part) from exc
    if not clean:
        return checked(raw, part, step, solids, volume_mm3, rel_tol=rel_tol)
    shape, valid, vol = _clean(raw)
    return checked(shape, part, step, solids, volume_mm3, rel_tol=rel_tol, known_valid=valid,
                   known_volume=vol)


def _clean(raw: cq.Shape) -> tuple[cq.Shape, bool, float | None]:
    """Unify same-domain faces, but keep the raw result when cleaning corrupts it (known
    upstream failure mode, kernel-notes). Returns the shape, whether it was found valid and,
    when measured, its volume (mm3; volume integration is costly on filleted shapes)."""
    try:
        cleaned = raw.clean()
    except Exception:
        return raw, False, None
    if not cleaned.isValid():
        return raw, False, None
    raw_vol = raw.Volume()
    vol = cleaned.Volume()
    if abs(vol - raw_vol) <= 1e-7 * abs(raw_vol):
        return cleaned, True, vol
    return raw, False, raw_vol


def divide_revolved_faces(shape: cq.Shape, max_deg: float, part: str, step: str,
                          rel_tol: float = VOLUME_REL_TOL) -> cq.Shape:
    """``shape`` with every face on a surface of revolution (cylinder, cone, sphere,
    torus) cut into faces spanning at most ``max_deg`` about its axis; the solid and its
    volume unchanged. The mesher triangulates one face at a time: a whole cylinder
    pierced by many small footprints came out with facets spanning 80 degrees and sunk
    1.5 mm below it (measured, chord 0.02 mm; quarter faces meshed within the chord).
    Call it after the last boolean: cleaning merges the faces back. ``rel_tol``: how far
    the volume integrated over the new faces may differ from the old figure."""
    before = volume(shape)
    divider = ShapeUpgrade_ShapeDivideAngle(math.radians(max_deg), shape.wrapped)
    if not divider.Perform():  # no face of revolution wider than max_deg
        return shape
    return checked(cq.Shape.cast(divider.Result()), part, step, volume_mm3=before,
                   rel_tol=rel_tol)


def split_at(shape: cq.Shape, axis: int, offset: float, part: str) -> tuple[cq.Shape, cq.Shape]:
    """Split at the plane ``coord[axis] = offset``; return (below, above)."""
    bb = shape.BoundingBox()
    size = 4 * max(bb.xlen, bb.ylen, bb.zlen)
    centre = [bb.center.x, bb.center.y, bb.center.z]
    centre[axis] = offset
    face = cq.Face.makePlane(size, size, cq.Vector(*centre), _DIRS[axis])
    try:
        pieces = solids_of(shape._bool_op((shape,), (face,), BRepAlgoAPI_Splitter(),
                                          parallel=_PARALLEL))
    except Exception as exc:
        raise GeometryError("split at parting plane", f"split failed: {exc}", part) from exc
    if len(pieces) != 2:
        raise GeometryError("split at parting plane",
                            f"expected 2 solids, got {len(pieces)}", part)
    # The halves lie on either side of the plane: the centres of their loose bounding boxes
    # order them as well as their centres of mass would, at a fraction of the cost.
    pieces.sort(key=lambda s: _loose_box_centre(s)[axis])
    # The halves share the parting face's edges; cleaning one after a later boolean
    # rewrites shared edges in place, so the upper half gets its own copy of them.
    pieces[1] = pieces[1].copy()
    below, above = (checked(p, part, "split at parting plane") for p in pieces)
    total = volume(below) + volume(above)
    whole = volume(shape)
    if volume_off(shape, total, whole):
        raise GeometryError("split at parting plane",
                            f"halves hold {total:.3f} mm3 of {whole:.3f} mm3", part)
    return below, above


def _loose_box_centre(shape: cq.Shape) -> tuple[float, float, float]:
    """Centre of a bounding box that may exceed the shape by its tolerances (mm)."""
    box = Bnd_Box()
    BRepBndLib.Add_s(shape.wrapped, box, False)
    x0, y0, z0, x1, y1, z1 = box.Get()
    return (x0 + x1) / 2.0, (y0 + y1) / 2.0, (z0 + z1) / 2.0


def volume(shape: cq.Shape) -> float:
    """Volume of ``shape`` (mm3). A shape returned by this module's checked steps was
    measured there: that figure is returned, not measured again."""
    vol = _remembered(shape)
    return float(shape.Volume()) if vol is None else vol

