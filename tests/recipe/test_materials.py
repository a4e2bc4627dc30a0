"""The silicone grade table, blending to a target hardness, and the recipe's ``material`` and
``inflate`` blocks.

Outside references (values from /work/shared/reference/casting-facts.md):
- Typical platinum-cure casting grades: from memory of typical data sheets (no source).
- Gent's relation, A. N. Gent, Rubber Chem. Technol. 31:896 (1958), worked values.
- Mixing compatible platinum-cure grades, and that tin-cure and platinum-cure do not mix:
  common practice.
- psi -> kPa x 6.894757: NIST SP 811.
"""

from __future__ import annotations

import dataclasses
from importlib import resources

import pytest
from recipe_text import FINGER_TEXT, line_of

from soft_molds.errors import RecipeError
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.materials import GRADE_NAMES, blend, grades, parse_table

# Gent (1958) worked values on casting-facts.md, MPa.
E10, E20, E30 = 0.413, 0.732, 1.142
# Hand arithmetic from those 3-decimal values: (0.732 - 1.142) / (0.413 - 1.142) = 0.5624;
# rounding E to 3 decimals moves the fraction by < 1e-3.
PHI_A10_IN_A20 = (E20 - E30) / (E10 - E30)
# Densities of A10 and A30 from the typical table (from memory): 1.07 and 1.08 g/cm3.
W_A10_IN_A20 = 1.07 * PHI_A10_IN_A20 / (1.07 * PHI_A10_IN_A20 + 1.08 * (1 - PHI_A10_IN_A20))

# Typical table on casting-facts.md, from memory of typical data sheets (no source):
# grade -> (scale, hardness, density g/cm3, elongation %, tensile MPa). Where the sheet gives
# a range the shipped table keeps the low end (the safe side for a tear check) and says so
# in its note.
TYPICAL = {
    "00-10": ("00", 10, 1.04, 800, 0.8),
    "00-30": ("00", 30, 1.07, 900, 1.4),
    "00-50": ("00", 50, 1.07, 980, 2.2),
    "A10": ("A", 10, 1.07, 1000, 3.3),
    "A20": ("A", 20, 1.08, 620, 3.8),
    "A30": ("A", 30, 1.08, 360, 3.4),   # ranges 1.08-1.13, 360-700 %, 3.4-6.5 MPa
    "A40": ("A", 40, 1.1, 300, 4.0),    # ranges 1.1-1.2, 300-450 %, 4-6 MPa
}

USER_TABLE = """\
grades:
  my-A15:
    {scale: A, hardness: 15, cure: platinum, density_g_cm3: 1.075, elongation_pct: 800,
     tensile_mpa: 3.5, mix_ratio: [1, 1], mix_by: weight, pot_life_min: 30, demold_h: 6,
     note: "our measured batch"}
  A10:
    {scale: A, hardness: 10, cure: platinum, density_g_cm3: 1.10, elongation_pct: 900,
     tensile_mpa: 3.0, mix_ratio: [1, 1], mix_by: weight, pot_life_min: 20, demold_h: 7}
"""


def _shipped_text() -> str:
    return resources.files("soft_molds.recipe").joinpath("silicone_grades.yaml").read_text()


def _with(blocks: str) -> str:
    """The test finger recipe with extra top-level blocks appended (it has neither
    ``material`` nor ``inflate`` of its own)."""
    assert "\nmaterial:" not in FINGER_TEXT and "\ninflate:" not in FINGER_TEXT
    return FINGER_TEXT.rstrip("\n") + "\n" + blocks


def _error(text: str, **kw) -> RecipeError:
    with pytest.raises(RecipeError) as exc:
        recipe_from_text(text, "t.yaml", **kw)
    return exc.value


# ------------------------------------------------------------------------- shipped table

def test_shipped_table_parses_without_problems_and_holds_grade_names_in_order():
    table, bad = parse_table(_shipped_text(), "silicone_grades.yaml")
    assert bad == []
    assert tuple(table) == GRADE_NAMES
    assert tuple(grades()) == GRADE_NAMES


