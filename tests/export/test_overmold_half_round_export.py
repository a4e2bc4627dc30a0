"""The half-round overmold's files (the co-op's thread-wound bender, built once per
session, encoded in memory): the skin step carries the strain-limiting sheet's 1:1
template, whose outline encloses the sheet's area, the card walks through the winding,
the sheet (material, cut size, template) and the skin pour in that order, and the
manifest echoes the section and the sheet.

Sources: the area of a simple polygon by the shoelace formula (Gauss's area formula);
the SVG 1.1 specification for the page size in mm and the viewBox (user unit = 1 mm
when they agree); SHA-256 from Python's hashlib (FIPS 180-4).
"""

from __future__ import annotations

import hashlib
import json
import xml.etree.ElementTree as ET

import pytest
from conftest import built_steps

from soft_molds.export.overmold import CARD_NAME, MANIFEST_NAME, encode_overmold

NAME = "seedling-bend-wound-finger"
SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def encoded():
    m = built_steps(NAME)
    return m, encode_overmold(m)


def shoelace_mm2(points: list[tuple[float, float]]) -> float:
    x = [p[0] for p in points]
    y = [p[1] for p in points]
    n = len(points)
    return abs(sum(x[i] * y[(i + 1) % n] - x[(i + 1) % n] * y[i] for i in range(n))) / 2.0


def test_the_skin_step_has_the_sheet_template_at_1_to_1(encoded):
    m, files = encoded
    assert "step-2-skin/sheet.svg" in files
    assert not any(k.startswith("step-1-bladder/") and k.endswith(".svg") for k in files)
    root = ET.fromstring(files["step-2-skin/sheet.svg"])
    w_mm, h_mm = float(root.get("width").removesuffix("mm")), float(
        root.get("height").removesuffix("mm"))
    assert [float(v) for v in root.get("viewBox").split()] == pytest.approx([0, 0, w_mm, h_mm])
    poly = root.find(f"{SVG}polygon[@id='sheet-outline']")
    pts = [tuple(float(c) for c in p.split(",")) for p in poly.get("points").split()]
    sheet = m.steps[1].overmold.sheet
    length, width = sheet.size_mm
    p = m.recipe.process
    assert (length, width) == pytest.approx((m.recipe.body.length_mm - 2 * p.cover_margin_mm,
                                             m.recipe.body.diameter_mm - 2 * p.cover_margin_mm))
    assert shoelace_mm2(pts) == pytest.approx(length * width, rel=1e-9)
    xs, ys = [q[0] for q in pts], [q[1] for q in pts]
    assert (max(xs) - min(xs), max(ys) - min(ys)) == pytest.approx((length, width), abs=1e-4)
    bar = root.find(f"{SVG}line[@id='scale-bar']")
    assert float(bar.get("x2")) - float(bar.get("x1")) == pytest.approx(50.0)


def test_the_card_winds_then_lays_the_sheet_then_pours_the_skin(encoded):
    m, files = encoded
    card = files[CARD_NAME].decode()
    sheet = m.steps[1].overmold.sheet
    length, width = sheet.size_mm
    i_wind = card.index("Wind the thread")
    i_sheet = card.index("Lay the strain-limiting sheet")
    i_place = card.index("Place the bladder")
    i_skin = card.index("step-2-skin: the skin")
    assert card.index("1. step-1-bladder") < i_wind < i_sheet < i_place < i_skin
    lay = card[i_sheet:i_place]
    assert "paper" in lay and f"{length:g} x {width:g} mm" in lay
    assert "step-2-skin/sheet.svg" in lay
    assert "across the flat face" in card[i_wind:i_sheet]
    assert f"{m.thread.perimeter_mm:.1f} mm around" in card[i_wind:i_sheet]
    assert f"{m.steps[1].pour.mixed_g:.1f} g mixed" in card[i_skin:]
    assert "bends towards its flat face" in card
    assert "sheet-cover" in card


def test_the_manifest_echoes_the_section_and_sheet_and_lists_the_template(encoded):
    _, files = encoded
    man = json.loads(files[MANIFEST_NAME])
    assert man["process"]["bladder"] == "half-round"
    assert man["process"]["sheet"] == "paper"
    digest = hashlib.sha256(files["step-2-skin/sheet.svg"]).hexdigest()
    assert man["files"]["step-2-skin/sheet.svg"] == digest
    assert any(c["check"] == "sheet-cover" and c["severity"] == "info" for c in man["checks"])


def test_the_written_set_reads_back_and_a_sweep_finds_it_done(encoded, tmp_path):
    from soft_molds.export.files import json_bytes
    from soft_molds.export.overmold import write_overmold
    from soft_molds.export.steps_manifest import read_stepped_manifest
    from soft_molds.export.typedjson import to_json
    from soft_molds.sweep.cache import stepped_up_to_date

    m, files = encoded
    write_overmold(m, tmp_path)
    folder = tmp_path / m.recipe.name / m.recipe.label
    man = read_stepped_manifest(folder)
    assert json_bytes(to_json(man)) == (folder / MANIFEST_NAME).read_bytes()
    assert (folder / "step-2-skin" / "sheet.svg").read_bytes() == files["step-2-skin/sheet.svg"]
    # Up to date for the recipe it was built from (its hash covers the section and sheet).
    assert stepped_up_to_date(tmp_path, m.recipe) is not None
