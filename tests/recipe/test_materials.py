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
import os
import threading
import tracemalloc
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

def test_parse_table_reports_one_problem_per_bad_key_with_file_line_and_grade():
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
    got = [(p.path, p.line, p.message) for p in bad]
    missing = ["density_g_cm3", "elongation_pct", "tensile_mpa", "mix_ratio", "mix_by",
               "pot_life_min", "demold_h"]
    assert got == [(f"grades.no-keys.{k}", 2, "is required") for k in missing] + [
        ("grades.wrong-scale.scale", 4, "is not a known value"),
        ("grades.not-a-number.hardness", 7, "must be a number")]
    assert bad[-2].format() == ("mine.yaml:4: grades.wrong-scale.scale: is not a known value "
                                "(got 'D'); allowed: one of A, 00")


def test_parse_table_without_grades_mapping_is_one_problem_per_mistake():
    table, bad = parse_table("colours: [red]\n", "mine.yaml")
    assert table == {}
    assert [p.format() for p in bad] == [
        "mine.yaml:1: colours: is not a known key; allowed: grades",
        "mine.yaml:1: grades: is required; allowed: grades: {name: {scale: ..., hardness: "
        "...}, ...}"]


def test_parse_table_with_broken_yaml_is_one_located_problem():
    table, bad = parse_table("grades: {A10: [\n", "mine.yaml")
    assert table == {}
    (p,) = bad
    assert p.format().startswith("mine.yaml:2: YAML syntax error: ")


def test_an_unknown_key_in_a_table_is_refused_with_the_nearest_key():
    # A typo must not silently drop a measured value.
    text = USER_TABLE.replace("demold_h: 6,", "demold_h: 6, modulus_mp: 0.5,")
    table, bad = parse_table(text, "mine.yaml")
    assert list(table) == ["A10"]
    assert [p.format() for p in bad][0].startswith(
        "mine.yaml:4: grades.my-A15.modulus_mp: is not a known key (did you mean "
        "'modulus_mpa'?)")


# A user grade with one value replaced; the line of each key is 4 + its index below.
_ONE_GRADE = """\
# our measured batch (demo scenario)
grades:
  my-A15:
    scale: A
    hardness: 15
    cure: platinum
    density_g_cm3: 1.075
    elongation_pct: 800
    tensile_mpa: 3.5
    mix_ratio: [1, 1]
    mix_by: weight
    pot_life_min: 30
    demold_h: 6
    modulus_mpa: 0.55
"""


@pytest.mark.parametrize("key, literal, message, got, allowed", [
    ("density_g_cm3", ".inf", "must be a finite number", "inf",
     "a number, 0.5 < value <= 3 g/cm3"),
    ("modulus_mpa", ".nan", "must be a finite number", "nan",
     "a number, 0.005 < value <= 50 MPa"),
    ("modulus_mpa", "-5", "is out of range", "-5", "a number, 0.005 < value <= 50 MPa"),
    ("density_g_cm3", "0", "is out of range", "0", "a number, 0.5 < value <= 3 g/cm3"),
    ("elongation_pct", "0", "is out of range", "0", "a number, 10 < value <= 2000 %"),
    ("mix_ratio", "'12'", "must be a list of two numbers", "'12'",
     "a list of two numbers, 0 < each value <= 1000"),
    ("mix_ratio", "[1, 0]", "is out of range", "0", "a list of two numbers, 0 < each value"),
    ("pot_life_min", "0", "is out of range", "0", "a number, 0 < value <= 1440 min"),
    ("demold_h", "-4", "is out of range", "-4", "a number, 0 < value <= 720 h"),
    ("tensile_mpa", ".inf", "must be a finite number", "inf",
     "a number, 0 < value <= 100 MPa"),
], ids=["density-inf", "modulus-nan", "modulus-negative", "density-zero", "elongation-zero",
        "ratio-as-text", "ratio-zero", "pot-life-zero", "demold-negative", "tensile-inf"])
