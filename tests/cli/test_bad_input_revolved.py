"""Bad input for the ``revolved`` body and the ``bellows`` void: exit status 2, one located
line per problem naming the field (a profile point by its index, on its own line), the
value and what is allowed; nothing written. Line numbers are those of the documents
written here, known by construction; the roundings' fit is elementary geometry (a
rounding of radius r on a corner that turns by theta touches each edge r tan(theta/2)
from the corner)."""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

ROOT = Path(__file__).resolve().parents[2]
BELLOWS = (ROOT / "recipes" / "plug-bellows.yaml").read_text()

# A cup of the co-op's seedling gripper scenario: a revolved body with its profile written
# point by point (a neck, a shoulder, a domed far end), a bore through its neck.
PROFILE = """\
# demo scenario: a soft cup that cradles a seedling plug while it is moved
name: plug-cup
body:
  kind: revolved
  profile_mm:
    - [0, 8]
    - [12, 8]
    - [20, 12]
    - [40, 12]
  round_mm: [1, 2, 2, 6]
voids:
  - kind: bore
    diameter_mm: 6
    length_mm: 30
inlet:
  socket_diameter_mm: 6
  socket_depth_mm: 6
"""

POINTS = "a list of 2 to 400 points [x, radius], each value 0 or 0.05 <= value <= 1000 mm"





@dataclass(frozen=True)
class Case:
    name: str
    text: str
    expect: tuple[Expect, ...]





def _e(path: str, line: int | None, message: str, got: str | None = None,
       allowed: str | None = None) -> Expect:
    return Expect(path, line, message, got, allowed)


def _at(text: str, needle: str) -> int:
    return line_of(text, needle)


_not_list = edit(PROFILE, "  profile_mm:\n    - [0, 8]\n    - [12, 8]\n    - [20, 12]\n"
                 "    - [40, 12]\n", "  profile_mm: 5\n")
_triple = edit(PROFILE, "    - [12, 8]", "    - [12, 8, 3]")
_off_face = edit(PROFILE, "    - [0, 8]", "    - [2, 8]")
_back = edit(PROFILE, "    - [20, 12]", "    - [10, 12]")
_on_axis = edit(PROFILE, "    - [12, 8]", "    - [12, 0]")
_too_round = edit(PROFILE, "round_mm: [1, 2, 2, 6]", "round_mm: [1, 2, 40, 6]")
_count = edit(PROFILE, "round_mm: [1, 2, 2, 6]", "round_mm: [1, 2, 2]")
_neg_round = edit(PROFILE, "round_mm: [1, 2, 2, 6]", "round_mm: [1, -2, 2, 6]")
_tip = edit(edit(PROFILE, "    - [40, 12]", "    - [40, 0]"), "round_mm: [1, 2, 2, 6]",
            "round_mm: [1, 2, 2, 1]")
_slight = edit(PROFILE, "    - [40, 12]", "    - [40, 12.001]")
_both = edit(PROFILE, "  round_mm: [1, 2, 2, 6]", "  round_mm: [1, 2, 2, 6]\n  pleats: 3")
_neither = edit(PROFILE, "  profile_mm:\n    - [0, 8]\n    - [12, 8]\n    - [20, 12]\n"
                "    - [40, 12]\n  round_mm: [1, 2, 2, 6]\n", "")
_pleats0 = edit(BELLOWS, "pleats: 5", "pleats: 0")
_pleats_half = edit(BELLOWS, "pleats: 5", "pleats: 2.5")
_pitch = edit(BELLOWS, "pitch_mm: 8", "pitch_mm: -8")
_inner = edit(BELLOWS, "inner_radius_mm: 7", "inner_radius_mm: 0.01")
_outer = edit(BELLOWS, "outer_radius_mm: 13", "outer_radius_mm: 6")
_neck = edit(BELLOWS, "neck_length_mm: 10", "neck_length_mm: ten")
_no_tip = edit(BELLOWS, "  tip_length_mm: 8\n", "")
_round_pleats = edit(BELLOWS, "round_mm: 2 ", "round_mm: 3 ")
_round_list = edit(BELLOWS, "round_mm: 2 ", "round_mm: [2, 2] ")
_rod = edit(PROFILE, "  - kind: bore\n    diameter_mm: 6\n    length_mm: 30\n",
            "  - kind: bellows\n    wall_mm: 1.5\n")
