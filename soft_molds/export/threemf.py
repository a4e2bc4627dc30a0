"""3MF (3D Manufacturing Format, core specification) encoding of meshes placed on a bed.

A 3MF file is an Open Packaging Conventions zip (ECMA-376 part 2) holding
``[Content_Types].xml``, ``_rels/.rels`` (the relationship naming the start part) and
``3D/3dmodel.model``: a ``<model unit="millimeter">`` whose ``<resources>`` hold one
``<object type="model">`` per mesh (``<vertices>``, then ``<triangles>`` indexing them,
counter-clockwise seen from outside) and whose ``<build>`` prints each object once. The
vertices are written already placed on the bed, so every build item has no transform.

Deterministic bytes: the XML is written here as text (fixed attribute order, coordinates to
``DECIMALS`` places, no generated ids or UUIDs), the zip entries are sorted by name, carry a
fixed timestamp (1980-01-01 00:00, the earliest a zip can hold) and fixed attributes, and
are deflated by zlib at a fixed level.
"""

from __future__ import annotations

import io
import zipfile
from collections.abc import Sequence
from dataclasses import dataclass
from xml.sax.saxutils import quoteattr

import numpy as np

CORE_NS = "http://schemas.microsoft.com/3dmanufacturing/core/2015/02"
MODEL_PATH = "3D/3dmodel.model"
MODEL_REL = "http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"
DECIMALS = 4  # 0.1 micrometre: far below any printer, and short text
_STAMP = (1980, 1, 1, 0, 0, 0)
_LEVEL = 6  # zlib's default: level 9 doubles the time for 1-2 % less

CONTENT_TYPES = (
    '<?xml version="1.0" encoding="UTF-8"?>\n'
    '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">\n'
    ' <Default Extension="rels" '
    'ContentType="application/vnd.openxmlformats-package.relationships+xml"/>\n'
    ' <Default Extension="model" '
    'ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/>\n'
    '</Types>\n')

RELS = (
    '<?xml version="1.0" encoding="UTF-8"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">\n'
    f' <Relationship Target="/{MODEL_PATH}" Id="rel0" Type="{MODEL_REL}"/>\n'
    '</Relationships>\n')


@dataclass(frozen=True, eq=False)
class PlacedMesh:
    """One object of a plate: its ``name``, ``vertices`` (n, 3) mm in the bed frame and
    ``faces`` (m, 3) indices into them, counter-clockwise seen from outside."""

    name: str
    vertices: np.ndarray
    faces: np.ndarray


def _coords(v: np.ndarray) -> list[str]:
    # "+ 0.0" turns a rounded -0.0 into 0.0, so the text does not depend on the sign of zero.
    r = np.round(np.asarray(v, dtype=np.float64), DECIMALS) + 0.0
    fmt = f"{{:.{DECIMALS}f}}"
    return [fmt.format(x) for x in r.ravel()]


def _object_xml(oid: int, mesh: PlacedMesh) -> str:
    c = _coords(mesh.vertices)
    verts = "".join(f'<vertex x="{c[i]}" y="{c[i + 1]}" z="{c[i + 2]}"/>\n'
                    for i in range(0, len(c), 3))
    f = np.asarray(mesh.faces, dtype=np.int64)
    tris = "".join(f'<triangle v1="{a}" v2="{b}" v3="{d}"/>\n' for a, b, d in f.tolist())
    return (f'  <object id="{oid}" type="model" name={quoteattr(mesh.name)}>\n'
            f'   <mesh>\n    <vertices>\n{verts}    </vertices>\n'
            f'    <triangles>\n{tris}    </triangles>\n   </mesh>\n  </object>\n')


def model_xml(meshes: Sequence[PlacedMesh], title: str) -> str:
    """The ``3D/3dmodel.model`` text of ``meshes`` (object ids 1, 2, ... in order)."""
    objects = "".join(_object_xml(k + 1, m) for k, m in enumerate(meshes))
    items = "".join(f'  <item objectid="{k + 1}"/>\n' for k in range(len(meshes)))
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            f'<model unit="millimeter" xml:lang="en-US" xmlns="{CORE_NS}">\n'
            f' <metadata name="Title">{_text(title)}</metadata>\n'
            f' <resources>\n{objects} </resources>\n'
            f' <build>\n{items} </build>\n</model>\n')


def _text(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def encode_3mf(meshes: Sequence[PlacedMesh], title: str) -> bytes:
    """The bytes of a 3MF package holding ``meshes`` on one plate (see the module
    docstring; the same meshes and title give the same bytes)."""
    entries = {
        "[Content_Types].xml": CONTENT_TYPES,
        "_rels/.rels": RELS,
        MODEL_PATH: model_xml(meshes, title),
    }
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w") as zf:
        for name in sorted(entries):
            info = zipfile.ZipInfo(name, date_time=_STAMP)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.create_system = 0
            info.external_attr = 0
            zf.writestr(info, entries[name].encode("utf-8"), compresslevel=_LEVEL)
    return buf.getvalue()
