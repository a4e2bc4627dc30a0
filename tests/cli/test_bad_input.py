"""Bad input at the command line: exit status 2, one located line per problem, no
traceback, nothing written, and no CAD kernel loaded.

Outside references: the YAML 1.1 spec and type repository (yaml.org/spec/1.1,
yaml.org/type/*.html) for what the text means, elementary geometry for the walls, and the
"billion laughs" expansion attack (a well-known pattern; common practice to refuse it).
Line numbers are those of the documents written here, known by construction.
"""

from __future__ import annotations

import os
import subprocess
import sys
from dataclasses import dataclass, field
from pathlib import Path

import pytest
from recipe_text import FINGER_TEXT, edit, line_of
from refusals import Expect, assert_reported

from soft_molds.cli import main
from soft_molds.errors import SoftMoldsError
from soft_molds.recipe.registry import body_kinds

ROOT = Path(__file__).resolve().parents[2]
GOOD = ROOT / "recipes" / "seedling-finger.yaml"

# Demo recipe from our own scenario: one finger of a greenhouse co-op's seedling gripper.
# Bar x in [0, 70], y in [-8, 8], z in [-7, 7]; chambers 12 (y) by 8 (z) on the axis.
BASE = FINGER_TEXT

# "Billion laughs": nine levels of nine-fold aliases would expand to 9**9 strings.
BOMB = """\
a: &a ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]
b: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a]
c: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b]
d: &d [*c, *c, *c, *c, *c, *c, *c, *c, *c]
e: &e [*d, *d, *d, *d, *d, *d, *d, *d, *d]
f: &f [*e, *e, *e, *e, *e, *e, *e, *e, *e]
g: &g [*f, *f, *f, *f, *f, *f, *f, *f, *f]
h: &h [*g, *g, *g, *g, *g, *g, *g, *g, *g]
i: &i [*h, *h, *h, *h, *h, *h, *h, *h, *h]
"""
# Values counted while expanding: a 10, b 91, c 820, d 7381 (each 1 + 9 x the previous);
# then e's list (1) and e[0] (7381) reach 15 685 (with the top mapping), and e[1] would
# pass the 20 000 limit, so the refusal points at e[1] on e's line.






FIFO = b"<a named pipe>"  # marks a file of a case made with os.mkfifo
SPARSE_300MB = b"<300 MB of nothing>"  # a sparse file: long, no disk used


@dataclass(frozen=True)
class Case:
    name: str
    text: str | bytes | None  # None: no file at that path
    expect: tuple[Expect, ...] = field(default_factory=tuple)
    files: tuple[tuple[str, str | bytes], ...] = ()  # more files beside the recipe


def _case(name: str, text: str | bytes | None, *expect: Expect,
          files: tuple[tuple[str, str | bytes], ...] = ()) -> Case:
    return Case(name, text, tuple(expect), files)


def _exact(path: str, line: int | None, message: str, got: str | None = None,
           allowed: str | None = None, file: str | None = None) -> Expect:
    return Expect(path, line, message, got, allowed, file, exact=True)


NUMBER = "a number, 0.05 <= value <= 1000 mm"

_syntax = edit(BASE, "  length_mm: 70", "  length_mm: 70: 5")
_dup = edit(BASE, "  width_mm: 16", "  width_mm: 16\n  width_mm: 17")
_unknown = edit(BASE, "  wall_mm: 5", "  wal_mm: 5")
_text = edit(BASE, "  length_mm: 70", "  length_mm: seventy")
_neg = edit(BASE, "  length_mm: 70", "  length_mm: -70")
_zero = edit(BASE, "  height_mm: 14", "  height_mm: 0")
_through = edit(BASE, "    height_mm: 8", "    height_mm: 15")
_thin = edit(edit(BASE, "    width_mm: 12", "    width_mm: 14.04"), "    height_mm: 8",
             "    height_mm: 6")
