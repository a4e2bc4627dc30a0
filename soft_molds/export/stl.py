"""Binary STL encoding of a :class:`~soft_molds.meshdata.TriMesh`.

Layout (open format, Paul Bourke "STL format"; 3D Systems StereoLithography Interface
Specification, 1989): an 80-byte header, a uint32 little-endian facet count, then 50 bytes per
facet: 12 float32 little-endian values (unit normal, then three vertices in mm) and a uint16
attribute word (0). STL carries no unit; millimetres by convention.

The encoder is pure numpy (no CAD kernel) and deterministic: the same mesh and label give the
same bytes on every run and platform.
"""

from __future__ import annotations

import struct
from pathlib import Path

import numpy as np

from soft_molds.meshdata import TriMesh

HEADER_PREFIX = b"binary STL soft_molds "
HEADER_SIZE = 80

# One facet record; "<" pins little-endian and no padding, so itemsize is exactly 50 bytes.
FACET_DTYPE = np.dtype(
    [("normal", "<f4", (3,)), ("vertices", "<f4", (3, 3)), ("attribute", "<u2")]
)
assert FACET_DTYPE.itemsize == 50


def _header(label: str) -> bytes:
    # Readers that sniff for ASCII STL look at a leading "solid"; our fixed prefix avoids it.
    raw = HEADER_PREFIX + label.encode("ascii", errors="replace")
    return raw[:HEADER_SIZE].ljust(HEADER_SIZE, b" ")


def facet_normals(mesh: TriMesh) -> np.ndarray:
    """Unit normals (m, 3) float64 from the CCW winding; zero for degenerate facets."""
    t = mesh.triangles()
    n = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    length = np.linalg.norm(n, axis=1)
    out = np.zeros_like(n)
    # Degenerate (zero-area) facets keep a zero normal instead of NaN from 0/0.
    good = length > 0.0
    out[good] = n[good] / length[good, None]
    return out


def encode_binary_stl(mesh: TriMesh, label: str = "") -> bytes:
    """Encode ``mesh`` (vertices in mm) as binary STL bytes.

    ``label`` is written as ASCII after a fixed prefix into the 80-byte header (non-ASCII
    characters become ``?``; the header is truncated or padded with spaces to 80 bytes).
    """
    m = mesh.triangle_count
    if m > 0xFFFFFFFF:
        raise ValueError(f"binary STL holds at most 2**32-1 facets, got {m}")
    records = np.zeros(m, dtype=FACET_DTYPE)
    records["normal"] = facet_normals(mesh)
    records["vertices"] = mesh.triangles()
    # attribute stays 0 (np.zeros); the spec leaves it unused.
    return _header(label) + np.uint32(m).astype("<u4").tobytes() + records.tobytes()


def read_binary_stl(path) -> TriMesh:
    """A binary STL file as a triangle soup (three vertices per facet, none shared), mm.

    Reads what :func:`encode_binary_stl` writes (header, count, 50-byte facets) and refuses
    a file whose size does not match its count."""
    data = Path(path).read_bytes()
    if len(data) < 84:
        raise ValueError(f"{path}: too short for a binary STL")
    (n,) = struct.unpack_from("<I", data, 80)
    if len(data) != 84 + 50 * n:
        raise ValueError(f"{path}: {len(data)} bytes, but {n} facets need {84 + 50 * n}")
    rec = np.frombuffer(data, dtype=np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)),
                                              ("a", "<u2")]), count=n, offset=84)
    verts = rec["v"].reshape(-1, 3).astype(np.float64)
    return TriMesh(verts, np.arange(len(verts), dtype=np.int64).reshape(-1, 3))
