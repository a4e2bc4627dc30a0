"""Recipes with one or several inlets: the one-socket block and a one-item list are the same
recipe (the echo, and so the hash and manifest of every bundled one-socket recipe, pinned
by tests/data/build-digests.json, keep the old shape); a socket on the end face lies at the
body's length (elementary geometry); the JSON Schema (the ``jsonschema`` package, draft
2020-12) refuses both fields at once; voids are grouped into one core per socket."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest
import yaml
from recipe_text import END_FED, FINGER_TEXT, edit

from soft_molds import load_recipe
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.feeds import core_groups
from soft_molds.recipe.model import Inlet, InletFace

ROOT = Path(__file__).resolve().parents[2]
RECIPES = ROOT / "recipes"
# An open groove has no socket at all (its collar feeds it): not a one-socket recipe.
#: Recipes with one socket: not a list, not the open groove (fed through its collar) and
#: not a channel network written without a socket block (fed at its mouth on the outline).
ONE_SOCKET = sorted(p for p in RECIPES.glob("*.yaml")
                    if "inlets:" not in p.read_text() and "opens_to: outside" not in p.read_text()
                    and ("kind: channels" not in p.read_text() or "\ninlet:" in p.read_text()))
INLET_BLOCK = "inlet:\n  socket_diameter_mm: 4\n  socket_depth_mm: 6\n"


def test_the_one_socket_block_and_a_one_item_list_are_the_same_recipe():
    assert INLET_BLOCK in FINGER_TEXT
    listed = edit(FINGER_TEXT, INLET_BLOCK,
                  "inlets:\n  - socket_diameter_mm: 4\n    socket_depth_mm: 6\n")
    a, b = recipe_from_text(FINGER_TEXT), recipe_from_text(listed)
    assert a.inlets == b.inlets and len(a.inlets) == 1
    assert a.inlets[0].face is InletFace.START
    assert a.params() == b.params()
    assert a.params_sha256() == b.params_sha256()


@pytest.mark.parametrize("path", ONE_SOCKET, ids=[p.stem for p in ONE_SOCKET])
def test_a_one_socket_recipe_echoes_its_inlet_block_as_it_always_did(path):
    r = load_recipe(path)
    echo = r.params()
    assert "inlets" not in echo
    assert list(echo["inlet"]) == ["socket_diameter_mm", "socket_depth_mm", "center_mm"]


def test_an_end_face_socket_runs_in_from_the_body_length_along_minus_x():
    inlet = Inlet(4.0, 6.0, (1.0, -2.0), InletFace.END)
    rod = inlet.socket(80.0)
    assert (rod.axis, rod.start_mm, rod.length_mm) == ("x", 74.0, 6.0)
    assert rod.center_mm == (1.0, -2.0) and rod.radius_mm == 2.0
    assert inlet.pull_dir() == (1.0, 0.0, 0.0) and inlet.face_x_mm(80.0) == 80.0
    assert Inlet(4.0, 6.0, (0.0, 0.0)).pull_dir() == (-1.0, 0.0, 0.0)


def test_the_schema_refuses_inlet_and_inlets_together():
    schema = json.loads((RECIPES / "recipe.schema.json").read_text())
    v = jsonschema.Draft202012Validator(schema)
    doc = yaml.safe_load((RECIPES / "seedling-two-way-finger.yaml").read_text())
    assert not list(v.iter_errors(doc))
    doc["inlet"] = {"socket_diameter_mm": 4}
    assert list(v.iter_errors(doc))


@pytest.mark.parametrize("stem, groups", [
    # Two rows, each opening into its own socket: two cores.
    ("seedling-two-way-finger", [(0, (0,)), (1, (1,))]),
    # Two rows meeting only in one wide socket: one core.
    ("twin-row-finger", [(0, (0, 1))]),
    # A bore and the row it feeds (overlapping): one core.
    ("plenum-finger", [(0, (0, 1))]),
])
def test_voids_are_grouped_into_one_core_per_socket(stem, groups):
    r = load_recipe(RECIPES / f"{stem}.yaml")
    assert [(g.inlet, g.voids) for g in core_groups(r)] == groups




def test_an_end_face_socket_is_checked_on_the_end_face():
    from soft_molds.errors import RecipeError

    r = recipe_from_text(END_FED)
    assert [i.face for i in r.inlets] == [InletFace.START, InletFace.END]
    # 1 mm lower than the 14 mm bar's top allows: centre z = -5, radius 2 plus the 1 mm
    # least wall reaches z = -8, past the face's edge at -7 (elementary geometry); the bore
    # it fed (z within 3 of 0) no longer opens into it.
    moved = edit(END_FED, "center_mm: [4.5, 0], face: end", "center_mm: [4.5, -5], face: end")
    with pytest.raises(RecipeError) as err:
        recipe_from_text(moved)
    found = {(p.path, p.message.split(" (")[0]) for p in err.value.problems}
    assert ("inlets[1].center_mm", "puts the socket off the flat end face") in found
    assert ("inlets[1].center_mm", "puts a socket that no void opens into") in found