_body_kind = edit(BASE, "  kind: bar", "  kind: bars")
_void_kind = edit(BASE, "  - kind: chambers", "  - kind: chamber")
_far_inlet = edit(BASE, "  socket_depth_mm: 6", "  socket_depth_mm: 6\n  center_mm: [0, 30]")
_rim = """\
# the co-op gripper's stem pad: a flat bar with one bore
name: pad-test
body: {kind: bar, length_mm: 40, width_mm: 24, height_mm: 12, edge_radius_mm: 2}
voids:
  - {kind: bore, diameter_mm: 2, length_mm: 30, center_mm: [0, 1.5]}
inlet:
  socket_diameter_mm: 4
  center_mm: [0, 1.5]
parting: {axis: y, offset_mm: 0}
"""
_absurd = edit(BASE, "  length_mm: 70", "  length_mm: 1000000000.0")
_huge_int = edit(BASE, "  length_mm: 70", "  length_mm: 1" + "0" * 400)
_yes = edit(BASE, "  length_mm: 70", "  length_mm: yes")
_nan = edit(BASE, "  length_mm: 70", "  length_mm: .nan")
_list = edit(BASE, "mold:\n  wall_mm: 5\n  clamp_bolt: M4\n", "mold: [5, M4]\n")
_many = edit(BASE, "count: 3", "count: 12")
_missing_field = edit(BASE, "  width_mm: 16\n", "")
_bolt = edit(BASE, "clamp_bolt: M4", "clamp_bolt: M6")
_tag = edit(BASE, "  kind: bar", "  kind: !!python/object/apply:os.system ['touch pwned']")
_three = edit(edit(_text, "  - kind: chambers", "  - kind: chamber"), "  wall_mm: 5",
              "  wal_mm: 5")
_seventeen = edit(BASE, BASE[BASE.index("voids:"):BASE.index("inlet:")],
                  "voids:\n" + "  - {kind: bore, diameter_mm: 2, length_mm: 30}\n" * 17)

_base60 = edit(BASE, "  length_mm: 70", "  length_mm: 1:10")
_octal = edit(BASE, "  height_mm: 14", "  height_mm: 014")
_e308 = edit(BASE, "  length_mm: 70", "  length_mm: 1e308")
_e400 = edit(BASE, "  length_mm: 70", "  length_mm: 1e400")
_deep = edit(BASE, "name: finger-test", "name: finger-test\ndescription: " + "[" * 40
             + "]" * 40)
_tab = edit(BASE, "  clamp_bolt: M4", "\tclamp_bolt: M4")
_tiny = edit(BASE, "pitch_mm: 8", "pitch_mm: 1.0e-300")
_huge_range = BASE + ("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 1"
                      + "0" * 400 + ", count: 2}\n")
_big_plan = BASE + ("variants:\n  vary:\n    mold.wall_mm: {from: 4, to: 6, count: 1000000}\n"
                    "    mold.flange_mm: {from: 10, to: 20, count: 1000000}\n"
                    "    voids[0].height_mm: {from: 6, to: 8, count: 1000000}\n")
# The finger typed in centimetres; the default 2 mm edge radius is too big for it (the one
# follow-on problem counted, not listed).
_cm = edit(edit(edit(edit(BASE, "  length_mm: 70", "  length_mm: 7"), "  width_mm: 16",
                     "  width_mm: 1.6"), "  height_mm: 14", "  height_mm: 1.4"),
           "  edge_radius_mm: 2\n", "")

TABLE_ALLOWED = "a readable grades file (a regular file in the shipped table's format)"
GRADES = "00-10, 00-30, 00-50, A10, A20, A30, A40"


def _table(name: str) -> str:
    return edit(BASE, "checks:", f"material:\n  grade: my-A15\n  table_file: {name}\nchecks:")


def _grade_named(name: str) -> str:
    return edit(BASE, "checks:", f"material:\n  grade: {name}\nchecks:")


