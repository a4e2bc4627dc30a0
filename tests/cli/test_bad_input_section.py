"""Bad input for the ``section`` body: exit status 2, one located line per problem naming
the field (a polygon point by its index, on its own line), the value and what is allowed;
nothing written. Line numbers are those of the documents written here, known by
construction. The roundings' fit is elementary geometry: a rounding of radius r on a
corner that turns by theta touches each edge r tan(theta/2) from the corner; whether two
edges cross is the orientation test of plane segments (both end points of each on
opposite sides of the other's line)."""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

ROOT = Path(__file__).resolve().parents[2]
TAPER = (ROOT / "recipes" / "seedling-taper-finger.yaml").read_text()

# Demo scenario: a blunt-nosed pusher that nudges seedling plugs along a tray's edge; a
# six-sided section with rounded corners, a bore along it.
POLYGON = """\
# demo scenario: a blunt-nosed pusher that nudges seedling plugs along a tray edge
name: plug-nudger
body:
  kind: section
  outline: polygon
  length_mm: 50
  points_mm:
    - [-9, 0]
    - [9, 0]
    - [9, 8]
    - [4, 14]
    - [-4, 14]
    - [-9, 8]
  round_mm: [1, 1, 3, 3, 3, 3]
voids:
  - kind: bore
    diameter_mm: 6
    length_mm: 40
    center_mm: [0, 6]
    end_round_mm: 3
inlet:
  socket_diameter_mm: 6
  socket_depth_mm: 6
"""

POINTS = ("a list of 2 to 400 points [y, z], each value -1000 <= value <= 1000 mm, 0 or at "
          "least 0.05 mm from 0")
NUMBER = "a number, 0.05 <= value <= 1000 mm"





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


# Points 3 and 4 swapped: the edge from point 2 (9, 8) to point 3 (-4, 14) and the one
# from point 4 (4, 14) to point 5 (-9, 8) cross at y = 0 (both lines pass through (0,
# 12.15)), a bow tie.
_crossed = edit(edit(POLYGON, "    - [4, 14]", "    - [-4, 14]X"), "    - [-4, 14]\n",
                "    - [4, 14]\n").replace("X", "")
# Point 3 (4, 14) turns from the direction (-5, 6) to (-1, 0), by atan(6 / 5) = 50.194
# deg; a rounding of 14.5 there takes 14.5 tan(25.097 deg) = 6.7914 mm of each edge.
# Point 4 turns alike and takes 3 x 0.46837 = 1.4051 mm of the top edge (8 mm long):
# 8.197 mm needed. Point 2 turns by atan(5 / 6) = 39.806 deg and takes 3 tan(19.903 deg)
# = 1.0860 mm of the sloping edge (sqrt(5^2 + 6^2) = 7.810 mm long): 7.877(5) mm needed.
_too_round = edit(POLYGON, "round_mm: [1, 1, 3, 3, 3, 3]", "round_mm: [1, 1, 3, 14.5, 3, 3]")
_two_points = edit(edit(POLYGON, "    - [9, 8]\n    - [4, 14]\n    - [-4, 14]\n"
                        "    - [-9, 8]\n", ""), "  round_mm: [1, 1, 3, 3, 3, 3]\n", "")
_round_count = edit(POLYGON, "round_mm: [1, 1, 3, 3, 3, 3]", "round_mm: [1, 1, 3]")
_close = edit(POLYGON, "    - [-4, 14]", "    - [3.99, 14]")
_flat = edit(edit(edit(POLYGON, "    - [9, 8]\n", ""), "    - [4, 14]\n", ""),
             "    - [-4, 14]\n    - [-9, 8]\n", "    - [0, 0]\n")
_flat = edit(_flat, "round_mm: [1, 1, 3, 3, 3, 3]", "round_mm: 0")
# A right triangle with legs of 0.06 mm: 0.0018 mm2, under the 0.05 mm x 0.05 mm floor.
_sliver = edit(edit(POLYGON, "    - [-9, 0]\n    - [9, 0]\n    - [9, 8]\n    - [4, 14]\n"
                    "    - [-4, 14]\n    - [-9, 8]\n", "    - [0, 0]\n    - [0.06, 0]\n"
                    "    - [0, 0.06]\n"), "round_mm: [1, 1, 3, 3, 3, 3]", "round_mm: 0")
# Point 3's rounding (3 mm on a spike) sweeps its arc across the edge from point 4 back to
# point 0: found by tracing the rounded outline (the sharp polygon itself is simple).
_bulge = edit(edit(POLYGON, "    - [-9, 0]\n    - [9, 0]\n    - [9, 8]\n    - [4, 14]\n"
                   "    - [-4, 14]\n    - [-9, 8]\n", "    - [0, 3]\n    - [1, 0]\n"
                   "    - [9, 6]\n    - [1, 7]\n    - [2, 1]\n"),
              "round_mm: [1, 1, 3, 3, 3, 3]", "round_mm: [0, 2, 0, 3, 0]")
_not_pair = edit(POLYGON, "    - [9, 8]", "    - [9, 8, 1]")
_tip_low = edit(TAPER, "tip_scale: 0.7", "tip_scale: 0.2")
_tip_high = edit(TAPER, "tip_scale: 0.7", "tip_scale: 1.5")
_no_diameter = edit(TAPER, "  diameter_mm: 22\n", "")
_unused = edit(TAPER, "  diameter_mm: 22\n", "  diameter_mm: 22\n  width_mm: 20\n")
_outline = edit(TAPER, "outline: half-round", "outline: half-moon")
_rect = edit(TAPER, "  outline: half-round\n  diameter_mm: 22\n",
             "  outline: rounded-rectangle\n  width_mm: 20\n  height_mm: 12\n"
             "  corner_radius_mm: 7\n")
