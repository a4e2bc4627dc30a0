"""BRep -> TriMesh with an absolute chord error, and STEP text with a fixed header."""

from __future__ import annotations

import io
import math
import re
import struct

import numpy as np
from OCP.BinTools import BinTools, BinTools_FormatVersion
from OCP.BRep import BRep_Builder, BRep_Tool
from OCP.BRepMesh import BRepMesh_IncrementalMesh
from OCP.BRepTools import BRepTools
from OCP.IFSelect import IFSelect_ReturnStatus
from OCP.Interface import Interface_Static
from OCP.Poly import Poly_Triangulation
from OCP.STEPControl import STEPControl_AsIs, STEPControl_Writer
from OCP.TopAbs import TopAbs_FACE, TopAbs_REVERSED
from OCP.TopExp import TopExp_Explorer
from OCP.TopLoc import TopLoc_Location
from OCP.TopoDS import TopoDS, TopoDS_Compound, TopoDS_Face, TopoDS_Shape
from scipy.spatial import cKDTree

from ..constants import MESH_VOLUME_REL_TOL
from ..errors import GeometryError
from ..meshdata import TriMesh
from .kernel import Shape

#: Vertices closer than this (mm) are one vertex: neighbouring faces share their edge
#: discretisation, so genuine copies agree to rounding error only.
MERGE_MM = 1e-6


def tessellate(shape: Shape, chord_mm: float, angle_deg: float, part: str) -> TriMesh:
    """Mesh ``shape`` with at most ``chord_mm`` facet-to-surface distance (absolute, not
    relative to the part size) and ``angle_deg`` between neighbouring facets.

    Vertices are the faces' nodes in face order (the kernel's explorer order), triangles
    likewise, before welding: the STL bytes depend on this order."""
    wrapped = shape.wrapped
    BRepTools.Clean_s(wrapped)  # a cached finer/coarser mesh would be reused silently
    from .kernel import parallel

    mesher = BRepMesh_IncrementalMesh(wrapped, chord_mm, False, math.radians(angle_deg),
                                      parallel())
    if not mesher.IsDone():
        raise GeometryError("tessellate", "the mesher did not finish", part)
    faces = _face_triangulations(wrapped, part)
    if not faces:
        raise GeometryError("tessellate", "the shape has no faces", part)
    arrays = _read_triangulations([tri for tri, _, _ in faces], part)
    verts: list[np.ndarray] = []
    tris: list[np.ndarray] = []
    base = 0
    for (_, loc, reversed_), (pts, idx) in zip(faces, arrays):
        if not loc.IsIdentity():
            t = loc.Transformation()
            rot = np.array([[t.Value(r, c) for c in (1, 2, 3)] for r in (1, 2, 3)])
            pts = pts @ rot.T + np.array([t.Value(r, 4) for r in (1, 2, 3)])
        verts.append(pts)
        tris.append((idx[:, ::-1] if reversed_ else idx) + base)
        base += len(pts)
    return merge_vertices(np.concatenate(verts), np.concatenate(tris))


#: How many times a mesh that misses the volume tolerance is refined (chord and angle halved
#: each time): four halvings take the coarsest allowed chord, 0.5 mm, to 0.03 mm.
MAX_REFINEMENTS = 4
#: Refine until the mesh is inside this share of the tolerance, leaving the rest as margin
#: for the integrity check's own arithmetic.
TOLERANCE_SHARE = 0.8


def tessellate_within(shape: Shape, chord_mm: float, angle_deg: float, part: str,
                      volume_mm3: float) -> TriMesh:
    """:func:`tessellate`, refined until the mesh's volume is within the integrity
    tolerance of ``volume_mm3`` (the exact solid's, mm3). An inscribed mesh loses volume
    with its chord error, most on small, strongly curved parts; a recipe's chord that is
    too coarse for its part gets a finer mesh (the same inputs always take the same
    steps, so the bytes stay repeatable). Parts that pass at the recipe's chord are meshed
    exactly as before."""
    mesh = tessellate(shape, chord_mm, angle_deg, part)
    for _ in range(MAX_REFINEMENTS):
        if abs(mesh.volume_mm3() - volume_mm3) <= \
                TOLERANCE_SHARE * MESH_VOLUME_REL_TOL * abs(volume_mm3):
            break
        chord_mm, angle_deg = chord_mm / 2.0, max(angle_deg / 2.0, 1.0)
        mesh = tessellate(shape, chord_mm, angle_deg, part)
    return mesh


def _face_triangulations(wrapped: TopoDS_Shape, part: str
                         ) -> list[tuple[Poly_Triangulation, TopLoc_Location, bool]]:
    """Every face's triangulation, its location and whether the face is reversed, in the
    explorer's face order."""
    out = []
    exp = TopExp_Explorer(wrapped, TopAbs_FACE)
    while exp.More():
        face = TopoDS.Face_s(exp.Current())
        loc = TopLoc_Location()
        tri = BRep_Tool.Triangulation_s(face, loc)
        if tri is None:
            raise GeometryError("tessellate", "a face has no triangulation", part)
        out.append((tri, loc, face.Orientation() == TopAbs_REVERSED))
        exp.Next()
    return out


#: One triangulation record of the kernel's binary shape format (version 4, little-endian,
#: unpadded): node count, triangle count, has-UV flag, has-normals flag, deflection.
_RECORD = struct.Struct("<iibbd")
_FORMAT_V4 = b"\nOpen CASCADE Topology V4,"


