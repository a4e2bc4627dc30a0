"""Tests for the safe, line-aware recipe reader.

The independent reference for "what the data is" is PyYAML's own ``yaml.safe_load``; the
reference for scalar typing is the YAML 1.1 type repository (yaml.org/type/*.html).
Line numbers are asserted against documents written here, where they are known by
construction.
"""

from __future__ import annotations

import codecs
import math
import os

import pytest
import yaml

from soft_molds.errors import RecipeError
from soft_molds.recipe import yamlsource
from soft_molds.recipe.yamlsource import (
    MAX_DEPTH,
    MAX_EXPANDED_NODES,
    MAX_RECIPE_BYTES,
    Node,
    UnreadableFile,
    parse_recipe_text,
    read_recipe_file,
    read_yaml_file,
)

# Demo recipe from our own scenario: a greenhouse co-op's seedling-transplanting gripper.
# Field names are illustrative only; this layer does not know the schema.
GRIPPER = """\
# seedling gripper finger, cast in platinum-cure silicone, Shore A10
name: seedling-finger
mold:
  wall_mm: 3.0
  draft_deg: 1.0
  vents: [2.0, 2.0]
chambers: &ch
  count: 8
  pitch_mm: 6.5
voids:
  - shape: box
    pitch_mm: 6.5
  - shape: channel
    depth_mm: 2
notes: |
  fill from the bottom
spare:
  <<: *ch
  count: 4
inlet: null
flat: yes
"""


def _problems(excinfo: pytest.ExceptionInfo[RecipeError]) -> list[tuple]:
    return [(p.path, p.message, p.line) for p in excinfo.value.problems]


def test_nested_values_and_list_items_carry_their_source_lines():
    root = parse_recipe_text(GRIPPER)
    assert root.line == 2  # the comment on line 1 holds no value
    mold = root.value["mold"]
    assert mold.line == 4  # a block mapping starts at its first key, under "mold:"
    assert mold.value["wall_mm"].line == 4
    assert mold.value["draft_deg"].line == 5
    vents = mold.value["vents"]
    assert (vents.line, [v.line for v in vents.value]) == (6, [6, 6])
    voids = root.value["voids"].value
    assert [v.line for v in voids] == [11, 13]
    assert voids[1].value["depth_mm"].line == 14
    assert root.value["notes"].line == 15  # a block scalar starts at its indicator


def test_mapping_values_record_the_line_of_their_key():
    root = parse_recipe_text(GRIPPER)
    assert root.key_line is None
    assert root.value["mold"].key_line == 3  # value starts on 4, the key is on 3
    assert root.value["voids"].key_line == 10
    assert root.value["mold"].value["wall_mm"].key_line == 4
    assert root.value["voids"].value[0].key_line is None  # list items have no key
    empty = parse_recipe_text("a:\nb: 1\n").value["a"]
    assert (empty.value, empty.line, empty.key_line) == (None, 1, 1)


def test_duplicate_keys_top_level_and_nested_are_all_reported_with_both_lines():
    text = "mold:\n  wall_mm: 3\n  draft_deg: 1\n  wall_mm: 4\nname: a\nname: b\n"
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text)
    assert _problems(excinfo) == [
        ("mold.wall_mm", "duplicate key 'wall_mm' (first at line 2)", 4),
        ("name", "duplicate key 'name' (first at line 5)", 6),
    ]
    # yaml.safe_load silently keeps the last value: the reason this check exists.
    assert yaml.safe_load(text)["mold"]["wall_mm"] == 4


def test_duplicate_key_inside_list_item_uses_bracket_path():
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("voids:\n  - a: 1\n  - pitch_mm: 2\n    pitch_mm: 3\n")
    assert _problems(excinfo) == [
        ("voids[1].pitch_mm", "duplicate key 'pitch_mm' (first at line 3)", 4)]


