"""Overmold recipes the plan cannot cast are refused before any CAD work: exit 2, one
located line per problem naming the field, nothing written.

Demo recipe (our scenario): the co-op's thread-wound finger; rod 16 mm across with a 10 mm
bore (a 3 mm bladder wall), checks.min_wall_mm 1, guides 1.2 mm wide and 0.8 mm high at a
6 mm pitch. Line numbers are those of that file, found by text.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

from soft_molds.cli import main

ROOT = Path(__file__).resolve().parents[2]
TEXT = (ROOT / "recipes" / "seedling-wound-finger.yaml").read_text()


@pytest.fixture
def no_step_build(monkeypatch):
    import soft_molds.pipeline

    def refuse(*_args, **_kwargs):
        raise AssertionError("a multi-step build ran for a recipe that should be refused")

    monkeypatch.setattr(soft_molds.pipeline, "build_steps", refuse)
    monkeypatch.setattr(soft_molds.pipeline, "build_overmold", refuse)


CASES = [
    # A bar is not a round bladder.
    ("body-not-a-rod", ("kind: rod\n  diameter_mm: 16\n  length_mm: 60\n  end_round_mm: 0",
                        "kind: bar\n  length_mm: 60\n  width_mm: 16\n  height_mm: 16"),
     "body.kind", "cannot be overmolded"),
    # Rounded ends would not sit flat on the molds' end walls.
    ("rounded-rod-ends", ("end_round_mm: 0", "end_round_mm: 1"), "body.end_round_mm",
     "must be 0"),
    # Two bores: one core cannot form them.
    ("two-voids", ("inlet:\n", "  - kind: bore\n    diameter_mm: 4\n    length_mm: 20\n"
                                "    start_mm: 10\n    center_mm: [4, 0]\ninlet:\n"),
     "voids", "cannot be overmolded"),
    # The core must be concentric with the rod.
    ("bore-off-axis", ("  - kind: bore\n", "  - kind: bore\n    center_mm: [0, 1]\n"),
     "voids[0].center_mm", "off the rod's axis"),
    # 0.5 mm of skin is under checks.min_wall_mm = 1.
    ("skin-too-thin", ("skin_mm: 1.5", "skin_mm: 0.5"), "process.skin_mm",
     "thinner than checks.min_wall_mm"),
    # A 1 mm pitch under 1.2 mm wide ridges: the turns would merge.
    ("pitch-below-ridge-width", ("guide_pitch_mm: 6", "guide_pitch_mm: 1"),
     "process.guide_pitch_mm", "below the ridge width"),
    # 2 mm ridges on a 3 mm wall: more than half of it.
    ("ridges-too-tall", ("guide_height_mm: 0.8", "guide_height_mm: 2"),
     "process.guide_height_mm", "taller than the bladder wall allows"),
]


@pytest.mark.parametrize(("name", "change", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_overmold_recipe_the_plan_cannot_cast_exits_2_naming_the_field(
        name, change, field, words, tmp_path, capsys, no_cad_work, no_step_build):
    text = edit(TEXT, *change)
    path, line = refused_once(text, tmp_path, capsys)
    key = field.rsplit(".", 1)[-1]
    # The problem points at the line that names the field (the voids list: its key).
    needles = ["voids:"] if field == "voids" else [change[1].splitlines()[0],
                                                   change[1].splitlines()[-1]]
    assert any(line.startswith(f"{path}:{line_of(text, n)}: {field}") for n in needles), \
        line
    assert key in line and words in line, line


def test_an_overmold_socket_on_the_end_face_is_refused_naming_the_face(
        tmp_path, capsys, no_cad_work, no_step_build):
    # The rod core leaves through one socket on the x = 0 face in both steps; moved to the
    # far face, the bore also breaks through the start face (a second line, its own).
    text = edit(TEXT, "inlet:\n", "inlet:\n  face: end\n")
    path = tmp_path / "recipe.yaml"
    path.write_text(text)
    assert main(["build", str(path), "--out", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    want = (f"{path}:{line_of(text, '  face: end')}: inlet.face: cannot be overmolded "
            "(got 'end'); allowed: one inlet on the start face (x = 0)")
    assert want in err.splitlines() or f"error: {want}" in err.splitlines(), err
    assert not (tmp_path / "out").exists()


HALF_TEXT = (ROOT / "recipes" / "seedling-bend-wound-finger.yaml").read_text()

HALF_CASES = [
    # Only a half-round bladder has a flat face for a sheet.
    ("sheet-on-a-round-bladder", TEXT, ("guides: double", "guides: double\n  sheet: paper"),
     "process.sheet", "only a half-round bladder"),
    # A 9.5 mm bore in an 18 mm rod: a 4.25 mm flat wall, the core 0.5 mm high above it,
    # under checks.min_wall_mm = 1.
    ("half-round-core-too-low", HALF_TEXT, ("diameter_mm: 13 ", "diameter_mm: 9.5 "),
     "voids[0].diameter_mm", "half-round core lower than"),
    # Two bores: one half-round core cannot form them.
    ("half-round-two-voids", HALF_TEXT,
     ("inlet:\n", "  - kind: bore\n    diameter_mm: 3\n    length_mm: 20\n"
                  "    start_mm: 10\n    center_mm: [0, -5]\ninlet:\n"),
     "voids", "cannot be overmolded"),
    # The sheet 0.5 mm in from the inlet face: under checks.min_wall_mm = 1.
    ("sheet-edge-at-the-inlet-face", HALF_TEXT,
     ("cover_margin_mm: 2", "cover_margin_mm: 0.5"), "process.cover_margin_mm",
     "closer than checks.min_wall_mm"),
]


@pytest.mark.parametrize(("name", "text", "change", "field", "words"), HALF_CASES,
                         ids=[c[0] for c in HALF_CASES])
def test_a_sheet_or_half_round_the_plan_cannot_cast_exits_2_naming_the_field(
        name, text, change, field, words, tmp_path, capsys, no_cad_work, no_step_build):
    text = edit(text, *change)
    path, line = refused_once(text, tmp_path, capsys)
    needles = ["voids:"] if field == "voids" else [change[1].splitlines()[0],
                                                   change[1].splitlines()[-1]]
    assert any(line.startswith(f"{path}:{line_of(text, n)}: {field}") for n in needles), \
        line
    assert words in line, line
