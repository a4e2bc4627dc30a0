"""BRep -> TriMesh with an absolute chord error, and STEP text with a fixed header."""

from __future__ import annotations

import io
import math
import re

import numpy as np
from OCP.BRep import BRep_Tool
from OCP.BRepMesh import BRepMesh_IncrementalMesh
from OCP.BRepTools import BRepTools
from OCP.IFSelect import IFSelect_ReturnStatus
from OCP.Interface import Interface_Static
from OCP.STEPControl import STEPControl_AsIs, STEPControl_Writer
from OCP.TopAbs import TopAbs_FACE, TopAbs_REVERSED
from OCP.TopExp import TopExp_Explorer
from OCP.TopLoc import TopLoc_Location
from OCP.TopoDS import TopoDS
from scipy.spatial import cKDTree

from ..errors import GeometryError
from ..meshdata import TriMesh
from .kernel import Shape

#: Vertices closer than this (mm) are one vertex: neighbouring faces share their edge
#: discretisation, so genuine copies agree to rounding error only.
MERGE_MM = 1e-6


def tessellate(shape: Shape, chord_mm: float, angle_deg: float, part: str) -> TriMesh:
    """Mesh ``shape`` with at most ``chord_mm`` facet-to-surface distance (absolute, not
    relative to the part size) and ``angle_deg`` between neighbouring facets."""
    wrapped = shape.wrapped
    BRepTools.Clean_s(wrapped)  # a cached finer/coarser mesh would be reused silently
    from .kernel import parallel

    mesher = BRepMesh_IncrementalMesh(wrapped, chord_mm, False, math.radians(angle_deg),
                                      parallel())
    if not mesher.IsDone():
        raise GeometryError("tessellate", "the mesher did not finish", part)
    verts: list[np.ndarray] = []
    tris: list[np.ndarray] = []
    base = 0
    exp = TopExp_Explorer(wrapped, TopAbs_FACE)
    while exp.More():
        face = TopoDS.Face_s(exp.Current())
        loc = TopLoc_Location()
        tri = BRep_Tool.Triangulation_s(face, loc)
        if tri is None:
            raise GeometryError("tessellate", "a face has no triangulation", part)
        n = tri.NbNodes()
        pts = np.array([tri.Node(i).Coord() for i in range(1, n + 1)], dtype=np.float64)
        if not loc.IsIdentity():
            t = loc.Transformation()
            rot = np.array([[t.Value(r, c) for c in (1, 2, 3)] for r in (1, 2, 3)])
            pts = pts @ rot.T + np.array([t.Value(r, 4) for r in (1, 2, 3)])
        m = tri.NbTriangles()
        idx = np.array([tri.Triangle(i).Get() for i in range(1, m + 1)], dtype=np.int64)
        idx -= 1
        if face.Orientation() == TopAbs_REVERSED:
            idx = idx[:, ::-1]
        verts.append(pts)
        tris.append(idx + base)
        base += n
        exp.Next()
    if not verts:
        raise GeometryError("tessellate", "the shape has no faces", part)
    return merge_vertices(np.concatenate(verts), np.concatenate(tris))


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
