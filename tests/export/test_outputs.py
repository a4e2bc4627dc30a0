"""Files written for a real build: layout, STL and STEP formats, manifest contract,
determinism, atomicity."""

from __future__ import annotations

import json
import struct
from pathlib import Path

import numpy as np
import pytest
from stl import mesh as npstl  # numpy-stl: an independent STL reader

PART_NAMES = ["shell-lower", "shell-upper", "core", "cast"]


@pytest.fixture(scope="module")
def written(finger, tmp_path_factory):
    root = tmp_path_factory.mktemp("out")
    paths = finger.export(root)
    return root, paths


def test_output_layout_is_recipe_then_label(written, finger):
    root, paths = written
    d = root / "seedling-finger" / "A"
    names = sorted(p.name for p in d.iterdir())
    want = sorted([f"{n}.stl" for n in PART_NAMES] + [f"{n}.step" for n in PART_NAMES]
                  + ["casting-card.md", "casting-card.html", "manifest.json"]
                  + ["plate-1.3mf", "plate-1.png"]
                  + ["assembly-exploded.png", "assembly-cutaway.png", "preview.html"])
    assert names == want
    assert sorted(p.name for p in paths) == want
    assert not [p for p in root.rglob("*") if ".tmp" in p.name]


@pytest.mark.parametrize("name", PART_NAMES)
def test_binary_stl_layout_and_count_read_back_by_numpy_stl(written, finger, name):
    # Binary STL: 80-byte header not starting with "solid", uint32 count, 50 bytes per
    # facet, so size = 84 + 50 n (P. Bourke, "STL format"; StereoLithography Interface
    # Specification, 1989).
    root, _ = written
    path = root / "seedling-finger" / "A" / f"{name}.stl"
    data = path.read_bytes()
    n = struct.unpack("<I", data[80:84])[0]
    assert len(data) == 84 + 50 * n
    assert not data[:5].lower().startswith(b"solid")
    assert n == finger.part(name).mesh.triangle_count
    m = npstl.Mesh.from_file(str(path))
    assert len(m.vectors) == n
    volume, _, _ = m.get_mass_properties()
    assert volume == pytest.approx(finger.part(name).brep_volume_mm3, rel=0.005)


@pytest.mark.parametrize("name", PART_NAMES)
def test_step_files_are_iso_10303_21_with_a_fixed_header(written, name):
    # ISO 10303-21 files begin "ISO-10303-21;"; AP214 schema is AUTOMOTIVE_DESIGN.
    root, _ = written
    text = (root / "seedling-finger" / "A" / f"{name}.step").read_text()
    assert text.startswith("ISO-10303-21;")
    assert "AUTOMOTIVE_DESIGN" in text
    assert "2000-01-01T00:00:00" in text


def test_manifest_contract(written, finger):
    root, _ = written
    man = json.loads((root / "seedling-finger" / "A" / "manifest.json").read_text())
    for key in ("recipe", "label", "tool_version", "units", "params_sha256", "parts",
                "silicone_volume_mm3"):
        assert key in man
    assert man["units"] == "mm" and man["recipe"] == "seedling-finger" and man["label"] == "A"
    assert len(man["params_sha256"]) == 64
    roles = {p["name"]: p["role"] for p in man["parts"]}
    assert roles == {"shell-lower": "shell", "shell-upper": "shell", "core": "core",
                     "cast": "cast"}
    for p in man["parts"]:
        assert set(p) >= {"name", "role", "file", "step", "volume_mm3", "bbox_mm",
                          "triangles", "pull_dir"}
        assert (root / "seedling-finger" / "A" / p["file"]).exists()
        if p["pull_dir"] is not None:
            assert np.linalg.norm(p["pull_dir"]) == pytest.approx(1.0)
    cast = next(p for p in man["parts"] if p["role"] == "cast")
    assert man["silicone_volume_mm3"] == pytest.approx(cast["volume_mm3"])


def test_same_recipe_gives_identical_bytes(finger):
    """Two independent builds of one recipe produce byte-identical files."""
    from soft_molds import build

    again = build(finger.recipe)
    a, b = finger.files(), again.files()
    assert sorted(a) == sorted(b)
    for name in a:
        assert a[name] == b[name], name


def test_a_failed_write_leaves_no_file_of_the_set(finger, tmp_path, monkeypatch):
    import os

    calls = {"n": 0}
    real = os.fsync

    def flaky(fd):
        calls["n"] += 1
        if calls["n"] == 3:  # while the set is being written, after two files
            raise OSError("disk full (simulated)")
        return real(fd)

    monkeypatch.setattr(os, "fsync", flaky)
    with pytest.raises(OSError):
        finger.export(tmp_path)
    # nothing at all: no file of the set, no manifest, no temporary or staging folder
    assert [p for p in tmp_path.rglob("*") if p.is_file()] == []


def test_a_fresh_process_writes_the_same_bytes(cushion, tmp_path):
    """Across processes too (no cache, time stamp or hash seed leaks into the files)."""
    import hashlib
    import subprocess
    import sys

    here = {n: hashlib.sha256(b).hexdigest() for n, b in cushion.files().items()}
    code = ("import hashlib, json, sys; from soft_molds import build, load_recipe; "
            "m = build(load_recipe('recipes/stem-cushion.yaml')); "
            "print(json.dumps({n: hashlib.sha256(b).hexdigest() for n, b in m.files().items()}))")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, env={"PYTHONHASHSEED": "123", "PATH": "/usr/bin:/bin"},
                         cwd=Path(__file__).resolve().parents[2])
    assert json.loads(res.stdout.strip().splitlines()[-1]) == here
