"""The layered build's files: one folder per step in pour order with its own parts, the
strain-limiting sheet template at 1:1 whose outline encloses the footprint inset by the
cover margin, a manifest listing the steps in order with every file's SHA-256, and a casting
card naming both pours in order with their volumes.

Sources: the shoelace formula for a polygon's area; a rounded rectangle's area
L W - (4 - pi) r^2 (elementary geometry); SVG 1.1 (user units mapped by viewBox to the
width and height in mm); SHA-256 from Python's hashlib (FIPS 180-4).
"""

from __future__ import annotations

import hashlib
import json
import math
import xml.etree.ElementTree as ET

import numpy as np
import pytest
import trimesh
from conftest import built_layered

from soft_molds.export.layered import encode_layered, write_layered
from tests.readers import read_3mf, volume

NAME = "seedling-layered-finger"


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    m = built_layered(NAME)
    root = tmp_path_factory.mktemp("out")
    write_layered(m, root)
    return m, root / m.recipe.name / m.recipe.label


def test_each_step_has_its_own_folder_with_its_parts(written):
    m, folder = written
    assert sorted(p.name for p in folder.iterdir()) == [
        "casting-card.md", "manifest.json", "step-1-chambered", "step-2-base"]
    assert sorted(p.name for p in (folder / "step-1-chambered").iterdir()) == [
        "cast.stl", "plate-1.3mf", "plate-1.png", "post-bridge.step", "post-bridge.stl",
        "tray.step", "tray.stl"]
    assert sorted(p.name for p in (folder / "step-2-base").iterdir()) == [
        "cast.stl", "plate-1.3mf", "plate-1.png", "sheet.svg", "tray.step", "tray.stl"]
    for s in m.steps:
        for p in s.parts:
            # trimesh's own STL reader, which welds the triangles' corners.
            mesh = trimesh.load_mesh(folder / s.folder / f"{p.name}.stl")
            assert mesh.is_volume, (s.name, p.name)
            assert mesh.volume == pytest.approx(p.brep_volume_mm3, rel=0.005)


def test_manifest_lists_the_steps_in_order_with_every_files_digest(written):
    m, folder = written
    man = json.loads((folder / "manifest.json").read_text())
    assert [(s["index"], s["name"], s["folder"]) for s in man["steps"]] == [
        (1, "chambered", "step-1-chambered"), (2, "base", "step-2-base")]
    on_disk = {str(p.relative_to(folder)): p for p in folder.rglob("*")
               if p.is_file() and p.name != "manifest.json"}
    assert sorted(man["files"]) == sorted(on_disk)
    for name, path in on_disk.items():
        assert man["files"][name] == hashlib.sha256(path.read_bytes()).hexdigest()
    assert man["actuator_volume_mm3"] == pytest.approx(
        sum(s["parts"][-1]["volume_mm3"] for s in man["steps"]))


def test_sheet_template_encloses_the_footprint_inset_by_the_cover_margin(written):
    m, folder = written
    r = m.recipe
    root = ET.parse(folder / "step-2-base" / "sheet.svg").getroot()
    ns = {"s": "http://www.w3.org/2000/svg"}
    # 1:1: the page is as many mm wide and high as it has user units.
    vb = [float(v) for v in root.get("viewBox").split()]
    assert float(root.get("width").removesuffix("mm")) == pytest.approx(vb[2])
    assert float(root.get("height").removesuffix("mm")) == pytest.approx(vb[3])
    poly = root.find("s:polygon[@id='sheet-outline']", ns)
    xy = np.array([[float(v) for v in p.split(",")] for p in poly.get("points").split()])
    x, y = xy[:, 0], xy[:, 1]
    shoelace = 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y))
    (body,) = r.body_primitives()
    length, width = body.size_mm[0], body.size_mm[1]
    m_mm, rad = r.process.cover_margin_mm, body.radius_mm
    corner = max(rad - m_mm, 0.0)
    want = (length - 2 * m_mm) * (width - 2 * m_mm) - (4 - math.pi) * corner ** 2
    assert shoelace == pytest.approx(want, rel=1e-6)
    assert np.ptp(x) == pytest.approx(length - 2 * m_mm, abs=1e-3)
    assert np.ptp(y) == pytest.approx(width - 2 * m_mm, abs=1e-3)
    bar = root.find("s:line[@id='scale-bar']", ns)
    assert float(bar.get("x2")) - float(bar.get("x1")) == pytest.approx(50.0)