_rod = edit(_rod, "  kind: revolved\n  profile_mm:\n    - [0, 8]\n    - [12, 8]\n"
            "    - [20, 12]\n    - [40, 12]\n  round_mm: [1, 2, 2, 6]\n",
            "  kind: rod\n  diameter_mm: 16\n  length_mm: 40\n")
_thick = edit(BELLOWS, "wall_mm: 1.5", "wall_mm: 4")
_no_wall = edit(BELLOWS, "    wall_mm: 1.5\n", "")
_zero_wall = edit(BELLOWS, "wall_mm: 1.5", "wall_mm: 0")
_deep_wall = edit(BELLOWS, "socket_depth_mm: 8", "socket_depth_mm: 1")

NUMBER = "a number, 0.05 <= value <= 1000 mm"
CASES = [
    Case("profile-not-a-list", _not_list, (
        _e("body.profile_mm", _at(_not_list, "profile_mm"), "must be a list", "5", POINTS),)),
    Case("profile-point-of-three", _triple, (
        _e("body.profile_mm[1]", _at(_triple, "[12, 8, 3]"),
           "must be a point [x, radius] of two numbers", "[12, 8, 3]", POINTS),)),
    Case("profile-off-the-inlet-face", _off_face, (
        _e("body.profile_mm[0]", _at(_off_face, "[2, 8]"), "does not start on the inlet face",
           "[2.0, 8.0]", "x = 0 for the first point"),)),
    Case("profile-x-goes-back", _back, (
        _e("body.profile_mm[2]", _at(_back, "[10, 12]"),
           "does not lie beyond point 1 along x", "[10.0, 12.0]",
           "x rises strictly (no overhanging profile for now)"),)),
    Case("profile-radius-0-before-the-end", _on_axis, (
        _e("body.profile_mm[1]", _at(_on_axis, "[12, 0]"), "has no positive radius",
           "[12.0, 0.0]", "only the last point may close on the axis"),)),
    # Point 2 turns by atan(4 / 8) = 26.57 deg: a rounding of 40 there takes 40 tan(13.28
    # deg) = 9.44 mm of each edge, point 1's rounding of 2 another 0.47 mm of the edge
    # between them, which is only sqrt(8^2 + 4^2) = 8.94 mm long.
    Case("rounding-does-not-fit", _too_round, (
        _e("body.profile_mm[2]", _at(_too_round, "[20, 12]"),
           "has roundings that do not fit the edge from point 1 to point 2: they need 9.915 "
           "mm of it, it is 8.944 mm long", "[20.0, 12.0]", "smaller roundings"),)),
    Case("round-list-of-wrong-length", _count, (
        _e("body.round_mm", _at(_count, "round_mm"), "does not give one rounding per point",
           "3", "a list of 4 (one per point of profile_mm)"),)),
    Case("round-negative", _neg_round, (
        _e("body.round_mm[1]", _at(_neg_round, "round_mm"), "is out of range", "-2"),)),
    Case("round-tip-on-the-axis", _tip, (
        _e("body.profile_mm[3]", _at(_tip, "[40, 0]"), "rounds a tip on the axis",
           "[40.0, 0.0]", "rounding 0 where the profile closes on the axis"),)),
    # The edge from point 2 to point 3 rises 0.001 mm over 20 mm; the kernel keeps a cone
    # only from 1e-3 * sqrt(20) = 0.00447 mm on.
    Case("profile-cone-too-slight", _slight, (
        _e("body.profile_mm[3]", _at(_slight, "[40, 12.001]"),
           "changes the radius of point 2 by only 0.001 mm over 20 mm", "[40.0, 12.001]",
           "the same radius as point 2 (12 mm) or one that differs by at least 0.00447 mm"),)),
    Case("profile-and-pleats", _both, (
        _e("body.pleats", _at(_both, "pleats: 3"), "is given with profile_mm", "3",
           "either profile_mm or the bellows fields"),)),
    Case("no-profile-at-all", _neither, (
        _e("body.profile_mm", _at(_neither, "body:"), "is required", None,
           "points [x, radius], or the bellows fields"),)),
    Case("pleats-zero", _pleats0, (
        _e("body.pleats", _at(_pleats0, "pleats: 0"), "is out of range", "0",
           "a whole number, 1 <= value <= 100"),)),
    Case("pleats-fraction", _pleats_half, (
        _e("body.pleats", _at(_pleats_half, "pleats: 2.5"), "must be a whole number", "2.5"),)),
    Case("pitch-negative", _pitch, (
        _e("body.pitch_mm", _at(_pitch, "pitch_mm"), "is out of range", "-8", NUMBER),)),
    Case("inner-radius-below-the-floor", _inner, (
        _e("body.inner_radius_mm", _at(_inner, "inner_radius_mm"), "is out of range", "0.01",
           NUMBER),)),
    Case("outer-not-above-inner", _outer, (
        _e("body.outer_radius_mm", _at(_outer, "outer_radius_mm"),
           "does not stand above the inner radius", "6.0",
           "more than inner_radius_mm (7 mm)"),)),
    Case("neck-not-a-number", _neck, (
        _e("body.neck_length_mm", _at(_neck, "neck_length_mm"), "must be a number", "'ten'"),)),
    Case("pleats-without-tip-length", _no_tip, (
        _e("body.tip_length_mm", _at(_no_tip, "body:"), "is required with the bellows fields"),)),
    Case("rounding-too-large-for-the-pleats", _round_pleats, (
        _e("body.round_mm", _at(_round_pleats, "round_mm"), "is too large for the pleats",
           "3.0", "smaller roundings"),)),
    Case("round-list-with-pleats", _round_list, (
        _e("body.round_mm", _at(_round_list, "round_mm"), "is a list with the bellows fields",
           "[2.0, 2.0]", "one rounding for every corner"),)),
    Case("bellows-in-a-rod", _rod, (
        _e("voids[0].kind", _at(_rod, "kind: bellows"),
           "follows the body's profile, and only a revolved body has one (body.kind is rod)",
           "'bellows'", "body.kind: revolved"),)),
    Case("bellows-wall-thicker-than-the-pleats", _thick, (
        _e("voids[0].wall_mm", _at(_thick, "wall_mm: 4"), "cannot follow the body: near point 0 "
           "of the profile the bellows fields make it leaves no room inside", "4.0",
           "a wall thinner than half the body's narrowest pleat"),)),
    Case("bellows-without-wall", _no_wall, (
        _e("voids[0].wall_mm", _at(_no_wall, "kind: bellows"), "is required", None, NUMBER),)),
    Case("bellows-wall-zero", _zero_wall, (
        _e("voids[0].wall_mm", _at(_zero_wall, "wall_mm: 0"), "is out of range", "0",
           NUMBER),)),
    Case("bellows-inlet-wall-deeper-than-the-socket", _deep_wall, (
        _e("voids[0]", _at(_deep_wall, "kind: bellows"), "is not reached from the inlet socket",
           None, "start x = 1.5 mm must lie inside the socket"),)),
]


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_bad_revolved_or_bellows_input_exits_2_with_one_located_line_and_writes_nothing(
        case, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(case.text, case.expect, tmp_path, capsys, monkeypatch)


def test_every_new_field_has_a_bad_input_case():
    from soft_molds.recipe.kinds.bellows import Bellows
    from soft_molds.recipe.kinds.revolved import RevolvedBody

    paths = {re.sub(r"\[\d+\]$", "", e.path) for c in CASES for e in c.expect}
    for f in RevolvedBody.FIELDS:
        assert f"body.{f.name}" in paths, f.name
    for f in Bellows.FIELDS:
        assert f"voids[0].{f.name}" in paths, f.name
