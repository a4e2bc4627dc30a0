"""Binary STL output checked against the format description and an independent reader.

Format: Paul Bourke, "STL format"; 3D Systems, StereoLithography Interface Specification
(1989): 80-byte header not beginning with "solid", uint32 LE facet count, 50 bytes per facet.
Independent reader: numpy-stl (``stl.mesh.Mesh``). Independent normals: trimesh.
"""

from __future__ import annotations

import numpy as np
import pytest
import trimesh
from stl import mesh as npstl

from soft_molds.export.stl import encode_binary_stl
from soft_molds.meshdata import TriMesh


def _tm(t: trimesh.Trimesh) -> TriMesh:
    return TriMesh(np.asarray(t.vertices), np.asarray(t.faces))


BOX_ABC = (30.0, 12.5, 7.0)


@pytest.fixture(params=["box", "icosphere"])
def shape(request) -> trimesh.Trimesh:
    if request.param == "box":
        return trimesh.creation.box(extents=BOX_ABC)
    return trimesh.creation.icosphere(subdivisions=2, radius=9.0)


def _write(tmp_path, data: bytes):
    p = tmp_path / "part.stl"
    p.write_bytes(data)
    # calculate_normals=False: read the stored normals instead of numpy-stl's recomputed
    # (unnormalised) ones; automatic mode also checks the header is taken as binary.
    return npstl.Mesh.from_file(str(p), calculate_normals=False)


def test_file_size_is_84_plus_50_per_facet_and_count_reads_back(shape, tmp_path):
    data = encode_binary_stl(_tm(shape), label="shell_a")
    n = len(shape.faces)
    # Bourke / 3D Systems 1989: size = 80 + 4 + 50 n.
    assert len(data) == 84 + 50 * n
    assert int.from_bytes(data[80:84], "little") == n
    # numpy-stl as the independent reader.
    assert len(_write(tmp_path, data).vectors) == n


def test_vertices_read_back_equal_input_to_float32(shape, tmp_path):
    back = _write(tmp_path, encode_binary_stl(_tm(shape)))
    expected = np.asarray(shape.vertices)[np.asarray(shape.faces)].astype(np.float32)
    np.testing.assert_array_equal(back.vectors, expected)


def test_normals_are_unit_and_agree_with_trimesh(shape, tmp_path):
    back = _write(tmp_path, encode_binary_stl(_tm(shape)))
    lengths = np.linalg.norm(back.normals.astype(np.float64), axis=1)
    np.testing.assert_allclose(lengths, 1.0, atol=1e-6)
    # trimesh's own face normals (computed from the same winding) as the reference.
    np.testing.assert_allclose(back.normals, shape.face_normals, atol=1e-6)


def test_header_does_not_start_with_solid(shape):
    data = encode_binary_stl(_tm(shape), label="solid core")
    # Bourke: readers sniff "solid" to detect ASCII STL; a binary header must not begin so.
    assert not data[:80].startswith(b"solid")
    assert data[:80].startswith(b"binary STL soft_molds solid core")
    assert len(data[:80].rstrip(b" ")) < 80


def test_long_label_is_truncated_to_80_byte_header():
    box = _tm(trimesh.creation.box(extents=BOX_ABC))
    data = encode_binary_stl(box, label="x" * 200)
    assert data[:80] == (b"binary STL soft_molds " + b"x" * 200)[:80]
    assert int.from_bytes(data[80:84], "little") == 12


def test_attribute_words_are_zero():
    box = _tm(trimesh.creation.box(extents=BOX_ABC))
    data = encode_binary_stl(box)
    rec = np.frombuffer(data[84:], dtype=np.uint8).reshape(12, 50)
    # 3D Systems 1989: the attribute byte count "should be set to zero".
    assert (rec[:, 48:] == 0).all()


def test_volume_read_back_equals_box_closed_form(tmp_path):
    a, b, c = BOX_ABC
    back = _write(tmp_path, encode_binary_stl(_tm(trimesh.creation.box(extents=BOX_ABC))))
    volume, _, _ = back.get_mass_properties()
    # Elementary geometry: V = a b c.
    assert volume == pytest.approx(a * b * c, rel=1e-6)


def test_degenerate_facet_gets_zero_normal_not_nan(tmp_path):
    v = np.array([[0, 0, 0], [1, 0, 0], [2, 0, 0], [0, 1, 0]], dtype=float)
    f = np.array([[0, 1, 2], [0, 1, 3]])  # first facet is collinear: zero area
    back = _write(tmp_path, encode_binary_stl(TriMesh(v, f)))
    assert np.isfinite(back.normals).all()
    np.testing.assert_array_equal(back.normals[0], [0.0, 0.0, 0.0])
    np.testing.assert_allclose(back.normals[1], [0.0, 0.0, 1.0])  # right-hand rule


def test_two_encodings_are_identical_bytes(shape):
    m = _tm(shape)
    assert encode_binary_stl(m, "core") == encode_binary_stl(_tm(shape), "core")