def _read_triangulations(tris: list[Poly_Triangulation], part: str
                         ) -> list[tuple[np.ndarray, np.ndarray]]:
    """Each triangulation's nodes (n, 3) float64 in its face's frame and triangles (m, 3)
    int64 numbered from 0.

    OCP has no array view of a triangulation and reading it a node at a time costs two
    binding calls per node (most of the conversion time). Instead the triangulations are
    hung on bare faces of one compound and written by the kernel's binary shape writer in
    one call; its triangulation section holds every record in the compound's order, the
    coordinates as the kernel's own doubles (bit for bit), so the arrays are read straight
    from the bytes. Every record's sizes are checked against the triangulation's."""
    builder = BRep_Builder()
    compound = TopoDS_Compound()
    builder.MakeCompound(compound)
    for tri in tris:
        face = TopoDS_Face()
        builder.MakeFace(face, tri)
        builder.Add(compound, face)
    stream = io.BytesIO()
    BinTools.Write_s(compound, stream, True, False,
                     BinTools_FormatVersion.BinTools_FormatVersion_VERSION_4)
    data = stream.getvalue()
    head = data.find(b"\nTriangulations ")
    if not data.startswith(_FORMAT_V4) or head < 0:
        raise GeometryError("tessellate", "unexpected layout of the kernel's mesh data", part)
    line_end = data.index(b"\n", head + 1)
    count = int(data[head + len(b"\nTriangulations "):line_end])
    if count != len(tris):
        raise GeometryError("tessellate", f"{count} triangulations read for {len(tris)} "
                            "faces (a triangulation shared by two faces)", part)
    pos = line_end + 1
    out = []
    for tri in tris:
        n, m, has_uv, has_normals, _ = _RECORD.unpack_from(data, pos)
        if (n, m, has_normals) != (tri.NbNodes(), tri.NbTriangles(), 0):
            raise GeometryError("tessellate", "a triangulation record does not match its "
                                "face", part)
        pos += _RECORD.size
        pts = np.frombuffer(data, "<f8", 3 * n, pos).reshape(n, 3)
        pos += 24 * n + (16 * n if has_uv else 0)
        idx = np.frombuffer(data, "<i4", 3 * m, pos).reshape(m, 3).astype(np.int64) - 1
        pos += 12 * m
        out.append((pts.astype(np.float64), idx))
    return out


def merge_vertices(v: np.ndarray, f: np.ndarray, tol: float = MERGE_MM) -> TriMesh:
    """Weld coincident vertices, drop triangles that collapse, keep a stable order."""
    tree = cKDTree(v)
    pairs = tree.query_pairs(tol, output_type="ndarray")
    parent = np.arange(len(v))
    if len(pairs):
        # Union-find by repeated min-label propagation over the (few) close pairs.
        a, b = pairs[:, 0], pairs[:, 1]
        while True:
            lo = np.minimum(parent[a], parent[b])
            changed = (parent[a] != lo) | (parent[b] != lo)
            if not changed.any():
                break
            np.minimum.at(parent, a, lo)
            np.minimum.at(parent, b, lo)
            parent = parent[parent]
    used, inverse = np.unique(parent, return_inverse=True)
    faces = inverse[f]
    a, b, c = faces[:, 0], faces[:, 1], faces[:, 2]
    keep = (a != b) & (b != c) & (a != c)
    faces = faces[keep]
    # Zero-area slivers (three distinct collinear points) are left in on purpose: dropping
    # them would open the mesh; the integrity check reports what remains.
    return TriMesh(v[used], faces)


_HEADER_RE = re.compile(rb"HEADER;.*?ENDSEC;", re.S)


def step_bytes(shape: Shape, name: str) -> bytes:
    """STEP AP214 text of ``shape`` with a header of our own and a fixed time stamp, so the
    same recipe gives the same bytes."""
    writer = STEPControl_Writer()
    Interface_Static.SetCVal_s("write.step.schema", "AP214IS")
    Interface_Static.SetCVal_s("write.step.unit", "MM")
    if writer.Transfer(shape.wrapped, STEPControl_AsIs) != IFSelect_ReturnStatus.IFSelect_RetDone:
        raise GeometryError("write STEP", "transfer failed", name)
    stream = io.BytesIO()
    if writer.WriteStream(stream) != IFSelect_ReturnStatus.IFSelect_RetDone:
        raise GeometryError("write STEP", "writer failed", name)
    data = stream.getvalue()
    safe = re.sub(r"[^A-Za-z0-9_. -]", "_", name)
    header = (
        "HEADER;\n"
        f"FILE_DESCRIPTION(('soft_molds part {safe}'),'2;1');\n"
        f"FILE_NAME('{safe}','2000-01-01T00:00:00',('soft_molds'),(''),"
        "'soft_molds','soft_molds','');\n"
        "FILE_SCHEMA(('AUTOMOTIVE_DESIGN { 1 0 10303 214 1 1 1 1 }'));\n"
        "ENDSEC;"
    ).encode()
    out, n = _HEADER_RE.subn(header, data, count=1)
    if n != 1:
        raise GeometryError("write STEP", "unexpected STEP header", name)
    # The kernel names each product after a per-process counter; name it after the part
    # instead, so the bytes do not depend on what else the process has written.
    return re.sub(rb"'Open CASCADE STEP translator[^']*'", b"'" + safe.encode() + b"'", out)