def test_casting_card_lists_the_two_pours_in_order_with_their_volumes(written):
    m, folder = written
    card = (folder / "casting-card.md").read_text()
    first, second = (card.index("1. step-1-chambered"), card.index("2. step-2-base"))
    assert first < second
    for s in m.steps:
        assert f"{s.pour.cast_mm3 / 1000.0:.2f} cm3" in card


def test_the_same_build_gives_the_same_bytes():
    m = built_layered(NAME)
    assert encode_layered(m) == encode_layered(m)


def test_manifest_records_the_verdict_and_every_finding_of_the_layered_checks(written):
    m, folder = written
    man = json.loads((folder / "manifest.json").read_text())
    assert man["verdict"] == "ok"
    assert [(f["check"], f["part"]) for f in man["checks"]] == [
        (f.check, f.part) for f in m.findings]
    cover = next(f for f in man["checks"] if f["check"] == "sheet-cover")
    # Hand value: process.cover_margin_mm = 2 against checks.min_wall_mm = 1, to 4 places.
    assert (cover["severity"], cover["value"], cover["limit"]) == ("info", 2.0, 1.0)


def test_casting_card_lists_every_finding_the_manifest_records(written):
    m, folder = written
    card = (folder / "casting-card.md").read_text()
    man = json.loads((folder / "manifest.json").read_text())
    checks = card[card.index("## Checks"):card.index("## Cautions")]
    rows = [ln for ln in checks.splitlines() if ln.startswith("- ")]
    assert len(rows) == len(man["checks"]) == len(m.findings) > 0
    for row, f in zip(rows, man["checks"]):
        assert row == f"- {f['severity']}: {f['check']} ({f['part']}): {f['message']}"


def test_each_steps_plate_holds_its_printed_parts_on_the_bed_with_their_volumes(written,
                                                                                tmp_path):
    # Reader: lib3mf (the 3MF Consortium's reference library); volume by the divergence
    # theorem against the solid's exact volume, to the mesh tolerance (0.5 %).
    m, folder = written
    bx, by = m.recipe.printer.bed_mm
    for s in m.steps:
        _, objects = read_3mf((folder / s.folder / "plate-1.3mf").read_bytes(), tmp_path)
        printed = [p for p in s.parts if p.role != "cast"]
        assert sorted(objects) == sorted(f"{p.name} A" for p in printed)
        for p in printed:
            v, t = objects[f"{p.name} A"]
            assert volume(v, t) == pytest.approx(p.brep_volume_mm3, rel=0.005)
            lo, hi = v.min(axis=0), v.max(axis=0)
            assert lo[2] == pytest.approx(0.0, abs=1e-4)
            assert lo[0] >= -1e-4 and lo[1] >= -1e-4 and hi[0] <= bx and hi[1] <= by


def test_each_printed_parts_step_file_reads_back_as_one_solid_of_its_volume(written):
    # Reader: the CAD kernel's own STEP reader (ISO 10303-21 AP214): one solid per file,
    # its exact volume equal to the part's to 1e-6.
    import cadquery as cq
    m, folder = written
    man = json.loads((folder / "manifest.json").read_text())
    for s, rec in zip(m.steps, man["steps"]):
        for p, prec in zip(s.parts, rec["parts"]):
            if p.role == "cast":
                assert prec["step"] is None
                continue
            assert prec["step"] == f"{s.folder}/{p.name}.step"
            shape = cq.importers.importStep(str(folder / prec["step"]))
            solids = shape.solids().vals()
            assert len(solids) == 1
            assert solids[0].Volume() == pytest.approx(p.brep_volume_mm3, rel=1e-6)
