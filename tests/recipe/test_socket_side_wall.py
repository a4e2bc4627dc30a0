"""The socket's side wall is checked along its depth, not only at the inlet face's rim and
the socket's floor: a body may narrow between them (a revolved neck, a tapered section).
Geometry by construction: a neck of radius 3.5 mm round a socket of radius 3 mm leaves a
0.5 mm wall (the radii's difference)."""

from __future__ import annotations

import pytest

from soft_molds.errors import RecipeError
from soft_molds.recipe import recipe_from_text

# Demo scenario: a cup of the co-op's seedling gripper with a waist inside the socket's
# depth (rim and floor both well inside the body).
NECKED = """\
name: waisted-cup
body:
  kind: revolved
  profile_mm:
    - [0, 8]
    - [2, 8]
    - [4, {neck}]
    - [6, {neck}]
    - [8, 8]
    - [30, 8]
voids:
  - kind: bore
    diameter_mm: 4
    length_mm: 20
inlet:
  socket_diameter_mm: 6
  socket_depth_mm: 10
checks:
  min_wall_mm: 1.0
"""


def test_a_waist_inside_the_socket_depth_is_refused_with_its_wall():
    with pytest.raises(RecipeError) as err:
        recipe_from_text(NECKED.format(neck=3.5))
    (p,) = err.value.problems
    assert p.path == "inlet"
    assert p.message.startswith("leaves a silicone wall of 0.50 mm")


def test_a_waist_that_keeps_the_wall_is_accepted():
    r = recipe_from_text(NECKED.format(neck=4.0))
    assert r.inlet.socket_depth_mm == 10.0