def _billion_laughs(levels: int = 9, fan: int = 9) -> str:
    # "Billion laughs": nested anchors that each repeat the previous one -- a well-known
    # entity-expansion attack pattern (common practice).
    lines = ["l0: &l0 [" + ", ".join(['"lol"'] * fan) + "]"]
    for i in range(1, levels + 1):
        lines.append(f"l{i}: &l{i} [" + ", ".join([f"*l{i - 1}"] * fan) + "]")
    return "\n".join(lines) + "\n"


def test_billion_laughs_is_refused_quickly_at_the_alias_line():
    text = _billion_laughs()  # 9 levels x 9 aliases: 9**10 strings if expanded
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text)
    # Nodes per level when expanded: 10, 91, 820, 7381 (1 + 9 * previous), so the
    # 20000 bound is crossed inside the second alias on line 5 (l4).
    assert _problems(excinfo) == [
        ("l4[1]", f"anchors/aliases expand beyond {MAX_EXPANDED_NODES} nodes", 5)]


def test_small_legitimate_alias_and_merge_key_are_accepted():
    root = parse_recipe_text(GRIPPER)
    assert root.plain()["spare"] == {"count": 4, "pitch_mm": 6.5}  # explicit key wins
    assert root.value["spare"].value["pitch_mm"].line == 9  # merged value keeps its line
    alias = parse_recipe_text("a: &x [1, 2]\nb: *x\n").value["b"]
    assert (alias.plain(), alias.line, [n.line for n in alias.value]) == ([1, 2], 2, [1, 1])


def test_recursive_alias_is_refused():
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("a: &x\n  - 1\n  - *x\n")
    assert _problems(excinfo) == [
        ("a[1]", "alias '*x' is used inside its own anchor (recursive alias)", 3)]


def test_syntax_error_reports_yaml_line_and_column():
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("name: a\nmold:\n  wall_mm: 3\n draft_deg: 1\n", source="r.yaml")
    (problem,) = excinfo.value.problems
    assert problem.line == 4
    assert problem.message.startswith("YAML syntax error: ")
    assert problem.message.endswith("(column 2)")  # where yaml's problem_mark points
    assert excinfo.value.source == "r.yaml"


@pytest.mark.parametrize("text", ["", "   \n\t\n", "# a comment\n\t# another\n", "---\n", "\ufeff"])
def test_empty_whitespace_or_comment_only_recipe_is_empty(text):
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text)
    assert _problems(excinfo) == [("", "recipe is empty", None)]


def test_several_documents_are_refused():
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("name: a\n---\nname: b\n")
    (problem,) = excinfo.value.problems
    assert (problem.line, problem.allowed) == (2, "a single document")
    assert "more than one YAML document" in problem.message


@pytest.mark.parametrize(("tagged", "line"), [
    ("a: !!python/object/apply:os.system ['touch {marker}']\n", 1),
    ("a: !!python/name:os.system\n", 1),
    ("a: !!python/object/new:os.system\n  args: ['touch {marker}']\n", 1),
    ("a: 1\nb:\n  c: !custom 3\n", 3),
])
def test_python_and_unknown_tags_are_refused_and_never_run(tagged, line, tmp_path):
    marker = tmp_path / "ran"
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(tagged.format(marker=marker))
    (problem,) = excinfo.value.problems
    assert problem.message.startswith("tag '!")
    assert problem.message.endswith("' is not allowed")
    assert problem.line == line
    assert not marker.exists()


def test_non_text_keys_are_refused_with_their_line():
    # YAML 1.1 reads unquoted on/1 as bool/int (yaml.org/type/bool.html, int.html).
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("mold:\n  on: 1\n  2: x\n  [a]: 3\n")
    got = [(p.path, p.message, p.line, p.value) for p in excinfo.value.problems]
    assert got == [
        ("mold", "mapping key must be text", 2, True),
        ("mold", "mapping key must be text", 3, 2),
        ("mold", "mapping key must be text", 4, "a list"),
    ]


