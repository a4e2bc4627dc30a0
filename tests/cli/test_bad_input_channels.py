"""Channel networks the recipe or the plan cannot cast are refused before any CAD work:
exit 2, nothing written, one stderr line naming the field (with its path and item index),
the value and what is allowed (tests/refusals.py ``refused_once``).

Recipe (our scenario): a layered bar pad for the co-op's tray lift, its network on the bond
face: a feed from the inlet face along the bar's axis and one branch off it at x = 20 mm,
a chamber row on each. Bar z in [-6, 6], base 4 mm: the bond face is z = -2.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

TEXT = """\
name: channel-pad
body:
  kind: bar
  length_mm: 70
  width_mm: 30
  height_mm: 12
  edge_radius_mm: 2
voids:
  - kind: channels
    width_mm: 2
    height_mm: 2
    corner_radius_mm: 0.5
    z_mm: -2
    paths:
      - [[0, 0], [20, 0], [60, 0]]
      - [[20, 0], [30, 8], [60, 8]]
    rows:
      - path: 0
        count: 4
        pitch_mm: 8
        start_mm: 28
        length_mm: 5
        width_mm: 8
        height_mm: 6
        corner_radius_mm: 1
      - path: 1
        count: 3
        pitch_mm: 8
        start_mm: 15
        length_mm: 5
        width_mm: 5
        height_mm: 6
        corner_radius_mm: 1
inlet:
  socket_diameter_mm: 4
  socket_depth_mm: 6
  center_mm: [0, -1]
mold:
  wall_mm: 5
  clamp_bolt: none
checks:
  min_wall_mm: 1.0
material:
  grade: A10
process:
  kind: layered
  draft_deg: 1
  base_mm: 4
  cover_margin_mm: 2
  sheet: paper
"""

#: (name, (old, new) text edit, the field the line names, words it must hold, the line
#: edited is the one reported (else the named needle's)).
CASES = [
    ("channel-width-out-of-range", ("width_mm: 2\n", "width_mm: 0\n"),
     "voids[0].width_mm", "out of range", None),
    ("corner-too-large", ("corner_radius_mm: 0.5", "corner_radius_mm: 0.95"),
     "voids[0].corner_radius_mm", "too large for the channel", None),
    ("path-point-not-a-pair", ("[20, 0], [60, 0]]", "[20, 0], [60]]"),
     "voids[0].paths[0][2]", "must be a point", None),
    ("segment-too-short", ("[20, 0], [60, 0]]", "[20, 0], [20.5, 0]]"),
     "voids[0].paths[0][2]", "shorter than half the channel width", None),
    ("branch-off-the-network", ("[[20, 0], [30, 8]", "[[20, 3], [30, 8]"),
     "voids[0].paths[1][0]", "not on an earlier path", None),
    ("row-on-no-path", ("path: 1\n", "path: 2\n"), "voids[0].rows[1].path",
     "names no path", None),
    ("row-key-unknown", ("start_mm: 15", "start_mm: 15\n        depth_mm: 3"),
     "voids[0].rows[1].depth_mm", "is not a known key", "depth_mm: 3"),
    ("chambers-of-a-row-overlap", ("length_mm: 5\n        width_mm: 8",
                                   "length_mm: 8\n        width_mm: 8"),
     "voids[0].rows[0].length_mm", "overlap", None),
    ("row-past-the-path-end", ("start_mm: 15", "start_mm: 30"), "voids[0].rows[1].count",
     "past its end", "count: 3"),
    ("row-across-a-bend", ("start_mm: 28", "start_mm: 18"), "voids[0].rows[0].start_mm",
     "across a bend", None),
    ("branch-leaves-the-body", ("[60, 8]]", "[60, 16]]"), "voids[0].paths[1][2]",
     "leaves the body", None),
    ("branch-near-the-surface", ("[60, 8]]", "[60, 13.5]]"), "voids[0].paths[1][2]",
     "from the body's surface", None),
    ("chamber-near-another-branch", ("width_mm: 5\n", "width_mm: 7\n"),
     "voids[0].rows[1]", "which do not join", "- path: 1"),
    ("inlet-inside-the-body", ("[[0, 0], [20, 0]", "[[2, 0], [20, 0]"),
     "voids[0].paths[0][0]", "inside the body", None),
    ("inlet-outside-the-body", ("[[0, 0], [20, 0]", "[[-2, 0], [20, 0]"),
     "voids[0].paths[0][0]", "outside the body", None),
    ("floor-off-the-bond-face", ("z_mm: -2", "z_mm: -1.5"), "voids[0].z_mm",
     "off the bond face", None),
    ("one-shot-cannot-cast-a-network", ("kind: layered", "kind: one-shot"),
     "voids[0].kind", "branched network", None),
]


@pytest.mark.parametrize(("name", "change", "field", "words", "at"), CASES,
                         ids=[c[0] for c in CASES])
def test_a_network_the_process_cannot_cast_exits_2_with_one_located_line(
        name, change, field, words, at, tmp_path, capsys, no_cad_work):
    text = edit(TEXT, *change)
    path, line = refused_once(text, tmp_path, capsys)
    where = line_of(text, at if at is not None else change[1].splitlines()[0].strip()
                    if change[1].strip() else change[1])
    assert line.startswith(f"{path}:{where}: {field}"), line
    assert words in line, line


#: The pad with slits between the chambers of each row, 6 mm across its path (so a row's
#: slits keep clear of the other row's chambers), 3 mm deep from the top face z = 6.
SLITS = edit(TEXT, "inlet:\n", """\
  - kind: slits
    depth_mm: 3
    width_mm: 1
    round_mm: 0.3
    span_mm: 6