_centre = edit(TAPER, "  tip_scale: 0.7\n", "  tip_scale: 0.7\n  scale_center_mm: [0]\n")
_no_length = edit(TAPER, "  length_mm: 80\n", "")

CASES = [
    Case("polygon-crosses-itself", _crossed, (
        _e("body.points_mm[4]", _at(_crossed, "[4, 14]"), "starts an edge that crosses or "
           "touches the edge from point 2 to point 3", "[4.0, 14.0]",
           "an outline that does not cross itself"),)),
    Case("rounding-does-not-fit", _too_round, (
        _e("body.points_mm[3]", _at(_too_round, "[4, 14]"), "has a rounding that does not "
           "fit the edge from point 2 to point 3: the two roundings need 7.878 mm of it, it "
           "is 7.810 mm long", "[4.0, 14.0]", "smaller roundings"),
        _e("body.points_mm[3]", _at(_too_round, "[4, 14]"), "has a rounding that does not "
           "fit the edge from point 3 to point 4: the two roundings need 8.197 mm of it, it "
           "is 8.000 mm long", "[4.0, 14.0]", "smaller roundings"))),
    Case("polygon-of-two-points", _two_points, (
        _e("body.points_mm", _at(_two_points, "points_mm"), "has fewer than three points", "2",
           "at least three points [y, z]"),)),
    Case("round-list-of-wrong-length", _round_count, (
        _e("body.round_mm", _at(_round_count, "  round_mm"),
           "does not give one rounding per point", "3",
           "a list of 6 (one per point of points_mm)"),)),
    Case("points-too-close", _close, (
        _e("body.points_mm[4]", _at(_close, "[3.99, 14]"),
           "lies within 0.05 mm of point 3", "[3.99, 14.0]", "points at least 0.05 mm apart"),)),
    Case("polygon-folds-back-on-a-line", _flat, (
        _e("body.points_mm[0]", _at(_flat, "[-9, 0]"), "turns back on the edge it came along",
           "[-9.0, 0.0]", "an outline that does not cross itself"),)),
    Case("polygon-encloses-almost-nothing", _sliver, (
        _e("body.points_mm[0]", _at(_sliver, "[0, 0]"), "encloses no area", "[0.0, 0.0]",
           "points that enclose an area"),)),
    Case("rounding-makes-the-outline-cross-itself", _bulge, (
        _e("body.points_mm[4]", _at(_bulge, "[2, 1]"), "has a rounding that makes the "
           "outline cross itself near (1.71, 1.29) mm", "[2.0, 1.0]", "smaller roundings"),)),
    Case("point-of-three-numbers", _not_pair, (
        _e("body.points_mm[2]", _at(_not_pair, "[9, 8, 1]"),
           "must be a point [y, z] of two numbers", "[9, 8, 1]", POINTS),)),
    Case("tip-scale-below-range", _tip_low, (
        _e("body.tip_scale", _at(_tip_low, "tip_scale"), "is out of range", "0.2",
           "a number, 0.3 <= value <= 1"),)),
    Case("tip-scale-above-range", _tip_high, (
        _e("body.tip_scale", _at(_tip_high, "tip_scale"), "is out of range", "1.5",
           "a number, 0.3 <= value <= 1"),)),
    Case("half-round-without-diameter", _no_diameter, (
        _e("body.diameter_mm", _at(_no_diameter, "body:"), "is required with outline "
           "half-round", None, NUMBER),)),
    Case("field-of-another-outline", _unused, (
        _e("body.width_mm", _at(_unused, "width_mm: 20"), "is not used by outline half-round",
           "20.0", "for half-round: diameter_mm"),)),
    Case("unknown-outline", _outline, (
        _e("body.outline", _at(_outline, "outline:"), "is not a known value (did you mean "
           "'half-round'?)", "'half-moon'", "one of rounded-rectangle, circle, ellipse"),)),
    Case("corner-radius-beyond-half-the-height", _rect, (
        _e("body.corner_radius_mm", _at(_rect, "corner_radius_mm: 7"),
           "does not fit the rectangle", "7.0", "at most 6 mm"),)),
    Case("scale-centre-not-a-pair", _centre, (
        _e("body.scale_center_mm", _at(_centre, "scale_center_mm"),
           "must be a list of two numbers", "[0]"),)),
    Case("no-length", _no_length, (
        _e("body.length_mm", _at(_no_length, "body:"), "is required", None, NUMBER),)),
]


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_bad_section_input_exits_2_with_one_located_line_per_problem_and_writes_nothing(
        case, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(case.text, case.expect, tmp_path, capsys, monkeypatch)


def test_every_section_field_has_a_bad_input_case():
    from soft_molds.recipe.kinds.section import Section

    paths = {re.sub(r"\[\d+\]$", "", e.path) for c in CASES for e in c.expect}
    missing = [f.name for f in Section.FIELDS if f"body.{f.name}" not in paths]
    # height_mm and the rounded rectangle's sizes share the number checks of width_mm.
    assert missing == ["height_mm"], missing
