"""Read a body drawn in the user's own CAD program from a STEP file.

:func:`read_step_body` is the reader the recipe stage asks for (``recipe/imported.py``):
the file's bytes are hashed and read once, checked (exactly one solid, closed and valid,
positive volume), placed, measured (BRep volume, exact bounds) and meshed for the recipe
stage's distance checks. The placed BRep stays in this process's cache under the file's
digest and placement; :func:`imported_solid` hands it to the build (and reads the file
again in a process that has not, a sweep worker, refusing a file that changed since).

Placement: rotate about the world x axis by ``rotate_deg[0]``, then about world y by
``rotate_deg[1]``, then about world z by ``rotate_deg[2]`` (right-handed, degrees), then
translate by ``translate_mm``: p' = Rz Ry Rx p + t. Mm throughout: a STEP file in other
units is converted to mm by the reader (the kernel's default unit is the millimetre).
"""

from __future__ import annotations

import hashlib
import io
import math
from pathlib import Path

import cadquery as cq
from OCP.Bnd import Bnd_Box
from OCP.BRepBndLib import BRepBndLib
from OCP.BRepBuilderAPI import BRepBuilderAPI_Transform
from OCP.BRepCheck import BRepCheck_Analyzer
from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf, gp_Vec
from OCP.IFSelect import IFSelect_ReturnStatus
from OCP.STEPControl import STEPControl_Reader
from OCP.TopAbs import TopAbs_FACE, TopAbs_SHELL, TopAbs_SOLID
from OCP.TopExp import TopExp_Explorer
from OCP.TopoDS import TopoDS_Shape

from ..errors import GeometryError
from ..recipe.imported import BodyFileRefused, ImportedBody, Refusal, Triple, looks_like_step
from ..recipe.meshsolid import MeshSolid
from .kernel import checked
from .tessellate import tessellate

#: Chord (mm) of the mesh the recipe stage measures distances on, at least; a large body
#: gets 1e-4 of its diagonal. Its distances are exact to the mesh, so within this of the
#: BRep's: far below the 0.05 mm the wall checks report in.
CHORD_MM = 0.01
CHORD_PER_DIAGONAL = 1e-4
ANGLE_DEG = 10.0
#: The imported solid's volume after placement against the one read (a rigid motion keeps
#: it; the kernel's integration is the only slack).
PLACED_REL_TOL = 1e-7

_Key = tuple[str, Triple, Triple]
_SOLIDS: dict[_Key, cq.Shape] = {}
#: Placed solids kept per process (one per file and placement).
MAX_SOLIDS = 8


def read_step_body(path: Path, translate_mm: Triple, rotate_deg: Triple
                   ) -> ImportedBody | BodyFileRefused:
    """The placed body of the STEP file at ``path``, or why the file gives none."""
    data = Path(path).read_bytes()
    if not looks_like_step(data[:64]):
        return BodyFileRefused(Refusal.NOT_STEP, _first_line(data))
    digest = hashlib.sha256(data).hexdigest()
    found = _read_solid(data, str(path))
    if isinstance(found, BodyFileRefused):
        return found
    raw = cq.Shape.cast(found)
    lo0, hi0 = _bounds(raw.wrapped)
    placed = _placed(raw, translate_mm, rotate_deg)
    vol = float(placed.Volume())
    key = (digest, translate_mm, rotate_deg)
    _keep(key, placed)
    lo, hi = _bounds(placed.wrapped)
    diagonal = math.dist(lo, hi)
    chord = max(CHORD_MM, CHORD_PER_DIAGONAL * diagonal)
    mesh = tessellate(placed, chord, ANGLE_DEG, "body")
    return ImportedBody(str(Path(path).resolve()), digest, translate_mm, rotate_deg, mesh,
                        chord, vol, lo, hi,
                        (hi0[0] - lo0[0], hi0[1] - lo0[1], hi0[2] - lo0[2]))


def imported_solid(p: MeshSolid, part: str) -> cq.Shape:
    """The placed BRep of an imported body, checked against the volume measured when the
    recipe was read."""
    b = p.body
    key = (b.digest, b.translate_mm, b.rotate_deg)
    shape = _SOLIDS.get(key)
    if shape is None:
        data = Path(b.path).read_bytes()
        if hashlib.sha256(data).hexdigest() != b.digest:
            raise GeometryError("read body file", f"{b.path} changed since the recipe was "
                                "read; read the recipe again", part)
        found = _read_solid(data, b.path)
        if isinstance(found, BodyFileRefused):
            raise GeometryError("read body file", f"{b.path} {found.reason.value}", part)
        shape = _placed(cq.Shape.cast(found), b.translate_mm, b.rotate_deg)
        _keep(key, shape)
    return checked(shape, part, "place body file", volume_mm3=p.volume_mm3(),
                   rel_tol=PLACED_REL_TOL)