# A grade table of our own (demo scenario): key k is on line 4 + its index.
_OURS = """\
# our measured batch
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


def _grade(old: str, new: str) -> str:
    return edit(_OURS, old, new)


CASES = [
    # YAML 1.1 spec: a plain scalar may not contain ": " in block context.
    _case("yaml-syntax-error", _syntax,
          Expect("", line_of(_syntax, "70: 5"),
                 "YAML syntax error: mapping values are not allowed here (column 16)")),
    _case("empty-file", "", Expect("", None, "recipe is empty")),
    _case("comments-only", "# a recipe for the co-op, to be written\n\n",
          Expect("", None, "recipe is empty")),
    _case("top-level-is-a-list", "- kind: bar\n- kind: rod\n",
          Expect("", 1, "must be a mapping (the recipe's top level)",
                 got="[{'kind': 'bar'}, {'kind': 'rod'}]")),
    # YAML 1.1 spec: mapping keys are unique.
    _case("duplicate-key", _dup,
          Expect("body.width_mm", line_of(_dup, "width_mm: 17"),
                 f"duplicate key 'width_mm' (first at line {line_of(_dup, 'width_mm: 16')})")),
    _case("unknown-key-with-suggestion", _unknown,
          Expect("mold.wal_mm", line_of(_unknown, "wal_mm"),
                 "is not a known key (did you mean 'wall_mm'?)", allowed="wall_mm")),
    _case("text-where-a-number-belongs", _text,
          Expect("body.length_mm", line_of(_text, "seventy"), "must be a number",
                 got="'seventy'", allowed=NUMBER)),
    _case("negative-size", _neg,
          Expect("body.length_mm", line_of(_neg, "-70"), "is out of range", got="-70",
                 allowed=NUMBER)),
    _case("zero-size", _zero,
          Expect("body.height_mm", line_of(_zero, "height_mm: 0"), "is out of range", got="0",
                 allowed=NUMBER)),
    # elementary geometry: chambers 15 high in a 14 high bar stick out 0.5 mm each side.
    _case("void-breaks-through-the-body", _through,
          Expect("voids[0]", line_of(_through, "- kind"), "breaks through the body surface",
                 allowed="voids entirely inside the body")),
    # elementary geometry: (16 - 14.04)/2 = 0.98 mm < checks.min_wall_mm = 1.0 mm.
    _case("wall-below-minimum", _thin,
          Expect("voids[0]", line_of(_thin, "- kind"), "leaves a silicone wall of 0.98 mm",
                 allowed="at least checks.min_wall_mm = 1 mm")),
    _case("unknown-body-kind", _body_kind,
          Expect("body.kind", line_of(_body_kind, "kind: bars"),
                 "is not a known body kind (did you mean 'bar'?)", got="'bars'",
                 allowed=", ".join(body_kinds()))),
    _case("unknown-void-kind", _void_kind,
          Expect("voids[0].kind", line_of(_void_kind, "kind: chamber"),
                 "is not a known void kind (did you mean 'chambers'?)", got="'chamber'",
                 allowed="bore, chambers")),
    # Socket 23 mm above the bar's top face: the socket, the chambers' bare mouth on the
    # inlet face, the lost connection and the parting plane are each wrong.
    _case("inlet-off-the-surface", _far_inlet,
          Expect("inlet.center_mm", line_of(_far_inlet, "center_mm: [0, 30]"),
                 "puts the socket off the flat inlet face (x = 0)", got="[0.0, 30.0]"),
          Expect("inlet", line_of(_far_inlet, "inlet:"), "breaks through the body surface"),
          Expect("voids[0]", line_of(_far_inlet, "- kind"),
                 "breaks through the body surface at (0.00,"),
          Expect("voids[0]", line_of(_far_inlet, "- kind"),
                 "is not reached from the inlet socket"),
          Expect("parting.offset_mm", line_of(_far_inlet, "offset_mm"),
                 "does not pass through the inlet socket axis", got="0.0",
                 allowed="30 mm (the socket centre's z)")),
    # elementary geometry: flat face half-height 12/2 - 2 = 4 mm; 1.5 + 2 + 1 = 4.5 > 4.
    _case("inlet-rim-leaves-the-flat-face", _rim,
          Expect("inlet.center_mm", line_of(_rim, "  center_mm"),
                 "puts the socket off the flat inlet face", got="[0.0, 1.5]")),
    _case("alias-bomb", BOMB,
          Expect("e[1]", line_of(BOMB, "e: &e"), "anchors/aliases expand beyond 20000 nodes")),
    _case("absurd-size", _absurd,
          Expect("body.length_mm", line_of(_absurd, "1000000000.0"), "is out of range",
                 got="1000000000.0", allowed=NUMBER)),
    _case("integer-beyond-any-float", _huge_int,
          Expect("body.length_mm", line_of(_huge_int, "length_mm: 1000"), "is out of range",
                 got="1" + "0" * 400, allowed=NUMBER)),
    _case("missing-file", None, Expect("", None, "recipe file not found")),
    # YAML 1.1 bool (yaml.org/type/bool.html): yes is true, not a number.
    _case("yes-where-a-number-belongs", _yes,
          Expect("body.length_mm", line_of(_yes, "yes"), "must be a number", got="True",
                 allowed=NUMBER)),
    # YAML 1.1 float (yaml.org/type/float.html): .nan is not-a-number.
    _case("nan", _nan,
          Expect("body.length_mm", line_of(_nan, ".nan"), "must be a finite number",
                 got="nan", allowed=NUMBER)),
    _case("list-where-a-mapping-belongs", _list,
          Expect("mold", line_of(_list, "mold:"), "must be a mapping of settings",
                 got="[5, 'M4']")),
    # elementary geometry: 12 chambers span 11 x 8 + 5 = 93 mm > 70 mm; centred, the row
    # would start at x = (70 - 93)/2 = -11.5, so it starts past the socket floor and the
    # least wall instead (6 + 1 = 7) and ends at 7 + 93 = 100, beyond the far end.
    _case("too-many-chambers-for-the-body", _many,
          Expect("voids[0]", line_of(_many, "- kind"),
                 "breaks through the body surface at (100.00,")),
    _case("too-many-void-entries", _seventeen,
          Expect("voids", line_of(_seventeen, "voids:"), "has too many entries", got="17",
                 allowed="at most 16")),
    _case("missing-required-field", _missing_field,
          Expect("body.width_mm", line_of(_missing_field, "body:"), "is required",
                 allowed=NUMBER)),
    _case("unknown-choice", _bolt,
          Expect("mold.clamp_bolt", line_of(_bolt, "M6"), "is not a known value", got="'M6'",
                 allowed="one of M3, M4, M5, none")),
    # YAML 1.1 spec: !!python/... is a language-specific tag a safe loader must refuse.
    _case("python-tag-is-never-run", _tag,
          Expect("body.kind", line_of(_tag, "!!python"),
                 "tag '!!python/object/apply:os.system' is not allowed")),
    _case("not-utf8", b"name: finger\nbody: \xff\n",
          Expect("", 2, "recipe file is not valid UTF-8: byte 0xff at offset 19",
                 allowed="UTF-8 text")),
    _case("three-mistakes-at-once", _three,
          Expect("body.length_mm", line_of(_three, "seventy"), "must be a number"),
          Expect("voids[0].kind", line_of(_three, "kind: chamber"), "is not a known void kind"),
          Expect("mold.wal_mm", line_of(_three, "wal_mm"), "is not a known key")),
    # --- YAML 1.1 number forms (yaml.org/type/int.html, float.html) --------------------
    _case("base-60-number", _base60,
          _exact("body.length_mm", line_of(_base60, "1:10"), "is a base-60 number in YAML "
                 "1.1 (it would read as 70); base-60 numbers are not accepted", "'1:10'",
                 "a decimal number; quote it ('1:10') if it is text")),
    _case("leading-zero-octal", _octal,
          _exact("body.height_mm", line_of(_octal, "014"), "is an octal number in YAML 1.1 "
                 "(a leading 0; it would read as 12); leading zeros are not accepted",
                 "'014'", "a decimal number without leading zeros; quote it ('014') if it "
                 "is text")),
    # YAML 1.2 reads 1e308 as a number (YAML 1.1 as text): it is then refused by its range.
    _case("exponent-form-is-a-number", _e308,
          _exact("body.length_mm", line_of(_e308, "1e308"), "is out of range", "1e+308",
                 NUMBER)),
    # IEEE 754 binary64 ends near 1.8e308: 1e400 is no number a double holds.
    _case("exponent-beyond-any-double", _e400,
          _exact("body.length_mm", line_of(_e400, "1e400"), "is beyond the range of numbers "
                 "(it would read as inf)", "'1e400'",
                 "a magnitude between about 2.2e-308 and 1.8e308, or 0")),
    _case("nesting-too-deep", _deep,
          _exact("", line_of(_deep, "description"), "recipe nests more than 32 levels deep",
                 allowed="at most 32 levels of lists and mappings")),
    # YAML 1.1 spec 4.2.2: tabs are not allowed in indentation.
    _case("tab-in-indentation", _tab,
          _exact("", line_of(_tab, "\tclamp_bolt"), "YAML syntax error: a tab in the "
                 "indentation (column 1); indent with spaces")),
    # --- a grades table the recipe names gets the recipe's guards ----------------------
    _case("table-file-is-a-device", _table("/dev/zero"),
          _exact("material.table_file", line_of(_table("/dev/zero"), "table_file"),
                 "cannot be read: grades table path is a character device, not a regular "
                 "file", "'/dev/zero'", TABLE_ALLOWED)),
    _case("table-file-is-a-fifo", _table("grades.fifo"),
          _exact("material.table_file", line_of(_table("x"), "table_file"),
                 "cannot be read: grades table path is a named pipe (FIFO), not a regular "
                 "file", "'grades.fifo'", TABLE_ALLOWED),
          files=(("grades.fifo", FIFO),)),
    _case("table-file-too-big", _table("big.yaml"),
          _exact("material.table_file", line_of(_table("x"), "table_file"),
                 "cannot be read: grades table file is 314572800 bytes", "'big.yaml'",
                 "at most 262144 bytes"),
          files=(("big.yaml", SPARSE_300MB),)),
    _case("table-file-alias-bomb", _table("bomb.yaml"),
          _exact("grades.e[1]", 6, "anchors/aliases expand beyond 20000 nodes",
                 file="bomb.yaml"),
          files=(("bomb.yaml", "grades:\n" + BOMB.replace("\n", "\n  ").replace("a: &a",
                                                                                "  a: &a", 1)
                  .rstrip(" ")),)),
    _case("table-file-nested-too-deep", _table("deep.yaml"),
          _exact("", 1, "grades table nests more than 32 levels deep",
                 allowed="at most 32 levels of lists and mappings", file="deep.yaml"),
          files=(("deep.yaml", "grades: " + "[" * 10_000 + "]" * 10_000 + "\n"),)),
    _case("table-density-infinite", _table("ours.yaml"),
          _exact("grades.my-A15.density_g_cm3", 7, "must be a finite number", "inf",
                 "a number, 0.5 < value <= 3 g/cm3", file="ours.yaml"),
          files=(("ours.yaml", _grade("density_g_cm3: 1.075", "density_g_cm3: .inf")),)),
    _case("table-modulus-nan", _table("ours.yaml"),
          _exact("grades.my-A15.modulus_mpa", 14, "must be a finite number", "nan",
                 "a number, 0.005 < value <= 50 MPa", file="ours.yaml"),
          files=(("ours.yaml", _grade("modulus_mpa: 0.55", "modulus_mpa: .nan")),)),
    _case("table-modulus-negative", _table("ours.yaml"),
          _exact("grades.my-A15.modulus_mpa", 14, "is out of range", "-5",
                 "a number, 0.005 < value <= 50 MPa", file="ours.yaml"),
          files=(("ours.yaml", _grade("modulus_mpa: 0.55", "modulus_mpa: -5")),)),
    _case("table-mix-ratio-as-text", _table("ours.yaml"),
          _exact("grades.my-A15.mix_ratio", 10, "must be a list of two numbers", "'12'",
                 "a list of two numbers, 0 < each value <= 1000", file="ours.yaml"),
          files=(("ours.yaml", _grade("mix_ratio: [1, 1]", "mix_ratio: '12'")),)),
    _case("table-pot-life-zero", _table("ours.yaml"),
          _exact("grades.my-A15.pot_life_min", 12, "is out of range", "0",
                 "a number, 0 < value <= 1440 min", file="ours.yaml"),
          files=(("ours.yaml", _grade("pot_life_min: 30", "pot_life_min: 0")),)),
    # --- what the person meant ---------------------------------------------------------
    _case("grade-written-with-shore", _grade_named('"Shore A10"'),
          _exact("material.grade", line_of(_grade_named("x"), "grade:"),
                 "is not a grade of the table (did you mean 'A10'?)", "'Shore A10'",
                 GRADES)),
    _case("grade-between-two-grades", _grade_named("A15"),
          _exact("material.grade", line_of(_grade_named("x"), "grade:"),
                 "is not a grade of the table (did you mean 'A10'? For Shore A15 blend two "
                 "grades: grade: A10, blend_with: A20, target_shore_a: 15)", "'A15'", GRADES)),
    _case("recipe-in-centimetres", _cm,
          _exact("body", line_of(_cm, "body:"), "is only 7 x 1.6 x 1.4 mm: every length in a "
                 "recipe is in millimetres (written in centimetres? multiply each length by "
                 "10); 1 follow-on problem of so small a body not listed", None,
                 "a body at least 5 mm across (room for a tube socket and its silicone "
                 "walls)")),
    _case("length-too-small-to-make", _tiny,
          _exact("voids[0].pitch_mm", line_of(_tiny, "pitch_mm"), "is out of range", "1e-300",
                 NUMBER)),
    # --- variant families ----------------------------------------------------------------
    _case("range-end-beyond-any-double", _huge_range,
          _exact("variants.vary.mold.wall_mm.to", line_of(_huge_range, "from: 4"),
                 "is beyond the range of numbers", "1" + "0" * 400,
                 "a finite number of magnitude below about 1.8e308")),
    _case("plan-too-big", _big_plan,
          _exact("variants.vary", line_of(_big_plan, "vary:"),
                 "would make 1000000000000000000 variants", None,
                 "at most variants.max_variants = 10000 (raise it to allow more)")),
]


def _write(path: Path, content: str | bytes) -> None:
    if content is FIFO:
        os.mkfifo(path)
    elif content is SPARSE_300MB:
        with open(path, "wb") as fh:
            fh.truncate(300 * 1024 * 1024)
    elif isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content, encoding="utf-8")


def write_case(case: Case, directory: Path, name: str = "recipe.yaml") -> Path:
    path = directory / name
    if case.text is not None:
        _write(path, case.text)
    for other, content in case.files:
        _write(directory / other, content)
    return path


def test_at_least_fifteen_distinct_bad_inputs_are_covered():
    assert len({c.name for c in CASES}) == len(CASES) >= 15


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_bad_recipe_exits_2_with_one_located_line_per_problem_and_writes_nothing(
        case, tmp_path, capsys, monkeypatch, no_cad_work):
    monkeypatch.chdir(tmp_path)  # anything written relative to the cwd would show here
    path = write_case(case, tmp_path)
    out = tmp_path / "out"
    status = main(["build", str(path), "--out", str(out)])
    cap = capsys.readouterr()
    assert status == 2
    assert cap.out == ""
    assert_reported(cap.err, str(path), case.expect)
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(
        ([] if case.text is None else ["recipe.yaml"]) + [name for name, _ in case.files])


def test_directory_instead_of_a_recipe_is_refused(tmp_path, capsys):
    out = tmp_path / "out"
    assert main(["build", str(tmp_path), "--out", str(out)]) == 2
    assert_reported(capsys.readouterr().err, str(tmp_path),
                    (Expect("", None, "recipe path is a directory, not a file"),))
    assert not out.exists()


def test_check_of_a_folder_without_recipes_is_bad_input(tmp_path, capsys):
    empty = tmp_path / "drafts"
    empty.mkdir()
    (empty / "notes.txt").write_text("ideas for the next finger\n")
    assert main(["check", str(empty)]) == 2
    cap = capsys.readouterr()
    assert cap.out == ""
    assert cap.err.splitlines() == [f"error: {empty}: folder holds no recipe file (*.yaml)"]


def test_check_of_an_empty_folder_beside_a_bad_recipe_reports_both(tmp_path, capsys):
    empty = tmp_path / "drafts"
    empty.mkdir()
    bad = write_case(next(c for c in CASES if c.name == "negative-size"), tmp_path)
    assert main(["check", str(empty), str(bad)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert err[0] == f"error: {empty}: folder holds no recipe file (*.yaml)"
    assert err[1].startswith(f"error: {bad}:")


@pytest.mark.parametrize("out", ["taken", "taken/sub/dir"], ids=["a-file", "under-a-file"])
def test_build_refuses_an_output_folder_it_cannot_write_before_building(
        out, tmp_path, capsys, monkeypatch):
    # Exit 1, as when writing fails after a build (tests/cli/test_commands.py).
    import soft_molds.pipeline as pipeline

    calls = []
    monkeypatch.setattr(pipeline, "build", lambda r: calls.append(r))
    monkeypatch.chdir(tmp_path)
    (tmp_path / "taken").write_text("a file where the output folder should go\n")
    before = sorted(p.name for p in tmp_path.iterdir())
    assert main(["build", str(GOOD), "--out", out]) == 1
    cap = capsys.readouterr()
    assert calls == []  # refused before any building
    assert cap.out == ""
    assert cap.err.splitlines() == [f"error: cannot write under {out}: taken is not a folder; "
                                    "nothing built"]
    assert sorted(p.name for p in tmp_path.iterdir()) == before


def test_the_write_probe_leaves_nothing_behind(tmp_path):
    from soft_molds.export.files import probe_writable

    assert probe_writable(tmp_path / "out" / "deeper") is None
    assert list(tmp_path.iterdir()) == []  # neither the folder nor the probe file
    (tmp_path / "out").mkdir()
    assert probe_writable(tmp_path / "out") is None
    assert list((tmp_path / "out").iterdir()) == []


def test_check_prints_validation_progress_for_a_large_family(tmp_path, capsys, monkeypatch):
    import soft_molds.cli as cli
    import soft_molds.pipeline as pipeline

    # The threshold is lowered so that the 5-variant family counts as large here.
    monkeypatch.setattr(cli, "PROGRESS_ABOVE", 3)
    monkeypatch.setattr(pipeline, "build", lambda r: (_ for _ in ()).throw(
        SoftMoldsError("not built in this test")))
    family = ROOT / "recipes" / "finger-family.yaml"
    assert main(["check", str(family)]) == 1
    err = capsys.readouterr().err.splitlines()
    # one line at the start, then one per tenth: with 5 variants, after each of them
    assert err == [f"{family}: validating 5 variants"] + [
        f"{family}: validated {k} of 5 variants ({20 * k} %)" for k in range(1, 6)]


def test_check_of_a_small_family_prints_no_progress(tmp_path, capsys, monkeypatch):
    import soft_molds.pipeline as pipeline

    monkeypatch.setattr(pipeline, "build", lambda r: (_ for _ in ()).throw(
        SoftMoldsError("not built in this test")))
    assert main(["check", str(ROOT / "recipes" / "finger-family.yaml")]) == 1
    assert capsys.readouterr().err == ""


# --- real processes -------------------------------------------------------------------

CHECK_SCRIPT = """\
import sys
from soft_molds.cli import main
from soft_molds.errors import SoftMoldsError
from soft_molds.recipe.registry import body_kinds
status = main(["check", sys.argv[1], sys.argv[2]])
print("status", status, "cadquery" in sys.modules, "OCP" in sys.modules)
"""

SUBPROCESS_CASES = ("yaml-syntax-error", "alias-bomb", "missing-file")


class Runs:
    """Subprocesses started together; each result is collected on first use."""

    def __init__(self) -> None:
        self.started: dict[str, tuple[subprocess.Popen, Path]] = {}
        self.done: dict[str, tuple[subprocess.CompletedProcess, Path]] = {}

    def start(self, name: str, cmd: list[str], where: Path) -> None:
        env = {**os.environ, "PYTHONPATH": str(ROOT)}
        self.started[name] = (subprocess.Popen(cmd, cwd=where, env=env,
                                               stdout=subprocess.PIPE,
                                               stderr=subprocess.PIPE, text=True), where)

    def get(self, name: str) -> tuple[subprocess.CompletedProcess, Path]:
        if name not in self.done:
            proc, where = self.started[name]
            stdout, stderr = proc.communicate(timeout=120)
            self.done[name] = (subprocess.CompletedProcess(proc.args, proc.returncode,
                                                           stdout, stderr), where)
        return self.done[name]

    def close(self) -> None:
        for proc, _ in self.started.values():
            if proc.poll() is None:
                proc.kill()
                proc.communicate()


@pytest.fixture(scope="module", autouse=True)
def processes(tmp_path_factory):
    """Every subprocess of this module, started with its first test: each imports the
    package afresh (seconds), which then overlaps the in-process tests."""
    runs = Runs()
    for name in SUBPROCESS_CASES:
        where = tmp_path_factory.mktemp(name)
        write_case(next(c for c in CASES if c.name == name), where)
        runs.start(name, [sys.executable, "-m", "soft_molds", "build", "recipe.yaml",
                          "--out", "out"], where)
    where = tmp_path_factory.mktemp("check")
    bad = write_case(next(c for c in CASES if c.name == "unknown-key-with-suggestion"), where)
    runs.start("check", [sys.executable, "-c", CHECK_SCRIPT, str(GOOD), str(bad)], where)
    yield runs
    runs.close()


@pytest.mark.parametrize("name", SUBPROCESS_CASES)
def test_bad_recipe_in_a_real_process_exits_2_without_traceback(processes, name):
    run, where = processes.get(name)
    case = next(c for c in CASES if c.name == name)
    assert run.returncode == 2
    assert run.stdout == ""
    assert_reported(run.stderr, "recipe.yaml", case.expect)
    assert not (where / "out").exists()


def test_check_with_one_bad_recipe_exits_2_before_the_kernel_is_imported(processes):
    run, where = processes.get("check")
    assert run.returncode == 0, run.stderr  # the script itself ran to its end
    assert run.stdout.splitlines() == ["status 2 False False"]
    assert_reported(run.stderr, str(where / "recipe.yaml"), CASES[
        [c.name for c in CASES].index("unknown-key-with-suggestion")].expect)


def test_check_reports_bad_input_without_building_the_good_recipe(tmp_path, capsys,
                                                                  monkeypatch):
    import soft_molds.pipeline as pipeline

    calls = []
    monkeypatch.setattr(pipeline, "build", lambda r: calls.append(r))
    bad = write_case(next(c for c in CASES if c.name == "negative-size"), tmp_path)
    assert main(["check", str(GOOD), str(bad)]) == 2
    cap = capsys.readouterr()
    assert calls == []
    assert cap.out == ""
    assert_reported(cap.err, str(bad), CASES[[c.name for c in CASES].index("negative-size")]
                    .expect)


# --- help -------------------------------------------------------------------------------


@pytest.mark.parametrize("argv, words", [
    (["--help"], ["build", "check", "--version"]),
    (["build", "--help"], ["RECIPE", "--out", "DIR"]),
    (["check", "--help"], ["RECIPE", "Exit 1", "2 on bad input"]),
])
def test_help_exits_0_and_names_the_arguments(argv, words, capsys):
    with pytest.raises(SystemExit) as exc:
        main(argv)
    assert exc.value.code == 0
    out = " ".join(capsys.readouterr().out.split())  # argparse wraps to the terminal width
    assert out.startswith("usage: soft-molds")
    for w in words:
        assert w in out


@pytest.mark.parametrize("argv", [["build"], ["check"], ["melt", "x.yaml"], []])
def test_usage_mistakes_exit_2_with_usage_not_traceback(argv, capsys):
    with pytest.raises(SystemExit) as exc:
        main(argv)
    assert exc.value.code == 2
    err = capsys.readouterr().err
    assert err.startswith("usage: soft-molds")
    assert "Traceback" not in err


def test_sweep_refuses_an_output_folder_it_cannot_write_before_building(tmp_path, capsys,
                                                                        monkeypatch):
    import soft_molds.sweep as sweep

    calls = []
    monkeypatch.setattr(sweep, "run_sweep", lambda *a, **k: calls.append(a))
    monkeypatch.chdir(tmp_path)
    (tmp_path / "taken").write_text("a file where the output folder should go\n")
    assert main(["sweep", str(GOOD), "--out", "taken/out", "--jobs", "1"]) == 1
    cap = capsys.readouterr()
    assert calls == []
    assert cap.err.splitlines() == ["error: cannot write under taken/out: taken is not a "
                                    "folder; nothing built"]
