"""The overmold build's files: one folder per step in pour order with its own parts, STL
files that read back (numpy-stl, independent of our writer) as the volumes the manifest
records, a manifest listing the steps in order with the thread and every file's SHA-256,
and a casting card walking through both pours with the thread between them.

Sources: the STL format (binary: 80-byte header, count, 50-byte facets), read by numpy-stl;
SHA-256 from Python's hashlib (FIPS 180-4).
"""

from __future__ import annotations

import hashlib
import json

import pytest
from conftest import built_steps
from stl import mesh as stl_mesh

from soft_molds.export.overmold import encode_overmold, write_overmold
from tests.readers import read_3mf, volume

NAME = "seedling-wound-finger"


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    m = built_steps(NAME)
    root = tmp_path_factory.mktemp("out")
    write_overmold(m, root)
    return m, root / m.recipe.name / m.recipe.label


def test_each_step_has_its_own_folder_with_its_parts(written):
    _, folder = written
    assert sorted(p.name for p in folder.iterdir()) == [
        "casting-card.md", "manifest.json", "step-1-bladder", "step-2-skin"]
    step1 = sorted(p.name for p in (folder / "step-1-bladder").iterdir())
    step2 = sorted(p.name for p in (folder / "step-2-skin").iterdir())
    assert [n for n in step1 if n.endswith((".stl", ".step"))] == [
        "cast.stl", "core.step", "core.stl", "shell-lower.step", "shell-lower.stl",
        "shell-upper.step", "shell-upper.stl"]
    assert [n for n in step2 if n.endswith((".stl", ".step"))] == [
        "cast.stl", "shell-lower.step", "shell-lower.stl", "shell-upper.step",
        "shell-upper.stl"]
    # Print plates: a 3MF and its picture per bed, at least one bed per step.
    for names in (step1, step2):
        plates = [n for n in names if n.endswith(".3mf")]
        assert plates and all(n.removesuffix(".3mf") + ".png" in names for n in plates)


def test_the_manifest_lists_the_steps_thread_and_file_digests(written):
    m, folder = written
    man = json.loads((folder / "manifest.json").read_text())
    assert [s["folder"] for s in man["steps"]] == ["step-1-bladder", "step-2-skin"]
    assert man["process"]["kind"] == "overmold"
    assert man["thread"]["helices"] == 2
    assert man["thread"]["total_mm"] == pytest.approx(m.thread.total_mm)
    for rel, digest in man["files"].items():
        assert hashlib.sha256((folder / rel).read_bytes()).hexdigest() == digest, rel
    for s in man["steps"]:
        for p in s["parts"]:
            # numpy-stl's signed volume of the written facets (mm3).
            vol, _, _ = stl_mesh.Mesh.from_file(str(folder / p["file"])).get_mass_properties()
            assert vol == pytest.approx(p["volume_mm3"], rel=0.002), p["file"]


def test_the_card_walks_through_both_pours_and_the_thread(written):
    m, folder = written
    card = (folder / "casting-card.md").read_text()
    first, second = m.steps
    i1, i_thread = card.index("1. step-1-bladder"), card.index("Wind the thread")
    i_place, i2 = card.index("Place the bladder"), card.index("step-2-skin: the skin")
    assert i1 < i_thread < i_place < i2
    assert f"{first.pour.mixed_g:.1f} g mixed" in card
    assert f"{second.pour.mixed_g:.1f} g mixed" in card
    assert f"{m.thread.per_helix_mm:.0f} mm" in card
    assert f"{m.recipe.material.silicone.demold_h:g} h" in card
    assert "## Cautions" in card and "safety data sheets" in card


def test_encoding_is_deterministic(written):
    m, _ = written
    assert encode_overmold(m) == encode_overmold(m)


def test_the_manifest_reads_back_typed_to_the_same_bytes_and_a_sweep_finds_it_done(written):
    from soft_molds.export.files import json_bytes
    from soft_molds.export.steps_manifest import read_stepped_manifest
    from soft_molds.export.typedjson import to_json
    from soft_molds.sweep.cache import stepped_up_to_date

    m, folder = written
    man = read_stepped_manifest(folder)
    assert json_bytes(to_json(man)) == (folder / "manifest.json").read_bytes()
    assert man.thread is not None and m.thread is not None
    assert man.thread.total_mm == m.thread.total_mm
    assert [s.folder for s in man.steps] == [s.folder for s in m.steps]
    # Up to date for the recipe it was built from, with every file intact (SHA-256).
    root = folder.parents[1]
    assert stepped_up_to_date(root, m.recipe) is not None


def test_each_printed_part_is_on_a_plate_with_its_volume(written, tmp_path):
    # Reader: lib3mf (the 3MF Consortium's reference library); volume by the divergence
    # theorem against the part's exact (solid) volume, to the mesh tolerance (0.5 %).
    m, folder = written
    for s in m.steps:
        objects = {}
        for plate in sorted((folder / s.folder).glob("plate-*.3mf")):
            objects.update(read_3mf(plate.read_bytes(), tmp_path)[1])
        printed = [p for p in s.parts if p.role != "cast"]
        assert sorted(objects) == sorted(f"{p.name} {m.recipe.label}" for p in printed)
        for p in printed:
            v, t = objects[f"{p.name} {m.recipe.label}"]
            assert volume(v, t) == pytest.approx(p.brep_volume_mm3, rel=0.005)