@pytest.mark.parametrize("name", GRADE_NAMES)
def test_shipped_grade_matches_typical_table(name: str):
    # Typical data-sheet values, from memory (casting-facts.md typical table).
    scale, hardness, density, elongation, tensile = TYPICAL[name]
    g = grades()[name]
    assert (g.scale, g.hardness) == (scale, hardness)
    assert g.density_g_cm3 == pytest.approx(density, abs=1e-9)
    assert g.elongation_pct == pytest.approx(elongation, abs=1e-9)
    assert g.tensile_mpa == pytest.approx(tensile, abs=1e-9)


def test_a10_is_density_1_07_elongation_1000():
    # Typical Shore A10 platinum-cure casting silicone, from memory (casting-facts.md).
    a10 = grades()["A10"]
    assert a10.density_g_cm3 == pytest.approx(1.07, abs=1e-9)
    assert a10.elongation_pct == pytest.approx(1000.0, abs=1e-9)


def test_a40_elongation_is_low_end_of_range_and_note_keeps_the_range():
    # From memory (casting-facts.md): Shore A40 elongation 300-450 %; the table keeps 300
    # (the safe side for a tear check) and documents the range in the note.
    a40 = grades()["A40"]
    assert a40.elongation_pct == pytest.approx(300.0, abs=1e-9)
    assert "300-450" in a40.note


@pytest.mark.parametrize("name", GRADE_NAMES)
def test_shipped_grades_are_platinum_cure_mixed_one_to_one(name: str):
    # Common practice (casting-facts.md): soft-robotics grades are platinum-cure, 1A:1B.
    g = grades()[name]
    assert g.cure == "platinum"
    assert g.mix_ratio == (1.0, 1.0)


def test_only_shore_a_grades_get_a_gent_modulus():
    # Gent (1958) is a Shore A relation; 00 -> A has no closed form (casting-facts.md).
    table = grades()
    assert table["00-30"].youngs_modulus_mpa() is None
    assert table["A20"].youngs_modulus_mpa() == pytest.approx(E20, abs=5e-4)


# ------------------------------------------------------------------------------ blending

def test_blend_a10_a30_to_a20_volume_fraction_from_gent_moduli():
    # Volume fraction of A10 = (E20 - E30) / (E10 - E30), Gent (1958) worked values: 0.562.
    b = blend(grades()["A10"], grades()["A30"], 20.0)
    assert b.volume_fraction_first == pytest.approx(PHI_A10_IN_A20, abs=1e-3)
    assert b.volume_fraction_first == pytest.approx(0.562, abs=1e-3)
    assert b.modulus_mpa == pytest.approx(E20, abs=5e-4)


def test_blend_a10_a30_weight_fraction_from_densities():
    # Mass of each part = volume fraction x density (1.07 and 1.08 g/cm3, from memory).
    b = blend(grades()["A10"], grades()["A30"], 20.0)
    assert b.weight_fraction_first == pytest.approx(W_A10_IN_A20, abs=1e-3)
    assert b.weight_fraction_first < b.volume_fraction_first  # A10 is the lighter part


def test_blend_is_symmetric_in_the_order_of_grades():
    # Swapping the two grades must describe the same mix (fractions sum to one).
    a10, a30 = grades()["A10"], grades()["A30"]
    forward, back = blend(a10, a30, 20.0), blend(a30, a10, 20.0)
    assert forward.volume_fraction_first + back.volume_fraction_first == pytest.approx(1.0)
    assert forward.weight_fraction_first + back.weight_fraction_first == pytest.approx(1.0)


def test_blend_at_an_end_hardness_is_all_of_that_grade():
    # A target equal to one grade's hardness needs none of the other (Gent is one-to-one).
    a10, a30 = grades()["A10"], grades()["A30"]
    assert blend(a10, a30, 10.0).volume_fraction_first == pytest.approx(1.0, abs=1e-12)
    assert blend(a10, a30, 30.0).volume_fraction_first == pytest.approx(0.0, abs=1e-12)


def test_blend_refuses_different_cure_chemistry():
    # Common practice: tin-cure and platinum-cure silicones do not mix.
    tin = dataclasses.replace(grades()["A30"], name="A30-tin", cure="tin")
    with pytest.raises(ValueError, match="cure"):
        blend(grades()["A10"], tin, 20.0)


def test_blend_refuses_shore_00_grades():
    # Gent (1958) needs Shore A; Shore 00 has no closed-form conversion (casting-facts.md).
    with pytest.raises(ValueError, match="Shore A"):
        blend(grades()["00-50"], grades()["A20"], 15.0)


