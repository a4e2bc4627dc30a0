"""Bad input for the ``slits`` void kind: exit status 2, one located line per problem
naming the field, the value and what is allowed; nothing written, no CAD work. The demo
recipe (recipes/seedling-slit-finger.yaml) has 6 chambers 3.5 mm deep every 8 mm (gaps of
4.5 mm), centred at z = 1 with a 2 mm feed channel (top at z = 2), a 14 mm tall, 16 mm wide
bar (top face z = 7), the parting plane at z = 1 and checks.min_wall_mm 1; the limits
below follow from those numbers (closed form, worked out in each comment)."""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

DEMO = (Path(__file__).resolve().parents[2] / "recipes" / "seedling-slit-finger.yaml"
        ).read_text()

SLITS = "voids[1]"


def _e(path: str, needle: str, text: str, message: str, got: str | None = None,
       allowed: str | None = None) -> Expect:
    return Expect(path, line_of(text, needle), message, got, allowed)


_wide = edit(DEMO, "width_mm: 2.2 ", "width_mm: 2.6 ")
_deep = edit(DEMO, "depth_mm: 3.5            #", "depth_mm: 4.5            #")
_round = edit(DEMO, "round_mm: 0.4", "round_mm: 1.5")
_closed = edit(edit(DEMO, "width_mm: 2.2 ", "width_mm: 0.5 "), "draft_deg: 1.5",
               "draft_deg: 5")
_steep = edit(DEMO, "draft_deg: 1.5", "draft_deg: 12")
_face = edit(DEMO, "face: top", "face: bottom")
_span = edit(DEMO, "    draft_deg: 1.5\n", "    draft_deg: 1.5\n    span_mm: 20\n")
_no_width = edit(DEMO, "    width_mm: 2.2 ", "    # width_mm: 2.2 ")
_one = edit(edit(DEMO, "count: 6", "count: 1"), "    pitch_mm: 8\n", "")
_axis = edit(DEMO, "axis: z", "axis: y")
_section = edit(edit(DEMO, "kind: bar\n", "kind: section\n  outline: circle\n  diameter_mm: 18\n"),
                "  width_mm: 16\n  height_mm: 14\n  edge_radius_mm: 2\n", "")
_rows = DEMO.split("  - kind: ")
_first = "  - kind: ".join([_rows[0], _rows[2].split("inlet:")[0] + "", _rows[1],
                            ]) + "inlet:" + _rows[2].split("inlet:")[1]

_vent = edit(DEMO, "  clamp_bolt: M4\n", "  clamp_bolt: M4\n  vent_diameter_mm: 5\n")
_tight = edit(DEMO, "    depth_mm: 3.5\n    width_mm: 12", "    depth_mm: 6.5\n    width_mm: 12")

_bore = edit(DEMO, "  - kind: slits ", "  - kind: bore\n    diameter_mm: 2.4\n"
             "    length_mm: 50\n    center_mm: [0, 2.5]\n  - kind: slits ")

