"""Layered recipes the plan cannot cast are refused before any CAD work: exit 2, one
located line per problem naming the field (and the void), nothing written.

Demo recipe (our scenario): the co-op's layered seedling finger; bar z in [-7, 7], base
4 mm, so the bond face is z = -3 and the chambers (height 8, centred at z = 1) stand on it.
Line numbers are those of that file, found by text.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

ROOT = Path(__file__).resolve().parents[2]
TEXT = (ROOT / "recipes" / "seedling-layered-finger.yaml").read_text()


@pytest.fixture
def no_layered_build(monkeypatch):
    import soft_molds.pipeline

    def refuse(*_args, **_kwargs):
        raise AssertionError("the layered build ran for a recipe that should be refused")

    monkeypatch.setattr(soft_molds.pipeline, "build_layered", refuse)


CASES = [
    # Chambers raised 1 mm: their bottoms at z = -2 do not reach the bond face at z = -3.
    ("chambers-off-the-bond-face", ("center_mm: [0, 1]", "center_mm: [0, 2]"),
     "voids[0].center_mm", "voids[0] chamber 1 does not reach the bond face"),
    # A base of 1 mm puts the bond face in the bar's 2 mm edge rounding.
    ("bond-face-in-the-rounding", ("base_mm: 4 ", "base_mm: 1 "), "process.base_mm",
     "puts the bond face in the bar's edge rounding"),
    ("unknown-process", ("kind: layered", "kind: stacked"), "process.kind", "stacked"),
]


@pytest.mark.parametrize(("name", "change", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_layered_recipe_the_plan_cannot_cast_exits_2_naming_the_field(
        name, change, field, words, tmp_path, capsys, no_cad_work, no_layered_build):
    text = edit(TEXT, *change)
    path, line = refused_once(text, tmp_path, capsys)
    key = field.rsplit(".", 1)[-1]
    assert line.startswith(f"{path}:{line_of(text, change[1])}: {field}"), line
    assert key in line and words in line, line