@pytest.mark.parametrize("target", [5.0, 35.0])
def test_blend_refuses_a_target_outside_the_two_grades(target: float):
    # A volume-weighted mean of two moduli cannot leave the interval they span.
    with pytest.raises(ValueError, match="not between"):
        blend(grades()["A10"], grades()["A30"], target)


# ---------------------------------------------------------------------------- parse_table

def test_parse_table_reports_one_message_per_bad_grade_naming_it():
    text = """\
grades:
  no-keys: {scale: A, hardness: 20, cure: platinum}
  wrong-scale:
    {scale: D, hardness: 20, cure: platinum, density_g_cm3: 1.08, elongation_pct: 600,
     tensile_mpa: 3.8, mix_ratio: [1, 1], mix_by: weight, pot_life_min: 25, demold_h: 4}
  not-a-number:
    {scale: A, hardness: twenty, cure: platinum, density_g_cm3: 1.08, elongation_pct: 600,
     tensile_mpa: 3.8, mix_ratio: [1, 1], mix_by: weight, pot_life_min: 25, demold_h: 4}
  fine:
    {scale: A, hardness: 20, cure: platinum, density_g_cm3: 1.08, elongation_pct: 600,
     tensile_mpa: 3.8, mix_ratio: [1, 1], mix_by: weight, pot_life_min: 25, demold_h: 4}
"""
    table, bad = parse_table(text, "mine.yaml")
    assert list(table) == ["fine"]
    assert len(bad) == 3, bad
    missing, scale, number = bad
    assert missing.startswith("mine.yaml: grades.no-keys: missing ")
    for key in ("density_g_cm3", "elongation_pct", "tensile_mpa", "mix_ratio", "mix_by",
                "pot_life_min", "demold_h"):
        assert key in missing
    assert "grades.wrong-scale" in scale and "scale must be A or 00" in scale
    assert "grades.not-a-number" in number and "must be a number" in number


def test_parse_table_without_grades_mapping_is_one_problem():
    table, bad = parse_table("colours: [red]\n", "mine.yaml")
    assert table == {}
    assert len(bad) == 1 and bad[0].startswith("mine.yaml:") and "grades" in bad[0]


def test_parse_table_with_broken_yaml_is_one_problem():
    table, bad = parse_table("grades: {A10: [\n", "mine.yaml")
    assert table == {}
    assert len(bad) == 1 and "not valid YAML" in bad[0]


# ---------------------------------------------------------------------- recipe: material

def test_user_table_file_is_found_relative_to_base_dir_and_names_a_grade(tmp_path):
    (tmp_path / "our-grades.yaml").write_text(USER_TABLE, encoding="utf-8")
    text = _with("material:\n  grade: my-A15\n  table_file: our-grades.yaml\n")
    g = recipe_from_text(text, "t.yaml", base_dir=tmp_path).material.silicone
    assert (g.name, g.scale, g.hardness, g.cure) == ("my-A15", "A", 15.0, "platinum")
    assert g.density_g_cm3 == pytest.approx(1.075, abs=1e-12)


def test_user_table_file_overrides_a_same_named_shipped_grade(tmp_path):
    (tmp_path / "our-grades.yaml").write_text(USER_TABLE, encoding="utf-8")
    text = _with("material:\n  grade: A10\n  table_file: our-grades.yaml\n")
    g = recipe_from_text(text, "t.yaml", base_dir=tmp_path).material.silicone
    assert g.density_g_cm3 == pytest.approx(1.10, abs=1e-12)
    assert grades()["A10"].density_g_cm3 == pytest.approx(1.07, abs=1e-12)  # table intact


def test_user_table_file_is_not_looked_up_outside_base_dir(tmp_path):
    (tmp_path / "our-grades.yaml").write_text(USER_TABLE, encoding="utf-8")
    other = tmp_path / "elsewhere"
    other.mkdir()
    text = _with("material:\n  grade: my-A15\n  table_file: our-grades.yaml\n")
    err = _error(text, base_dir=other)
    assert [p.path for p in err.problems] == ["material.table_file"]
    assert err.lines()[0].startswith(f"t.yaml:{line_of(text, 'table_file:')}: "
                                     "material.table_file: cannot be read")