def test_table_values_get_the_recipes_range_checks(key, literal, message, got, allowed):
    keys = ["scale", "hardness", "cure", "density_g_cm3", "elongation_pct", "tensile_mpa",
            "mix_ratio", "mix_by", "pot_life_min", "demold_h", "modulus_mpa"]
    line = 4 + keys.index(key)
    text = _ONE_GRADE.splitlines(keepends=True)
    text[line - 1] = f"    {key}: {literal}\n"
    table, bad = parse_table("".join(text), "our.yaml")
    assert table == {}
    (p,) = bad
    assert p.format().startswith(f"our.yaml:{line}: grades.my-A15.{key}: {message} "
                                 f"(got {got}); allowed: {allowed}")


def test_the_recipe_and_the_table_share_the_measured_value_ranges():
    from soft_molds.recipe.materials import GRADE_FIELDS
    from soft_molds.recipe.schema import MATERIAL_FIELDS

    table = {f.name: f for f in GRADE_FIELDS}
    recipe = {f.name: f for f in MATERIAL_FIELDS}
    for t, r in [("density_g_cm3", "density_g_cm3"), ("elongation_pct", "elongation_pct"),
                 ("modulus_mpa", "youngs_modulus_mpa")]:
        assert (table[t].lo, table[t].hi) == (recipe[r].lo, recipe[r].hi)


# ------------------------------------------------------------ table file: the file guards

def _table_problem(tmp_path, table_file: str) -> str:
    """The one problem line of the test recipe naming ``table_file``."""
    text = _with(f"material:\n  grade: my-A15\n  table_file: {table_file}\n")
    (line,) = _error(text, base_dir=tmp_path).lines()
    return line


def test_a_device_as_table_file_is_refused_without_reading_it(tmp_path):
    # /dev/zero never ends: reading it whole would exhaust memory.
    line = _table_problem(tmp_path, "/dev/zero")
    assert "material.table_file: cannot be read: grades table path is a character device, " \
           "not a regular file (got '/dev/zero')" in line


def test_a_fifo_as_table_file_is_refused_without_waiting_for_a_writer(tmp_path):
    fifo = tmp_path / "grades.fifo"
    os.mkfifo(fifo)
    result: list[str] = []
    worker = threading.Thread(target=lambda: result.append(_table_problem(tmp_path,
                                                                          fifo.name)),
                              daemon=True)
    worker.start()
    worker.join(30.0)  # a hang detector, not a speed test: it only fails if it blocks
    if worker.is_alive():  # opening a FIFO for reading blocks until a writer comes
        os.close(os.open(fifo, os.O_WRONLY | os.O_NONBLOCK))
        pytest.fail("reading the table file waited on a FIFO")
    assert "material.table_file: cannot be read: grades table path is a named pipe (FIFO), " \
           "not a regular file" in result[0]


def test_a_directory_as_table_file_is_refused(tmp_path):
    (tmp_path / "grades").mkdir()
    line = _table_problem(tmp_path, "grades")
    assert "cannot be read: grades table path is a directory, not a file" in line


def test_a_huge_table_file_is_refused_by_its_size_before_it_is_read(tmp_path):
    big = tmp_path / "big.yaml"
    with open(big, "wb") as fh:  # sparse: 300 MB long, no disk used
        fh.truncate(300 * 1024 * 1024)
    tracemalloc.start()
    try:
        line = _table_problem(tmp_path, "big.yaml")
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert ("material.table_file: cannot be read: grades table file is 314572800 bytes "
            "(got 'big.yaml'); allowed: at most 262144 bytes") in line
    assert peak < 5 * 1024 * 1024  # nothing like the file's 300 MB was ever read


def test_an_alias_bomb_in_a_table_file_is_refused_at_the_expansion_bound(tmp_path):
    # "Billion laughs", a well-known expansion attack (common practice to refuse it).
    rows = ['  a: &a ["x", "x", "x", "x", "x", "x", "x", "x", "x"]']
    rows += [f"  {b}: &{b} [" + ", ".join([f"*{a}"] * 9) + "]"
             for a, b in zip("abcdefgh", "bcdefghi")]
    (tmp_path / "bomb.yaml").write_text("grades:\n" + "\n".join(rows) + "\n")
    line = _table_problem(tmp_path, "bomb.yaml")
    # Expanded values: a 10, b 91, c 820, d 7381, then e's list and e[0] pass 15 000 and
    # e[1] would pass 20 000 (as for the recipe's own bomb): e is on line 6.
    assert line == (f"{tmp_path / 'bomb.yaml'}:6: grades.e[1]: anchors/aliases expand beyond "
                    "20000 nodes")