def _keep(key: _Key, shape: cq.Shape) -> None:
    if key not in _SOLIDS and len(_SOLIDS) >= MAX_SOLIDS:
        _SOLIDS.pop(next(iter(_SOLIDS)))
    _SOLIDS[key] = shape


def _first_line(data: bytes) -> str:
    if not data:
        return "an empty file"
    head = data[:40].split(b"\n", 1)[0]
    text = head.decode("ascii", errors="replace").strip()
    return f"a file starting {text!r}" if text.isprintable() and text else "a binary file"


def _read_solid(data: bytes, name: str) -> TopoDS_Shape | BodyFileRefused:
    """The one solid of a STEP text, or why there is none (the kernel's reader, from the
    bytes already hashed, so what is read is what the digest names)."""
    reader = STEPControl_Reader()
    try:
        status = reader.ReadStream(name, io.BytesIO(data))
    except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
        return BodyFileRefused(Refusal.UNREADABLE, str(exc) or type(exc).__name__)
    if status != IFSelect_ReturnStatus.IFSelect_RetDone:
        return BodyFileRefused(Refusal.UNREADABLE, f"reader status {status.name}")
    reader.TransferRoots()
    shape = reader.OneShape()
    solids = _all(shape, TopAbs_SOLID)
    if not solids:
        shells, faces = len(_all(shape, TopAbs_SHELL)), len(_all(shape, TopAbs_FACE))
        if faces:
            return BodyFileRefused(Refusal.OPEN, f"{shells} open shell(s), {faces} face(s) "
                                   "and no solid")
        return BodyFileRefused(Refusal.EMPTY, "no shape at all")
    if len(solids) > 1:
        return BodyFileRefused(Refusal.SEVERAL, f"{len(solids)} solids")
    solid = solids[0]
    if not BRepCheck_Analyzer(solid).IsValid():
        return BodyFileRefused(Refusal.INVALID, "a solid that fails the kernel's check "
                               "(open or self-intersecting faces)")
    vol = float(cq.Shape.cast(solid).Volume())
    if not vol > 0.0:
        return BodyFileRefused(Refusal.INVALID, f"a solid of volume {vol:.3g} mm3 "
                               "(turned inside out or flat)")
    return solid


def _all(shape: TopoDS_Shape, kind) -> list[TopoDS_Shape]:
    out = []
    exp = TopExp_Explorer(shape, kind)
    while exp.More():
        out.append(exp.Current())
        exp.Next()
    return out


def _placed(shape: cq.Shape, translate_mm: Triple, rotate_deg: Triple) -> cq.Shape:
    """``shape`` turned about x, then y, then z (world axes, degrees), then moved."""
    if translate_mm == (0.0, 0.0, 0.0) and rotate_deg == (0.0, 0.0, 0.0):
        return shape
    total = gp_Trsf()
    total.SetTranslation(gp_Vec(*translate_mm))
    origin = gp_Pnt(0.0, 0.0, 0.0)
    for axis, deg in ((gp_Dir(0, 0, 1), rotate_deg[2]), (gp_Dir(0, 1, 0), rotate_deg[1]),
                      (gp_Dir(1, 0, 0), rotate_deg[0])):
        turn = gp_Trsf()
        turn.SetRotation(gp_Ax1(origin, axis), math.radians(deg))
        total.Multiply(turn)  # total = total * turn: the x turn acts first
    return cq.Shape.cast(BRepBuilderAPI_Transform(shape.wrapped, total, True).Shape())


def _bounds(shape: TopoDS_Shape) -> tuple[Triple, Triple]:
    """Exact bounds (mm) of the surfaces, not of a triangulation or the tolerances."""
    box = Bnd_Box()
    BRepBndLib.AddOptimal_s(shape, box, False, False)
    x0, y0, z0, x1, y1, z1 = box.Get()
    return (x0 + 0.0, y0 + 0.0, z0 + 0.0), (x1 + 0.0, y1 + 0.0, z1 + 0.0)