def test_scalars_keep_yaml_1_1_safe_typing():
    text = "a: yes\nb: 0x1F\nc: 1_000\nd: 0\ne: .inf\nf: ~\ng: 1.5e+3\nh: .5\ni: .NaN\n"
    got = parse_recipe_text(text).plain()
    # Values from the YAML 1.1 type repository (yaml.org/type/bool.html, int.html
    # [hex, underscores], float.html, null.html); PyYAML's safe_load is the second,
    # independent reader.
    expected = {"a": True, "b": 31, "c": 1000, "d": 0, "e": math.inf, "f": None,
                "g": 1500.0, "h": 0.5}
    assert {k: v for k, v in got.items() if k != "i"} == expected
    assert math.isnan(got["i"])
    reference = yaml.safe_load(text)
    assert math.isnan(reference.pop("i"))
    assert reference == expected


@pytest.mark.parametrize("literal, safe_load_reads, kind", [
    ("1:00", 60, "a base-60 number in YAML 1.1 (it would read as 60)"),
    ("1:30.5", 90.5, "a base-60 number in YAML 1.1 (it would read as 90.5)"),
    ("-2:00", -120, "a base-60 number in YAML 1.1 (it would read as -120)"),
    ("017", 15, "an octal number in YAML 1.1 (a leading 0; it would read as 15)"),
    ("00", 0, "an octal number in YAML 1.1 (a leading 0; it would read as 0)"),
], ids=["1:00", "1:30.5", "-2:00", "017", "00"])
def test_misleading_yaml_1_1_numbers_are_refused_with_what_they_would_mean(
        literal, safe_load_reads, kind):
    # yaml.org/type/int.html and float.html: base 60 ("sexagesimal") and 0-prefixed octal;
    # safe_load is the independent reader of what YAML 1.1 makes of them.
    text = f"body:\n  length_mm: {literal}\n"
    assert yaml.safe_load(text)["body"]["length_mm"] == safe_load_reads
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text, "r.yaml")
    (p,) = excinfo.value.problems
    assert (p.path, p.line, p.value) == ("body.length_mm", 2, literal)
    assert p.message.startswith(f"is {kind}")
    assert f"quote it ('{literal}') if it is text" in p.allowed


def test_quoted_base_60_and_octal_forms_stay_text():
    got = parse_recipe_text("a: '1:00'\nb: \"017\"\nc: !!str 1:00\nd: 10:30 am\n").plain()
    assert got == {"a": "1:00", "b": "017", "c": "1:00", "d": "10:30 am"}


@pytest.mark.parametrize("literal, value", [
    ("1e3", 1000.0), ("1E3", 1000.0), ("2.5e-3", 0.0025), ("-4e2", -400.0), (".5e1", 5.0),
    ("1e308", 1e308), ("1_0e1", 100.0),
])
def test_exponent_forms_are_numbers_as_in_yaml_1_2(literal, value):
    # YAML 1.1 needs a dot and a signed exponent (safe_load keeps "1e3" as text); the
    # YAML 1.2 core schema (yaml.org/spec/1.2.2, 10.3.2) reads these as floats, and so
    # does Python's float() (the independent reference for the value).
    got = parse_recipe_text(f"a: {literal}\n").plain()["a"]
    assert got == value == float(literal.replace("_", ""))
    assert isinstance(got, float)


@pytest.mark.parametrize("literal", ["1e400", "-1.0e+999", "1e-400", "0.0001e-330"])
def test_numbers_a_double_cannot_hold_are_refused_not_made_infinite_or_zero(literal):
    # IEEE 754 binary64: largest finite ~1.798e308, smallest subnormal ~4.9e-324.
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(f"x: 1\nmold:\n  wall_mm: {literal}\n", "r.yaml")
    (p,) = excinfo.value.problems
    assert (p.path, p.line, p.value) == ("mold.wall_mm", 3, literal)
    assert p.message.startswith("is beyond the range of numbers")


def test_zero_written_as_an_exponent_form_is_zero():
    assert parse_recipe_text("a: 0e5\nb: 0.0e-400\n").plain() == {"a": 0.0, "b": 0.0}


