"""The measured-results file and the next generation's recipe (demo scenario: the seedling
finger family). Line numbers are those of the documents written here, known by
construction; the narrowing rule is the one README.md documents (arithmetic)."""

from __future__ import annotations

from pathlib import Path

import pytest

from soft_molds import load_variants
from soft_molds.errors import RecipeError
from soft_molds.recipe.generation import narrowed_values, next_generation
from soft_molds.recipe.load import variants_from_text
from soft_molds.recipe.results import Defect, Quantity, read_results, results_from_text

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "recipes" / "measured" / "finger-family.results.yaml"
FAMILY = ROOT / "recipes" / "finger-family.yaml"
LABELS = ("A", "B", "C", "D", "E")

GOOD = """\
family: finger-family
variants:
  A:
    rows:
      - {pressure_kpa: 30, bend_deg: 4.5}
      - {pressure_kpa: 15, bend_deg: 2}
    burst_kpa: 140
    defects: [bubbles, tear-at-inlet]
    notes: fine
"""


def test_a_good_file_reads_with_rows_sorted_and_lines_kept():
    res = results_from_text(GOOD, "r.yaml", LABELS)
    (a,) = res.variants
    assert a.quantity is Quantity.BEND_DEG
    assert [(p.pressure_kpa, p.value, p.line) for p in a.points] == [(15.0, 2.0, 6),
                                                                        (30.0, 4.5, 5)]
    assert a.burst_kpa == 140.0 and a.leak_kpa is None
    assert a.defects == (Defect.BUBBLES, Defect.TEAR_AT_INLET) and a.notes == "fine"


def test_the_bundled_example_reads_against_the_family_labels():
    labels = [r.label for _, r in load_variants(FAMILY)]
    res = read_results(EXAMPLE, labels)
    assert res.family == "finger-family" and res.recipe == "../finger-family.yaml"
    assert [v.label for v in res.variants] == labels
    assert res.goal.at_kpa == 60.0 and res.goal.min_burst_margin == 1.5
    assert sum(len(v.points) for v in res.variants) == 24


# (description, the file's text, the one line expected)
BAD = [
    ("unknown label", GOOD.replace("  A:", "  Q:"),
     "r.yaml:3: variants.Q: is not a variant of the family (got 'Q'); allowed: A, B, C, D, E"),
    ("negative pressure", GOOD.replace("pressure_kpa: 30", "pressure_kpa: -30"),
     "r.yaml:5: variants.A.rows[0].pressure_kpa: is negative (got -30); allowed: a number "
     ">= 0"),
    ("angle without pressure", GOOD.replace("pressure_kpa: 30, ", ""),
     "r.yaml:5: variants.A.rows[0]: has bend_deg without pressure_kpa (got {'bend_deg': 4.5});"
     " allowed: {pressure_kpa: P, bend_deg: angle} or {pressure_kpa: P, extension_mm: "
     "length}"),
    ("duplicated row", GOOD.replace("pressure_kpa: 15", "pressure_kpa: 30"),
     "r.yaml:6: variants.A.rows[1].pressure_kpa: duplicates the row at line 5 (got 30.0); "
     "allowed: one row per pressure"),
    ("value without its unit key", GOOD.replace("bend_deg: 2}", "bend: 2}"),
     "r.yaml:6: variants.A.rows[1].bend: is not a known key; allowed: pressure_kpa, "
     "bend_deg, extension_mm"),
    ("a row without keys", GOOD.replace("{pressure_kpa: 15, bend_deg: 2}", "[15, 2]"),
     "r.yaml:6: variants.A.rows[1]: is not a row with unit keys (got [15, 2]); allowed: "
     "{pressure_kpa: P, bend_deg: angle} or {pressure_kpa: P, extension_mm: length}"),
    ("burst without unit", GOOD.replace("burst_kpa:", "burst:"),
     "r.yaml:7: variants.A.burst: is not a known key; allowed: rows, burst_kpa, leak_kpa, "
     "defects, notes"),
    ("unknown defect", GOOD.replace("bubbles,", "cracks,"),
     "r.yaml:8: variants.A.defects[0]: is not a known defect (got 'cracks'); allowed: "
     "bubbles, tear-at-inlet, delamination, leak, other (describe anything else in notes)"),
    ("mixed quantities", GOOD.replace("bend_deg: 2}", "extension_mm: 2}"),
     "r.yaml:6: variants.A.rows[1].extension_mm: mixes quantities in one variant (got "
     "'extension_mm'); allowed: bend_deg in every row"),
]


@pytest.mark.parametrize("text, line", [(t, ln) for _, t, ln in BAD],
                         ids=[d for d, _, _ in BAD])
def test_bad_results_give_one_located_line_each(text, line):
    with pytest.raises(RecipeError) as err:
        results_from_text(text, "r.yaml", LABELS)
    assert err.value.lines() == [line]


def test_every_problem_of_a_file_is_reported_at_once():
    text = (GOOD.replace("  A:", "  Q:")
            + "  B:\n    rows:\n      - {pressure_kpa: -1, bend_deg: 1}\n")
    with pytest.raises(RecipeError) as err:
        results_from_text(text, "r.yaml", LABELS)
    assert [ln.split(":")[1] for ln in err.value.lines()] == ["3", "12"]


def test_narrowing_is_best_plus_minus_half_the_step_in_five_values():
    assert narrowed_values((6, 7, 8, 9, 10), 8.0) == (7.5, 7.75, 8.0, 8.25, 8.5)
    # at an edge of the sweep: still centred on the best, half its one neighbour's step
    assert narrowed_values((6, 7, 8, 9, 10), 10.0) == (9.5, 9.75, 10.0, 10.25, 10.5)
    # uneven steps: the nearer neighbour sets the step
    assert narrowed_values((2, 3, 7), 3.0) == (2.5, 2.75, 3.0, 3.25, 3.5)
    with pytest.raises(ValueError):
        narrowed_values((5,), 5.0)


def test_the_next_generation_keeps_the_recipe_and_validates():
    text = FAMILY.read_text()
    ng = next_generation(text, str(FAMILY), "finger-family", 8.0)
    assert ng.name == "finger-family-gen2" and ng.generation == 2
    pairs = variants_from_text(ng.text, "next.yaml", ng.name, FAMILY.parent)
    heights = [r.voids[0].height_mm for _, r in pairs]
    assert heights == [7.5, 7.75, 8.0, 8.25, 8.5]
    assert {r.name for _, r in pairs} == {"finger-family-gen2"}
    # every other line is as written (comments kept)
    old, new = text.splitlines(), ng.text.splitlines()
    assert len(old) == len(new)
    assert sum(a != b for a, b in zip(old, new)) == 2
    again = next_generation(ng.text, "next.yaml", "x", 7.75)
    assert again.name == "finger-family-gen3" and again.values[0] == 7.625
