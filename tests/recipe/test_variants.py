"""Variant families in a recipe: expansion counts, stable labels, limits, and errors that
name the variant (test recipe of the demo scenario)."""

from __future__ import annotations

import tracemalloc
from pathlib import Path

import pytest
from recipe_text import FINGER_TEXT, line_of

from soft_molds.errors import RecipeError
from soft_molds.recipe import load_recipe, load_variants, recipe_from_text, variants_from_text
from soft_molds.recipe.variants import sweep_label


def _family(block: str):
    return variants_from_text(FINGER_TEXT + block, "fam.yaml", "fam")


def _labels(vs):
    return [r.label for _, r in vs]


def test_a_list_of_five_values_is_labelled_a_to_e():
    vs = _family("variants:\n  vary:\n    voids[0].height_mm: [6, 7, 8, 9, 10]\n")
    assert _labels(vs) == ["A", "B", "C", "D", "E"]
    assert [r.voids[0].height_mm for _, r in vs] == [6, 7, 8, 9, 10]
    assert {s.family for s, _ in vs} == {""}


def test_a_range_is_evenly_spaced_with_both_ends():
    vs = _family("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 6, count: 5}\n")
    # (6 - 4) / (5 - 1) = 0.5 mm steps (hand arithmetic)
    assert [r.mold.wall_mm for _, r in vs] == [4.0, 4.5, 5.0, 5.5, 6.0]


def test_a_product_sweeps_every_combination_last_field_fastest_in_families_of_five():
    vs = _family("variants:\n  vary:\n    voids[0].height_mm: [6, 7, 8]\n"
                 "    mold.wall_mm: [4, 5, 6, 7]\n")
    # 3 x 4 = 12 variants (hand arithmetic): F1-A..F1-E, F2-A..F2-E, F3-A, F3-B
    assert len(vs) == 12
    assert _labels(vs)[:6] == ["F1-A", "F1-B", "F1-C", "F1-D", "F1-E", "F2-A"]
    assert _labels(vs)[-1] == "F3-B"
    combos = [(r.voids[0].height_mm, r.mold.wall_mm) for _, r in vs]
    assert combos[:5] == [(6, 4), (6, 5), (6, 6), (6, 7), (7, 4)]
    assert [s.family for s, _ in vs][4:6] == ["F1", "F2"]


def test_zip_steps_fields_together_and_needs_equal_lengths():
    vs = _family("variants:\n  combine: zip\n  vary:\n    voids[0].height_mm: [6, 7]\n"
                 "    mold.wall_mm: [4, 5]\n")
    assert [(r.voids[0].height_mm, r.mold.wall_mm) for _, r in vs] == [(6, 4), (7, 5)]
    with pytest.raises(RecipeError) as e:
        _family("variants:\n  combine: zip\n  vary:\n    voids[0].height_mm: [6, 7]\n"
                "    mold.wall_mm: [4, 5, 6]\n")
    assert "different lengths" in e.value.lines()[0]


def test_labels_are_stable_across_runs():
    block = "variants:\n  vary:\n    voids[0].height_mm: [6, 7, 8]\n    mold.wall_mm: [4, 5]\n"
    a = [(r.label, r.params_sha256()) for _, r in _family(block)]
    b = [(r.label, r.params_sha256()) for _, r in _family(block)]
    assert a == b and len({h for _, h in a}) == 6
    assert [sweep_label(i, 12)[0] for i in (0, 4, 5, 11)] == ["F1-A", "F1-E", "F2-A", "F3-B"]


def test_explicit_labels_are_kept_and_the_empty_one_is_the_recipe_as_written():
    vs = _family("variants:\n  labels:\n    A: {}\n    TALL:\n      voids[0].height_mm: 9\n")
    assert _labels(vs) == ["A", "TALL"]
    assert vs[0][1].voids[0].height_mm == 8 and vs[1][1].voids[0].height_mm == 9


def test_a_sweep_over_ten_thousand_is_refused_unless_allowed():
    block = ("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 6, count: 101}\n"
             "    voids[0].height_mm: {from: 6, to: 8, count: 100}\n")
    with pytest.raises(RecipeError) as e:
        _family(block)
    (line,) = e.value.lines()
    # 101 x 100 = 10 100 > 10 000 (hand arithmetic)
    assert "would make 10100 variants" in line and "max_variants = 10000" in line


def test_errors_name_the_variant_the_field_and_the_line_that_changed_it():
    text = FINGER_TEXT + ("variants:\n  labels:\n    A: {}\n    B:\n"
                          "      voids[0].height_mm: 13\n")
    with pytest.raises(RecipeError) as e:
        variants_from_text(text, "fam.yaml", "fam")
    (line,) = e.value.lines()
    # 13 mm chambers in a 14 mm bar leave 0.5 mm walls: variant B's own change
    assert line.startswith(f"fam.yaml:{line_of(text, 'height_mm: 13')}: [B] voids[0]")
    assert "0.50 mm" in line