def test_dates_stay_text_unlike_safe_load():
    # Deliberate: a recipe holds no datetime values, and text hashes stably.
    assert parse_recipe_text("cast_on: 2024-05-01\n").plain() == {"cast_on": "2024-05-01"}
    assert yaml.safe_load("cast_on: 2024-05-01\n")["cast_on"].isoformat() == "2024-05-01"


def test_plain_round_trip_equals_safe_load():
    assert parse_recipe_text(GRIPPER).plain() == yaml.safe_load(GRIPPER)


def test_too_many_values_without_aliases_are_refused():
    text = "v: [" + ", ".join(["1"] * MAX_EXPANDED_NODES) + "]\n"
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text)
    assert _problems(excinfo) == [
        ("v[19998]", f"recipe has more than {MAX_EXPANDED_NODES} values", 1)]


def test_control_character_is_refused_with_its_line():
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("a: 1\nb: x\x07y\n")
    assert _problems(excinfo) == [
        ("", "recipe holds a character YAML does not accept (#x0007)", 2)]


def test_file_is_read_with_the_path_as_label(tmp_path):
    path = tmp_path / "finger.yaml"
    path.write_text(GRIPPER, encoding="utf-8")
    root, label = read_recipe_file(path)
    assert label == str(path)
    assert root.plain() == yaml.safe_load(GRIPPER)
    path.write_text("a: 1\na: 2\n", encoding="utf-8")
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(str(path))
    assert excinfo.value.source == str(path)


def test_oversize_file_is_refused_without_reading_it(tmp_path, monkeypatch):
    path = tmp_path / "big.yaml"
    path.write_bytes(b"#" * (MAX_RECIPE_BYTES + 1))

    def no_open(*args, **kwargs):
        raise AssertionError("the oversize file was opened")

    monkeypatch.setattr(yamlsource, "open", no_open, raising=False)
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(path)
    (problem,) = excinfo.value.problems
    assert problem.format("big.yaml") == (
        "big.yaml: recipe file is 262145 bytes; allowed: at most 262144 bytes")


def test_file_of_exactly_the_limit_is_read(tmp_path):
    path = tmp_path / "edge.yaml"
    path.write_bytes(b"a: 1\n" + b"#" * (MAX_RECIPE_BYTES - 5))
    assert read_recipe_file(path)[0].plain() == {"a": 1}


def test_missing_file_is_reported_with_its_path(tmp_path):
    missing = tmp_path / "nope.yaml"
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(missing)
    (problem,) = excinfo.value.problems
    assert (problem.message, problem.value) == ("recipe file not found", str(missing))


def test_directory_is_refused(tmp_path):
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(tmp_path)
    (problem,) = excinfo.value.problems
    assert (problem.message, problem.value) == (
        "recipe path is a directory, not a file", str(tmp_path))


def test_invalid_utf8_names_the_byte_offset_and_line(tmp_path):
    path = tmp_path / "latin1.yaml"
    path.write_bytes(b"name: a\nnote: caf\xe9\n")  # 0xE9 is Latin-1, not UTF-8
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(path)
    (problem,) = excinfo.value.problems
    assert problem.message == "recipe file is not valid UTF-8: byte 0xe9 at offset 17"
    assert problem.line == 2


def test_leading_bom_is_accepted_and_lines_unchanged(tmp_path):
    path = tmp_path / "bom.yaml"
    path.write_bytes(codecs.BOM_UTF8 + b"name: a\nmold:\n  wall_mm: 3\n")
    root, _ = read_recipe_file(path)
    assert root.plain() == {"name": "a", "mold": {"wall_mm": 3}}
    assert root.value["mold"].value["wall_mm"].line == 3
    path.write_bytes(codecs.BOM_UTF8 + b"a: 1\nb: \xff\n")
    with pytest.raises(RecipeError) as excinfo:
        read_recipe_file(path)
    assert "at offset 11" in excinfo.value.problems[0].message  # offset counts the BOM


