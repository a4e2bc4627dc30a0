"""The recipe's JSON Schema, checked by an independent implementation of the standard:
the ``jsonschema`` package (JSON Schema draft 2020-12, json-schema.org).

Every bundled recipe meets it, and recipes the loader refuses for a value of the wrong
type or out of range are refused by it too: the schema is generated from the same field
declarations, so a bound changed in one place moves in the other."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds.cli import main
from soft_molds.errors import RecipeError
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.json_schema import recipe_schema, schema_text
from soft_molds.recipe.yamlsource import parse_recipe_text

ROOT = Path(__file__).resolve().parents[2]
BUNDLED = sorted((ROOT / "recipes").glob("*.yaml"))
HINT = "# yaml-language-server: $schema=recipe.schema.json"


@pytest.fixture(scope="module")
def validator():
    schema = recipe_schema()
    jsonschema.Draft202012Validator.check_schema(schema)  # a well-formed schema
    return jsonschema.Draft202012Validator(schema)


def as_data(text: str) -> object:
    # The recipe's own YAML reading (its YAML 1.1 exceptions included), as plain data.
    return parse_recipe_text(text).plain()


@pytest.mark.parametrize("path", BUNDLED, ids=[p.stem for p in BUNDLED])
def test_every_bundled_recipe_meets_the_schema(validator, path):
    errors = [e.message for e in validator.iter_errors(as_data(path.read_text()))]
    assert errors == []


@pytest.mark.parametrize("path", BUNDLED, ids=[p.stem for p in BUNDLED])
def test_every_bundled_recipe_points_its_editor_at_the_schema(path):
    first = path.read_text().splitlines()[0]
    assert first == HINT
    target = path.parent / first.split("$schema=", 1)[1]
    assert json.loads(target.read_text()) == recipe_schema()


def test_the_shipped_schema_file_is_the_generated_text():
    assert (ROOT / "recipes" / "recipe.schema.json").read_text() == schema_text()


def test_soft_molds_schema_prints_it(capsys):
    assert main(["schema"]) == 0
    assert json.loads(capsys.readouterr().out) == recipe_schema()


# (old text, new text, what is wrong) on the test finger
REFUSED = [
    ("length_mm: 70", "length_mm: -5", "negative size"),
    ("length_mm: 70", "length_mm: seventy", "text for a number"),
    ("length_mm: 70", "length_mm: 2000", "beyond the largest size"),
    ("length_mm: 70", "length_mm: 0.01", "below the smallest size"),
    ("count: 3", "count: 2.5", "fraction for a whole number"),
    ("count: 3", "count: 0", "whole number below its range"),
    ("count: 3", "count: true", "yes/no for a whole number"),
    ("clamp_bolt: M4", "clamp_bolt: M7", "not a listed bolt"),
    ("axis: z", "axis: x", "not a listed axis"),
    ("wall_mm: 5", "wall_mm: 3.9", "wall under its lower bound"),
    ("center_mm: [0, 0]", "center_mm: [0]", "one number for a pair"),
    ("center_mm: [0, 0]", "center_mm: [0, 2000]", "pair value out of range"),
    ("corner_radius_mm: 1", "corner_radius_mm: 0.01", "between 0 and the smallest length"),
    ("name: finger-test", "name: Finger Test", "not a folder name"),
    ("wall_mm: 5", "wal_mm: 5", "unknown key"),
    ("kind: bar", "kind: blob", "unknown body kind"),
    ("min_wall_mm: 1.0", "min_wall_mm: 1.0\nprinter:\n  perimeters: 0", "printer block"),
    ("min_wall_mm: 1.0", "min_wall_mm: 1.0\nprinter:\n  bed_mm: [5, 220]", "bed too small"),
    ("min_wall_mm: 1.0", "min_wall_mm: 1.0\nmarking:\n  tag: TOOLONGTAG", "tag too long"),
    ("min_wall_mm: 1.0", "min_wall_mm: 1.0\nmaterial:\n  shore_a: 500", "hardness"),
]


@pytest.mark.parametrize("old, new, why", REFUSED, ids=[r[2] for r in REFUSED])
def test_a_value_the_loader_refuses_the_schema_refuses(validator, old, new, why):
    text = edit(FINGER_TEXT, old, new)
    with pytest.raises(RecipeError):
        recipe_from_text(text, "finger.yaml", "finger-test")
    assert list(validator.iter_errors(as_data(text))), why


def test_the_test_finger_itself_meets_the_schema(validator):
    recipe_from_text(FINGER_TEXT, "finger.yaml", "finger-test")
    assert list(validator.iter_errors(as_data(FINGER_TEXT))) == []


def test_a_bound_reads_as_the_field_declares_it():
    props = recipe_schema()["properties"]
    wall = props["mold"]["properties"]["wall_mm"]
    # mold.wall_mm: 4 <= value <= 50 mm, default 5 (soft_molds/recipe/schema.py)
    assert (wall["minimum"], wall["maximum"], wall["default"]) == (4.0, 50.0, 5.0)
    assert props["printer"]["properties"]["bed_mm"]["default"] == [220.0, 220.0]


BELLOWS_TEXT = (ROOT / "recipes" / "plug-bellows.yaml").read_text()
# (old, new, what is wrong) on the bundled bellows: the list-valued fields of a profile
PROFILE_REFUSED = [
    ("round_mm: 2 ", "round_mm: [2, 0.01] ", "a rounding between 0 and the smallest length"),
    ("round_mm: 2 ", "round_mm: [] ", "an empty list of roundings"),
    ("round_mm: 2 ", "round_mm: [2, x] ", "text among the roundings"),
    ("  pleats: 5\n", "  pleats: 5\n  profile_mm: [[0, 7]]\n", "a profile of one point"),
    ("  pleats: 5\n", "  pleats: 5\n  profile_mm: [[0, 7, 1], [10, 7]]\n",
     "a point of three numbers"),
    ("  pleats: 5\n", "  pleats: 5\n  profile_mm: [[0, 7], [1001, 7]]\n",
     "a point beyond the largest size"),
]


def test_the_bundled_bellows_as_given_meets_the_schema(validator):
    recipe_from_text(BELLOWS_TEXT, "bellows.yaml", "plug-bellows")
    assert list(validator.iter_errors(as_data(BELLOWS_TEXT))) == []


@pytest.mark.parametrize("old, new, why", PROFILE_REFUSED, ids=[r[2] for r in PROFILE_REFUSED])
def test_a_profile_value_the_loader_refuses_the_schema_refuses(validator, old, new, why):
    text = edit(BELLOWS_TEXT, old, new)
    with pytest.raises(RecipeError) as exc:
        recipe_from_text(text, "bellows.yaml", "plug-bellows")
    # refused for the value itself (the bellows fields beside it are not reached)
    field = "body.round_mm" if "round_mm" in new else "body.profile_mm"
    assert [p.path.split("[")[0] for p in exc.value.problems] == [field]
    assert list(validator.iter_errors(as_data(text))), why
