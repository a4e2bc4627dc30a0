"""The melted-core build's files: a core-mold folder and a silicone folder in pour order,
each with its parts (the silicone folder as a one-shot build writes them, its own
manifest included), STL files that read back (numpy-stl, independent of our writer) as
the volumes the manifest records, a stepped manifest listing both steps with every file's
SHA-256, and a casting card in the order of the work with the melt-out cautions.

Sources: the STL format (binary: 80-byte header, count, 50-byte facets), read by numpy-stl;
SHA-256 from Python's hashlib (FIPS 180-4); the wax's mass is volume x density (0.90
g/cm3, from memory, as the constants say).
"""

from __future__ import annotations

import hashlib
import json

import pytest
from conftest import built_steps
from stl import mesh as stl_mesh

from soft_molds.export.melted import write_melted
from soft_molds.export.steps_manifest import MELTED_FORMAT, read_stepped_manifest

NAME = "tray-lift-pad-wax"


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    m = built_steps(NAME)
    root = tmp_path_factory.mktemp("out")
    write_melted(m, root)
    return m, root / m.recipe.name / m.recipe.label


def test_each_step_has_its_own_folder_with_its_parts(written):
    _, folder = written
    assert sorted(p.name for p in folder.iterdir()) == [
        "casting-card.md", "manifest.json", "step-1-core-mold", "step-2-silicone"]
    step1 = sorted(p.name for p in (folder / "step-1-core-mold").iterdir())
    assert [n for n in step1 if n.endswith(".stl")] == [
        "cast.stl", "shell-lower.stl", "shell-upper.stl"]
    step2 = sorted(p.name for p in (folder / "step-2-silicone").iterdir())
    assert step2 == ["cast.step", "cast.stl", "core.step", "core.stl", "manifest.json",
                     "shell-lower.step", "shell-lower.stl", "shell-upper.step",
                     "shell-upper.stl"]
    # The silicone step's own manifest is a one-shot manifest of that folder's files.
    inner = json.loads((folder / "step-2-silicone" / "manifest.json").read_text())
    for name, digest in inner["files"].items():
        data = (folder / "step-2-silicone" / name).read_bytes()
        assert hashlib.sha256(data).hexdigest() == digest


def test_the_manifest_lists_both_steps_and_every_file(written):
    m, folder = written
    man = read_stepped_manifest(folder)
    assert man.format == MELTED_FORMAT
    assert [(s.index, s.name, s.folder) for s in man.steps] == [
        (1, "core-mold", "step-1-core-mold"), (2, "silicone", "step-2-silicone")]
    core_mold, silicone = man.steps
    assert core_mold.pour.cast_mm3 == pytest.approx(m.core_volume_mm3)
    assert [p.what for p in core_mold.pour.portions] == ["wax"]
    assert not any(p.printable for p in core_mold.parts if p.name == "cast")
    for step in man.steps:
        for p in step.parts:
            # numpy-stl's signed volume of the written facets against the one recorded.
            got, _, _ = stl_mesh.Mesh.from_file(str(folder / p.file)).get_mass_properties()
            assert got == pytest.approx(p.volume_mm3, rel=5e-3), p.file
    for name, digest in man.files.items():
        assert hashlib.sha256((folder / name).read_bytes()).hexdigest() == digest
    written_files = {str(p.relative_to(folder)) for p in folder.rglob("*") if p.is_file()}
    assert written_files - {"manifest.json"} == set(man.files)
    assert silicone.pour.cast_mm3 == pytest.approx(m.silicone_volume_mm3)


def test_the_card_walks_the_work_in_order_with_the_melt_cautions(written):
    m, folder = written
    card = (folder / "casting-card.md").read_text()
    order = ["Print the core mold", "Pour the core", "Demold the core", "Place the core",
             "Pour the silicone", "Cure", "Melt out", "Flush"]
    at = [card.index(f". {words}") for words in order]
    assert at == sorted(at)
    # The core's mass: its volume (cm3) x 0.90 g/cm3.
    mass = m.core_volume_mm3 / 1000.0 * 0.90
    assert f"{m.core_volume_mm3 / 1000.0:.2f} cm3, {mass:.1f} g at 0.9 g/cm3" in card
    assert "follow the wax's data sheet" in card
    cautions = card[card.index("## Cautions"):]
    for words in ("burn", "fumes", "ventilated", "data sheet"):
        assert words in cautions
    assert "core.stl is the core cast in step 1, not printed" in card