inlet:
""")

SLIT_CASES = [
    # A gap of 8 - 5 = 3 mm between chambers holds at most 3 - 2 x 1 mm of slit.
    ("slit-wider-than-the-gap-allows", ("width_mm: 1\n", "width_mm: 1.5\n"),
     "voids[1].width_mm", "to the chambers of rows[0]", None),
    # The channels' top is z = 0: a slit from z = 6 may reach down to z = 1.
    ("slit-down-to-the-channels", ("depth_mm: 3\n", "depth_mm: 5.5\n"),
     "voids[1].depth_mm", "above the channels", None),
    # Through the whole pad, the first row's slits cross the branch's chambers.
    ("slit-across-another-row", ("    span_mm: 6\n", ""), "voids[1].depth_mm",
     "to the channel network", "depth_mm: 3"),
    ("slits-in-a-network-cast-in-one-shot", ("kind: layered", "kind: one-shot"),
     "process.kind", "does not cut slits between the chambers of a channel network", None),
]


@pytest.mark.parametrize(("name", "change", "field", "words", "at"), SLIT_CASES,
                         ids=[c[0] for c in SLIT_CASES])
def test_slits_a_network_cannot_take_exit_2_with_one_located_line(
        name, change, field, words, at, tmp_path, capsys, no_cad_work):
    text = edit(SLITS, *change)
    path, line = refused_once(text, tmp_path, capsys)
    where = line_of(text, at if at is not None else change[1].strip())
    assert line.startswith(f"{path}:{where}: {field}"), line
    assert words in line, line


def test_the_pad_with_slits_is_accepted_before_any_cad_work(no_cad_work):
    # The cases above are refused for their change alone: the pad itself passes every
    # rule of the recipe and the plan.
    from recipe_text import planned_from_text

    r = planned_from_text(SLITS)
    assert len(r.outer_cuts()) == 3 + 2


def test_slits_with_no_row_of_two_chambers_exit_2_on_their_kind(tmp_path, capsys,
                                                                  no_cad_work):
    text = edit(edit(SLITS, "count: 4\n", "count: 1\n"), "count: 3\n", "count: 1\n")
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, 'kind: slits')}: voids[1].kind"), line
    assert "needs a chamber row to sit between" in line, line


#: The four-arm hub gripper, fed from its mouth on the hub's edge at 180 deg with no socket.
HUB = (Path(__file__).resolve().parents[2] / "recipes" / "seedling-hub-gripper.yaml"
       ).read_text()

MOUTH_CASES = [
    # A socket block round a mouth that is not on the x = 0 face: refused on its key.
    ("socket-for-a-mouth-on-the-hubs-edge", ("mold:\n", "inlet:\n  socket_diameter_mm: 3.2\n"
                                             "  socket_depth_mm: 2\nmold:\n"),
     "inlet", "is not on the inlet face x = 0", "inlet:"),
    ("socket-list-for-a-mouth-on-the-hubs-edge",
     ("mold:\n", "inlets:\n  - {socket_diameter_mm: 3.2, socket_depth_mm: 2, "
                 "center_mm: [0, -1]}\nmold:\n"),
     "inlets", "is not on the inlet face x = 0", "inlets:"),
    # With no socket the mouth must still lie on the outline: 0.1 mm in is refused.
    # (the line names the mouth as written, from the hub's centre).
    ("mouth-inside-the-hub", ("[[-15, 0], [0, 0]]", "[[-14.9, 0], [0, 0]]"),
     "voids[0].paths[0][0]", "(got [-14.9, 0.0]); allowed: a point on the body's outline, "
     "written from the hub's centre", "[[-14.9, 0]"),
]


@pytest.mark.parametrize(("name", "change", "field", "words", "at"), MOUTH_CASES,
                         ids=[c[0] for c in MOUTH_CASES])
def test_a_mouth_on_the_outline_refuses_a_socket_off_x0_with_one_located_line(
        name, change, field, words, at, tmp_path, capsys, no_cad_work):
    text = edit(HUB, *change)
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, at)}: {field}"), line
    assert words in line, line


def test_a_network_with_its_mouth_on_x0_needs_no_socket(no_cad_work):
    # The pad's mouth is on its x = 0 face: without the inlet block it has no socket (the
    # groove opens there); with it, the socket is read and checked as before.
    from recipe_text import planned_from_text

    without = edit(TEXT, "inlet:\n  socket_diameter_mm: 4\n  socket_depth_mm: 6\n"
                   "  center_mm: [0, -1]\n", "")
    assert planned_from_text(without).inlets == ()
    assert len(planned_from_text(TEXT).inlets) == 1


#: Paths measured from a hub's centre need a plate drawn with a hub: on a plate drawn by its
#: corners and on a bar, ``origin: hub`` is refused on its own key.
ORIGIN_CASES = [
    ("hub-origin-on-a-polygon-plate",
     edit(HUB, """  hub_diameter_mm: 30
  arm_count: 4
  arm_angles_deg: [45, 135, 225, 315]
  arm_length_mm: 45          # hub centre to tip
  arm_width_mm: 14
  tip_round_mm: 3
""", "  outline_mm: [[0, -40], [90, -40], [90, 40], [0, 40]]\n"), "drawn by outline_mm"),
    ("hub-origin-on-a-bar", edit(TEXT, "    paths:\n", "    origin: hub\n    paths:\n"),
     "body.kind is bar"),
]


@pytest.mark.parametrize(("name", "text", "words"), ORIGIN_CASES,
                         ids=[c[0] for c in ORIGIN_CASES])
def test_paths_from_a_hub_on_a_body_without_one_exit_2_on_origin(
        name, text, words, tmp_path, capsys, no_cad_work):
    path, line = refused_once(text, tmp_path, capsys)
    where = line_of(text, "    origin: hub")
    assert line.startswith(f"{path}:{where}: voids[0].origin"), line
    assert words in line and "(got 'hub')" in line and "hub_diameter_mm" in line, line