def test_node_is_an_immutable_value():
    node = Node(3, 1)
    with pytest.raises(AttributeError):
        node.line = 2  # type: ignore[misc]
    assert node == Node(3, 1, None)


def test_aliases_that_nest_too_deeply_are_refused_with_the_alias_line():
    # Each anchor nests the previous one 20 lists deeper: each line is within the limit,
    # but a2 reaches 2 + 20 * 3 levels through its aliases.
    lines = ["a0: &a0 " + "[" * 20 + "1" + "]" * 20]
    lines += [f"a{i}: &a{i} " + "[" * 20 + f"*a{i - 1}" + "]" * 20 for i in range(1, 6)]
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text("\n".join(lines) + "\n")
    assert _problems(excinfo) == [
        ("a1" + "[0]" * 20, f"recipe nests more than {MAX_DEPTH} levels deep (through aliases)",
         2)]


def test_ten_thousand_nested_brackets_are_refused_at_their_line_without_recursing():
    # Speed is a benchmark's business (machines are noisy); this proves the refusal is a
    # RecipeError at the line, not Python's RecursionError from a recursive reader.
    text = "name: x\nbody: " + "[" * 10_000 + "]" * 10_000 + "\n"
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text)
    assert _problems(excinfo) == [("", f"recipe nests more than {MAX_DEPTH} levels deep", 2)]
    assert excinfo.value.problems[0].allowed == f"at most {MAX_DEPTH} levels of lists and mappings"


def test_nesting_up_to_the_limit_is_read():
    depth = MAX_DEPTH - 1  # the top-level mapping is the first level
    node = parse_recipe_text("a: " + "[" * depth + "1" + "]" * depth + "\n")
    v = node.plain()["a"]
    for _ in range(depth):
        (v,) = v
    assert v == 1


@pytest.mark.parametrize("text, line, column, message", [
    ("name: a\nmold:\n\twall_mm: 5\n", 3, 1, "a tab in the indentation (column 1); indent "
     "with spaces"),
    ("mold:\n  wall_mm: 5\n  \tflange_mm: 12\n", 3, 3, "a tab in the indentation (column 3); "
     "indent with spaces"),
    ("mold:\n  wall_mm: 5\t# thick\n", 2, 13, "a tab character (column 13); YAML separates "
     "with spaces here"),
], ids=["tab-indent", "spaces-then-tab", "tab-before-comment"])
def test_a_tab_is_explained_with_its_line_not_the_parsers_words(text, line, column, message):
    # YAML 1.1 spec 4.2.2: tabs are never allowed in indentation.
    with pytest.raises(RecipeError) as excinfo:
        parse_recipe_text(text, "r.yaml")
    assert _problems(excinfo) == [("", f"YAML syntax error: {message}", line)]


@pytest.mark.parametrize("kind", ["fifo", "device"])
def test_special_files_are_refused_before_they_are_read(tmp_path, kind):
    # A FIFO blocks a reader until a writer comes; /dev/zero never ends.
    if kind == "fifo":
        path = tmp_path / "recipe.yaml"
        os.mkfifo(path)
        what = "a named pipe (FIFO)"
    else:
        path, what = "/dev/zero", "a character device"
    with pytest.raises(UnreadableFile) as excinfo:
        read_yaml_file(path, "grades table")
    (p,) = excinfo.value.problems
    assert (p.message, p.value, p.line) == (
        f"grades table path is {what}, not a regular file", str(path), None)


def test_a_file_problem_prints_with_its_own_file():
    from soft_molds.errors import Problem
    from soft_molds.recipe.yamlsource import FileProblem

    p = FileProblem("grades.x.hardness", "is out of range", 4, 120, "1 <= value <= 99",
                    file="ours.yaml")
    err = RecipeError([Problem("body", "is required", 2), p], "recipe.yaml")
    assert err.lines() == [
        "recipe.yaml:2: body: is required",
        "ours.yaml:4: grades.x.hardness: is out of range (got 120); allowed: 1 <= value <= 99"]
