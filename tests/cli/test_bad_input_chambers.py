"""Bad input for the chamber row's per-chamber sizes (a list, or a grade ``{from, to}``),
its pitch and its placement beside the socket: exit status 2, one located line per problem
naming the field (a list item by its index), the value and what is allowed; nothing
written. The test finger (tests/data/finger-test.yaml) has 3 chambers 5 mm deep every 8 mm
and a 6 mm deep socket with checks.min_wall_mm 1; line numbers are those of the documents
written here, known by construction."""

from __future__ import annotations

import re

import pytest
from recipe_text import FINGER_TEXT, edit, line_of
from refusals import Expect, assert_build_refused

GRADED = ("a number, a list of numbers (one per chamber), or a linear grade {from: first, "
          "to: last}, each 0.05 <= value <= 1000 mm")
NUMBER = "a number, 0.05 <= value <= 1000 mm"


def _e(path: str, needle: str, text: str, message: str, got: str | None = None,
       allowed: str | None = None) -> Expect:
    return Expect(path, line_of(text, needle), message, got, allowed)


_short = edit(FINGER_TEXT, "depth_mm: 5", "depth_mm: [5, 5]")
_long = edit(FINGER_TEXT, "width_mm: 12", "width_mm: [12, 11, 10, 9]")
_word = edit(FINGER_TEXT, "width_mm: 12", "width_mm: [12, wide, 12]")
_zero = edit(FINGER_TEXT, "height_mm: 8", "height_mm:\n      - 8\n      - 0\n      - 8")
_text = edit(FINGER_TEXT, "height_mm: 8", "height_mm: tall")
_no_to = edit(FINGER_TEXT, "width_mm: 12", "width_mm: {from: 12}")
_typo = edit(FINGER_TEXT, "width_mm: 12", "width_mm: {from: 12, too: 9}")
_neg = edit(FINGER_TEXT, "height_mm: 8", "height_mm: {from: 8, to: -1}")
_one = edit(edit(FINGER_TEXT, "count: 3", "count: 1"), "width_mm: 12",
            "width_mm: {from: 12, to: 9}")
_no_pitch = edit(FINGER_TEXT, "    pitch_mm: 8\n", "")
_deep = edit(FINGER_TEXT, "depth_mm: 5", "depth_mm: [5, 9, 5]")
_round = edit(FINGER_TEXT, "depth_mm: 5", "depth_mm: {from: 5, to: 2}")
_near = edit(FINGER_TEXT, "    center_mm: [0, 0]\n    feed", "    center_mm: [0, 0]\n"
             "    start_mm: 6.5\n    feed")

CASES = [
    ("list-shorter-than-the-count", _short, (
        _e("voids[0].depth_mm", "    depth_mm", _short, "gives 2 sizes for 3 chambers",
           "[5.0, 5.0]", "a list of 3 (one per chamber)"),)),
    ("list-longer-than-the-count", _long, (
        _e("voids[0].width_mm", "    width_mm", _long, "gives 4 sizes for 3 chambers",
           "[12.0, 11.0, 10.0, 9.0]", "or {from: first, to: last}"),)),
    ("list-item-not-a-number", _word, (
        _e("voids[0].width_mm[1]", "    width_mm", _word, "must be a number", "'wide'",
           GRADED),)),
    ("list-item-zero", _zero, (
        _e("voids[0].height_mm[1]", "- 0", _zero, "is out of range", "0", GRADED),)),
    ("size-neither-number-list-nor-grade", _text, (
        _e("voids[0].height_mm", "    height_mm", _text,
           "must be a number, a list or {from, to}", "'tall'", GRADED),)),
    ("grade-without-its-last-size", _no_to, (
        _e("voids[0].width_mm.to", "    width_mm", _no_to, "is required", None, NUMBER),)),
    ("grade-with-an-unknown-key", _typo, (
        _e("voids[0].width_mm.to", "    width_mm", _typo, "is required", None, NUMBER),
        _e("voids[0].width_mm.too", "    width_mm", _typo,
           "is not a known key (did you mean 'to'?)", None, "from, to"),)),
    ("grade-to-a-negative-size", _neg, (
        _e("voids[0].height_mm.to", "    height_mm", _neg, "is out of range", "-1",
           NUMBER),)),
    ("grade-over-a-single-chamber", _one, (
        _e("voids[0].width_mm", "    width_mm", _one, "grades the size of a single chamber",
           "{'from': 12.0, 'to': 9.0}", "one number when count is 1"),)),
    ("no-pitch-for-three-chambers", _no_pitch, (
        _e("voids[0].pitch_mm", "- kind: chambers", _no_pitch,
           "is required for a row of 3 chambers", None, NUMBER),)),
    # Chamber 2 starts 8 mm after chamber 1 and is 9 mm deep: it runs into chamber 3.
    ("one-listed-depth-reaches-the-next-chamber", _deep, (
        _e("voids[0].depth_mm[1]", "    depth_mm", _deep, "leaves no wall between chambers 2 "
           "and 3", "9.0", "less than pitch_mm (8 mm)"),)),
    # The corner radius 1 fits 5 mm but not the last chamber's 2 mm (0.45 x 2 = 0.9).
    ("corner-radius-too-large-for-the-graded-last-chamber", _round, (
        _e("voids[0].corner_radius_mm", "corner_radius_mm", _round,
           "is too large for the chamber", "1.0", "at most 0.9 mm"),)),
    # First chamber at x = 6.5, socket floor at 6: 0.5 mm of silicone between them.
    ("row-started-half-a-millimetre-past-the-socket", _near, (
        _e("voids[0].start_mm", "start_mm: 6.5", _near,
           "leaves a silicone wall of 0.50 mm to the inlet socket's floor", None,
           "voids[0].start_mm, inlet.socket_depth_mm (6 mm) and checks.min_wall_mm"),)),
]


@pytest.mark.parametrize("name, text, expect", CASES, ids=[c[0] for c in CASES])
def test_bad_chamber_input_exits_2_with_one_located_line_and_writes_nothing(
        name, text, expect, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(text, expect, tmp_path, capsys, monkeypatch)


def test_every_changed_chamber_field_has_a_bad_input_case():
    paths = {re.sub(r"(\[\d+\]|\.(from|to|too))$", "", e.path) for c in CASES for e in c[2]}
    for name in ("pitch_mm", "depth_mm", "width_mm", "height_mm", "start_mm"):
        assert f"voids[0].{name}" in paths, name