def test_the_same_problem_in_several_variants_is_reported_once():
    text = FINGER_TEXT + "variants:\n  vary:\n    mold.wal_mm: [4, 5, 6]\n"
    with pytest.raises(RecipeError) as e:
        variants_from_text(text, "fam.yaml", "fam")
    (line,) = e.value.lines()
    assert "[A, B, C] mold.wal_mm" in line and "did you mean 'wall_mm'" in line


@pytest.mark.parametrize("block, words", [
    ("variants:\n  vary:\n    name: [a, b]\n", "cannot be varied"),
    ("variants:\n  vary:\n    voids[5].height_mm: [6]\n", "list entry"),
    ("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 6}\n", "not a range"),
    ("variants:\n  vary:\n    mold.wall_mm: []\n", "no values"),
    ("variants:\n  labels:\n    a: {}\n", "not a valid label"),
    ("variants:\n  labels: {A: {}}\n  vary: {mold.wall_mm: [4]}\n", "exactly one"),
    ("variants:\n  colour: red\n  labels: {A: {}}\n", "not a known key"),
])
def test_a_bad_variants_block_is_one_clear_line(block, words):
    with pytest.raises(RecipeError) as e:
        _family(block)
    assert any(words in line for line in e.value.lines()), e.value.lines()


# --------------------------------------------------------------------- bounded planning

@pytest.mark.parametrize("end, literal, message, allowed", [
    ("to", "1" + "0" * 400, "is beyond the range of numbers",
     "a finite number of magnitude below about 1.8e308"),
    ("from", "-1" + "0" * 400, "is beyond the range of numbers",
     "a finite number of magnitude below about 1.8e308"),
    ("to", ".inf", "must be a finite number", "a finite number"),
    ("from", ".nan", "must be a finite number", "a finite number"),
    ("to", "seven", "must be a number", "a finite number"),
], ids=["400-digit-to", "400-digit-from", "inf", "nan", "text"])
def test_a_range_end_no_double_can_hold_is_a_recipe_problem(end, literal, message, allowed):
    # IEEE 754 binary64: the largest finite value is about 1.798e308.
    ends = {"from": "4", "to": "6", end: literal}
    text = FINGER_TEXT + ("variants:\n  vary:\n    mold.wall_mm:\n"
                          f"      {{from: {ends['from']}, to: {ends['to']}, count: 2}}\n")
    with pytest.raises(RecipeError) as e:
        variants_from_text(text, "fam.yaml", "fam")
    (p,) = e.value.problems
    assert (p.path, p.line, p.message, p.allowed) == (
        f"variants.vary.mold.wall_mm.{end}", line_of(text, "{from:"), message, allowed)


def test_a_range_across_the_whole_float_line_is_evenly_spaced_without_overflow():
    # to - from = 2e308 overflows a double; the weights form a (1 - t) + b t does not.
    block = ("variants:\n  max_variants: 3\n  vary:\n"
             "    mold.wall_mm: {from: -1.0e+308, to: 1.0e+308, count: 3}\n")
    with pytest.raises(RecipeError) as e:
        _family(block)
    got = sorted({p.value for p in e.value.problems})
    assert got == [-1e308, 0.0, 1e308]  # each refused by wall_mm's range, none infinite


def test_the_plan_size_is_known_and_refused_before_any_value_is_made():
    # Three ranges of a million values: 10**18 variants (hand arithmetic). Refused from
    # the counts alone: making even one range's values would hold ~30 MB.
    block = ("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 6, count: 1000000}\n"
             "    mold.flange_mm: {from: 10, to: 20, count: 1000000}\n"
             "    voids[0].height_mm: {from: 6, to: 8, count: 1000000}\n")
    tracemalloc.start()
    try:
        with pytest.raises(RecipeError) as e:
            _family(block)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    (line,) = e.value.lines()
    assert "would make 1000000000000000000 variants" in line
    assert peak < 2 * 1024 * 1024


def test_progress_is_reported_once_per_variant_with_the_total_known_first():
    calls: list[tuple[int, int]] = []
    vs = variants_from_text(FINGER_TEXT + "variants:\n  vary:\n    voids[0].height_mm: "
                            "[6, 7, 8]\n    mold.wall_mm: [4, 5]\n", "fam.yaml", "fam",
                            progress=lambda done, total: calls.append((done, total)))
    assert len(vs) == 6
    assert calls == [(i, 6) for i in range(1, 7)]


# ------------------------------------------------------------- load_recipe on a family

FAMILY = Path(__file__).resolve().parents[2] / "recipes" / "finger-family.yaml"


def test_load_recipe_on_a_family_is_its_first_variant_not_the_text_without_variants():
    # recipes/finger-family.yaml: chambers 8 mm high as written, variants 6..10 mm.
    first = load_variants(FAMILY)[0][1]
    r = load_recipe(FAMILY)
    assert r == first
    assert (r.label, r.voids[0].height_mm) == ("A", 6.0)
    assert r.params_sha256() == first.params_sha256()


def test_recipe_from_text_on_a_family_is_its_first_variant_too():
    text = FINGER_TEXT + "variants:\n  labels:\n    TALL:\n      voids[0].height_mm: 9\n" \
        "    A: {}\n"
    r = recipe_from_text(text, "fam.yaml", "fam")
    assert (r.label, r.voids[0].height_mm) == ("TALL", 9.0)