def test_unknown_grade_is_refused_on_the_grade_line():
    text = _with("material:\n  grade: A99\n")
    err = _error(text)
    assert err.lines() == [
        f"t.yaml:{line_of(text, 'grade: A99')}: material.grade: is not a grade of the table "
        "(got 'A99'); allowed: " + ", ".join(GRADE_NAMES)]


def test_blend_with_without_target_shore_a_is_refused():
    text = _with("material:\n  grade: A10\n  blend_with: A30\n")
    err = _error(text)
    assert len(err.problems) == 1
    assert err.problems[0].path == "material.target_shore_a"
    assert "material.target_shore_a: is missing" in err.lines()[0]


def test_recipe_blend_a10_a30_to_shore_a20():
    # Fraction as computed by hand from Gent (1958) worked values (0.562).
    text = _with("material:\n  grade: A10\n  blend_with: A30\n  target_shore_a: 20\n")
    m = recipe_from_text(text, "t.yaml").material
    assert m.blend is not None
    assert (m.blend.first.name, m.blend.second.name) == ("A10", "A30")
    assert m.blend.volume_fraction_first == pytest.approx(PHI_A10_IN_A20, abs=1e-3)
    assert m.blend.weight_fraction_first == pytest.approx(W_A10_IN_A20, abs=1e-3)
    assert m.silicone.hardness == 20
    assert m.silicone.scale == "A"
    assert m.silicone.youngs_modulus_mpa() == pytest.approx(E20, abs=5e-4)


def test_recipe_blend_of_platinum_and_tin_grades_is_refused(tmp_path):
    # Common practice: tin-cure and platinum-cure do not mix.
    tin = USER_TABLE.replace("my-A15", "tin-A30").replace("hardness: 15, cure: platinum",
                                                          "hardness: 30, cure: tin")
    (tmp_path / "our-grades.yaml").write_text(tin, encoding="utf-8")
    text = _with("material:\n  grade: A10\n  table_file: our-grades.yaml\n"
                 "  blend_with: tin-A30\n  target_shore_a: 20\n")
    err = _error(text, base_dir=tmp_path)
    assert [p.path for p in err.problems] == ["material.blend_with"]
    assert "different cure chemistry" in err.lines()[0]


# ----------------------------------------------------------------------- recipe: inflate

def test_working_pressure_psi_is_converted_to_kpa():
    # NIST SP 811: 1 psi = 6.894757 kPa; 15 psi is mid common-practice range (10-20 psi).
    text = _with("inflate:\n  working_pressure_psi: 15\n")
    assert recipe_from_text(text, "t.yaml").inflate.working_pressure_kpa == pytest.approx(
        15 * 6.894757, rel=1e-12)


def test_working_pressure_kpa_is_kept_as_given():
    text = _with("inflate:\n  working_pressure_kpa: 100\n")
    assert recipe_from_text(text, "t.yaml").inflate.working_pressure_kpa == 100.0


def test_no_working_pressure_leaves_it_unset():
    assert recipe_from_text(FINGER_TEXT, "t.yaml").inflate.working_pressure_kpa is None


def test_working_pressure_in_both_units_is_refused_on_the_psi_line():
    text = _with("inflate:\n  working_pressure_kpa: 100\n  working_pressure_psi: 15\n")
    err = _error(text)
    assert err.lines() == [
        f"t.yaml:{line_of(text, 'working_pressure_psi')}: inflate.working_pressure_psi: is "
        "given with working_pressure_kpa (got 15.0); allowed: one of the two"]


def test_a_blend_whose_measured_modulus_leaves_no_mix_in_range_is_refused():
    # A10 measured at 1.5 MPa is stiffer than A30 by Gent (1.142 MPa): Shore A20's
    # 0.732 MPa is not between them, so no positive mix reaches it (hand arithmetic)
    from recipe_text import FINGER_TEXT as TEXT

    from soft_molds.errors import RecipeError
    from soft_molds.recipe import recipe_from_text

    text = TEXT.replace("checks:\n", "material:\n  youngs_modulus_mpa: 1.5\n  blend_with: A30\n"
                        "  target_shore_a: 20\nchecks:\n", 1)
    with pytest.raises(RecipeError) as e:
        recipe_from_text(text, "m.yaml", "m")
    (line,) = e.value.lines()
    assert "material.blend_with" in line and "not between" in line
