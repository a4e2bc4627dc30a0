"""Independent readers the tests share: 3MF through lib3mf (the 3MF Consortium's
reference library) and the volume of a closed triangle mesh by the divergence theorem."""

from __future__ import annotations

import lib3mf
import numpy as np


def read_3mf(data: bytes, tmp_path, name="plate.3mf"):
    """(unit, {object name: (vertices (n, 3), triangles (m, 3))}) as lib3mf reads them."""
    path = tmp_path / name
    path.write_bytes(data)
    model = lib3mf.get_wrapper().CreateModel()
    reader = model.QueryReader("3mf")
    reader.ReadFromFile(str(path))
    assert reader.GetWarningCount() == 0
    out = {}
    it = model.GetMeshObjects()
    while it.MoveNext():
        obj = it.GetCurrentMeshObject()
        v = np.array([p.Coordinates[:] for p in obj.GetVertices()], dtype=np.float64)
        t = np.array([t.Indices[:] for t in obj.GetTriangleIndices()], dtype=np.int64)
        out[obj.GetName()] = (v, t)
    assert model.GetBuildItems().Count() == len(out)
    return model.GetUnit(), out


def volume(v: np.ndarray, t: np.ndarray) -> float:
    # divergence theorem: sum of signed tetrahedra from the origin
    a, b, c = v[t[:, 0]], v[t[:, 1]], v[t[:, 2]]
    return float(np.einsum("ij,ij->i", a, np.cross(b, c)).sum() / 6.0)