CASES = [
    # A bore beside the row reaching z = 2.5 + 1.2 = 3.7, above the slits' bottom at 3.5.
    ("slit-cutting-into-another-void", _bore, (
        Expect("voids[2].depth_mm", line_of(_bore, "depth_mm: 3.5            #"),
               "leaves 0.00 mm of silicone to voids[1] (the slit at x = 15 mm)", "3.5",
               "a slit at least checks.min_wall_mm (1 mm) from voids[1]"),)),
    # 8 - 2.2 = 5.8 mm of top face between two slits; a 5 mm vent and 0.5 mm of mold on
    # each side need 6: width at most 8 - 5 - 1 = 2 mm.
    ("top-land-too-narrow-for-a-vent", _vent, (
        _e(f"{SLITS}.width_mm", "width_mm: 2.2", _vent, "leaves 5.8 mm of top face between "
           "two slits, too little for a 5 mm vent", "2.2", "at most 2 mm"),)),
    # Chambers 6.5 mm deep every 8 mm leave 1.5 mm gaps, less than 2 x 1 mm of wall.
    ("no-room-between-chambers", _tight, (
        _e(f"{SLITS}.kind", "- kind: slits", _tight, "finds no room between chambers 1 and 2",
           "'slits'", "wider than 2 x checks.min_wall_mm (2 mm)"),)),
    # The gap between chambers is 8 - 3.5 = 4.5 mm: at most 4.5 - 2 x 1 = 2.5 mm.
    ("slit-wider-than-the-gap-less-two-walls", _wide, (
        _e(f"{SLITS}.width_mm", "width_mm: 2.6", _wide,
           "leaves less than checks.min_wall_mm (1 mm) to chambers 1 and 2", "2.6",
           "at most 2.5 mm"),)),
    # Feed channel top at z = 1 + 1 = 2, plus 1 mm of wall: the slit may reach z = 3,
    # 7 - 3 = 4 mm deep.
    ("slit-reaching-the-feed-channel", _deep, (
        _e(f"{SLITS}.depth_mm", "depth_mm: 4.5", _deep,
           "leaves less than checks.min_wall_mm (1 mm) above the feed channel", "4.5",
           "at most 4 mm"),)),
    # Bottom width 2.2 - 2 x 3.5 tan 1.5 deg = 2.0167 mm; the rounding's tangent length
    # r / tan(91.5 deg / 2) may be 0.45 x 2.0167: r at most 0.932 mm.
    ("rounding-too-large-for-the-slit-bottom", _round, (
        _e(f"{SLITS}.round_mm", "round_mm: 1.5", _round, "is too large for the slit", "1.5",
           "at most 0.932 mm"),)),
    # 0.5 - 2 x 3.5 tan 5 deg < 0: the walls meet above the bottom; atan(0.5 / 7) = 4.09.
    ("draft-closing-the-slit", _closed, (
        _e(f"{SLITS}.draft_deg", "draft_deg: 5", _closed, "closes the slit before its bottom",
           "5.0", "less than 4.09 deg"),)),
    ("draft-out-of-range", _steep, (
        _e(f"{SLITS}.draft_deg", "draft_deg: 12", _steep, "is out of range", "12",
           "a number, 0 <= value <= 10 deg"),)),
    ("face-not-offered", _face, (
        _e(f"{SLITS}.face", "face: bottom", _face, "is not a known value", "'bottom'",
           "one of top"),)),
    # The row's axis is y = 0 in a 16 mm bar: 8 - 1 mm of wall on each side.
    ("span-past-the-side-walls", _span, (
        _e(f"{SLITS}.span_mm", "span_mm: 20", _span, "leaves less than checks.min_wall_mm "
           "(1 mm) beyond the slits' ends", "20.0", "at most 14 mm"),)),
    ("width-missing", _no_width, (
        _e(f"{SLITS}.width_mm", "- kind: slits", _no_width, "is required", None,
           "a number, 0.05 <= value <= 1000 mm"),)),
    ("no-gap-in-a-row-of-one-chamber", _one, (
        _e(f"{SLITS}.kind", "- kind: slits", _one, "needs one chamber row to sit between",
           "'a row of 1 chamber'", "exactly one void of kind chambers"),)),
    ("fins-across-a-parting-plane-along-them", _axis, (
        _e("parting.axis", "axis: y", _axis, "does not let the slits' fins leave with a "
           "shell", "'y'", "z, with parting.offset_mm below every slit"),)),
    ("slits-in-a-body-kind-without-a-flat-top", _section, (
        _e(f"{SLITS}.kind", "- kind: slits", _section, "is cut into a bar body only",
           "'section'", "body.kind: bar"),)),
    ("slits-listed-before-the-chambers", _first, (
        _e("voids[0].kind", "- kind: slits", _first, "is cut from the outside and must be "
           "listed after every cavity void", "'slits'", "move it after voids[1]"),)),
]


@pytest.mark.parametrize("name, text, expect", CASES, ids=[c[0] for c in CASES])
def test_bad_slit_input_exits_2_with_one_located_line_and_writes_nothing(
        name, text, expect, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(text, expect, tmp_path, capsys, monkeypatch)


def test_every_slit_field_has_a_bad_input_case():
    from soft_molds.recipe.kinds.slits import Slits

    paths = {re.sub(r"\[\d+\]$", "", e.path) for c in CASES for e in c[2]}
    for f in Slits.FIELDS:
        assert f"{SLITS}.{f.name}" in paths, f.name