def test_ten_thousand_nested_brackets_in_a_table_file_are_refused_at_their_line(tmp_path):
    (tmp_path / "deep.yaml").write_text("# ours\ngrades: " + "[" * 10_000 + "]" * 10_000)
    line = _table_problem(tmp_path, "deep.yaml")
    assert line == (f"{tmp_path / 'deep.yaml'}:2: grades table nests more than 32 levels "
                    "deep; allowed: at most 32 levels of lists and mappings")


@pytest.mark.parametrize("content, message", [
    (_ONE_GRADE.replace("    cure: platinum\n", "    cure: platinum\n    cure: tin\n"),
     "7: grades.my-A15.cure: duplicate key 'cure' (first at line 6)"),
    (_ONE_GRADE.replace("scale: A", "scale: !!python/name:os.system"),
     "4: grades.my-A15.scale: tag '!!python/name:os.system' is not allowed"),
    (_ONE_GRADE + "---\ngrades: {}\n",
     "15: grades table holds more than one YAML document (the second starts at line 15)"),
    (_ONE_GRADE.encode().replace(b"platinum", b"platin\xfcm"),
     "6: grades table file is not valid UTF-8: byte 0xfc at offset "
     f"{_ONE_GRADE.index('platinum') + len('platin')}"),
], ids=["duplicate-key", "python-tag", "two-documents", "latin-1"])
def test_a_table_file_gets_the_recipes_yaml_limits(tmp_path, content, message):
    path = tmp_path / "ours.yaml"
    if isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content)
    line = _table_problem(tmp_path, "ours.yaml")
    assert line.startswith(f"{path}:{message}")


def test_a_table_file_problem_names_the_table_file_and_its_line(tmp_path):
    text = _ONE_GRADE.replace("density_g_cm3: 1.075", "density_g_cm3: .inf")
    (tmp_path / "ours.yaml").write_text(text)
    line = _table_problem(tmp_path, "ours.yaml")
    assert line == (f"{tmp_path / 'ours.yaml'}:7: grades.my-A15.density_g_cm3: must be a "
                    "finite number (got inf); allowed: a number, 0.5 < value <= 3 g/cm3")


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
    text = _with("material:\n  grade: B7\n")
    err = _error(text)
    assert err.lines() == [
        f"t.yaml:{line_of(text, 'grade: B7')}: material.grade: is not a grade of the table "
        "(got 'B7'); allowed: " + ", ".join(GRADE_NAMES)]


@pytest.mark.parametrize("written, hint", [
    ('"Shore A10"', "(did you mean 'A10'?)"),
    ("a10", "(did you mean 'A10'?)"),
    ("shore 00-30", "(did you mean '00-30'?)"),
    ("A99", "(did you mean 'A40'?)"),
    # Shore A15 lies between the shipped A10 and A20 (same cure): the blend reaches it.
    ("A15", "(did you mean 'A10'? For Shore A15 blend two grades: grade: A10, blend_with: "
            "A20, target_shore_a: 15)"),
    ("00-40", "(did you mean '00-30'?)"),
    ("A1O", "(did you mean 'A10'?)"),  # letter O for zero: nearest spelling
], ids=["shore-a10", "lower-case", "shore-00-30", "a99", "a15", "00-40", "typo"])
def test_unknown_grade_suggests_the_nearest_grade(written, hint):
    text = _with(f"material:\n  grade: {written}\n")
    (line,) = _error(text).lines()
    assert f"material.grade: is not a grade of the table {hint} (got " in line


def test_unknown_blend_with_grade_gets_a_suggestion_too():
    text = _with("material:\n  grade: A10\n  blend_with: Shore A30\n  target_shore_a: 20\n")
    (line,) = _error(text).lines()
    assert "material.blend_with: is not a grade of the table (did you mean 'A30'?)" in line


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
