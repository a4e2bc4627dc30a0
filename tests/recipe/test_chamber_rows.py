"""The chamber row as the recipe reads it: per-chamber sizes, a single chamber without a
pitch, the default placement beside the tube socket, and the keys a thin wall names.
Expected positions come from the recipe numbers by elementary geometry (a row of n
chambers at pitch p whose last is d deep is (n - 1) p + d long; centred in a body of
length L it starts at (L - that) / 2)."""

from __future__ import annotations

import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds.errors import RecipeError
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.fields import Grade, per_item


def problems_of(text: str):
    with pytest.raises(RecipeError) as exc:
        recipe_from_text(text)
    return exc.value.problems


def test_a_grade_spaces_the_sizes_evenly_and_ends_on_both_given_values():
    assert per_item(Grade(8.0, 5.0), 4) == (8.0, 7.0, 6.0, 5.0)
    assert per_item(Grade(8.0, 5.0), 1) == (8.0,)
    assert per_item(6.0, 3) == (6.0, 6.0, 6.0)
    assert per_item((1.0, 2.0), 2) == (1.0, 2.0)


def test_plain_numbers_still_give_one_size_to_every_chamber():
    (v,) = recipe_from_text(FINGER_TEXT).voids
    assert v.width_mm == 12.0 and v.sizes_mm("width_mm") == (12.0, 12.0, 12.0)


def test_listed_and_graded_sizes_reach_each_chamber_box():
    text = edit(FINGER_TEXT, "width_mm: 12", "width_mm: {from: 12, to: 10}")
    text = edit(text, "height_mm: 8", "height_mm: [8, 7, 6]")
    r = recipe_from_text(text)
    boxes = r.voids[0].chamber_boxes(r.body_length_mm)
    assert [b.size_mm for b in boxes] == [(5.0, 12.0, 8.0), (5.0, 11.0, 7.0), (5.0, 10.0, 6.0)]
    # 3 chambers of 5 mm at pitch 8 in a 70 mm bar: (70 - 21) / 2 = 24.5, then every 8 mm
    assert [b.center_mm[0] for b in boxes] == [27.0, 35.0, 43.0]


def test_one_chamber_needs_no_pitch_and_ignores_one_given():
    one = edit(FINGER_TEXT, "count: 3", "count: 1")
    without = recipe_from_text(edit(one, "    pitch_mm: 8\n", ""))
    # a pitch shorter than the depth no longer matters with nothing to space
    short = recipe_from_text(edit(one, "pitch_mm: 8", "pitch_mm: 2"))
    for r in (without, short):
        (box,) = r.voids[0].chamber_boxes(r.body_length_mm)
        assert box.center_mm == (35.0, 0.0, 0.0)  # a 5 mm chamber centred in 70 mm
        assert r.voids[0].feed_channel(r.body_length_mm).length_mm == 35.0


# A 95 mm finger with an 8 mm socket: 10 chambers 6 mm deep every 8 mm make a 78 mm row;
# centred it would start at (95 - 78) / 2 = 8.5 mm, 0.5 mm past the socket floor.
LONG = edit(edit(edit(edit(FINGER_TEXT, "length_mm: 70", "length_mm: 95"), "count: 3",
                      "count: 10"), "depth_mm: 5", "depth_mm: 6"),
            "socket_depth_mm: 6", "socket_depth_mm: 8")


def test_the_default_row_starts_past_the_socket_floor_and_the_least_wall():
    r = recipe_from_text(LONG)
    v = r.voids[0]
    assert v.first_mm(r.body_length_mm) == 8.0 + 1.0  # socket depth + checks.min_wall_mm
    # the far end keeps its wall: 95 - (9 + 78) = 8 mm
    assert r.body_length_mm - v.first_mm(r.body_length_mm) - v.row_length_mm() == 8.0


def test_a_row_that_centres_clear_of_the_socket_stays_centred():
    r = recipe_from_text(FINGER_TEXT)
    assert r.voids[0].start_mm is None  # what the recipe wrote, as written
    assert r.voids[0].first_mm(r.body_length_mm) == 24.5


def test_a_row_placed_by_start_mm_is_left_where_written_and_its_thin_wall_named():
    text = edit(LONG, "    feed_diameter_mm", "    start_mm: 8.5\n    feed_diameter_mm")
    (p,) = problems_of(text)
    assert p.path == "voids[0].start_mm"
    assert p.message.startswith("leaves a silicone wall of 0.50 mm to the inlet socket's floor")
    for key in ("voids[0].start_mm", "inlet.socket_depth_mm (8 mm)", "checks.min_wall_mm"):
        assert key in p.allowed


def test_a_thin_top_wall_names_the_height_and_the_centre():
    # chambers 12.04 mm high centred in a 14 mm bar: (14 - 12.04) / 2 = 0.98 mm on top
    (p,) = problems_of(edit(FINGER_TEXT, "height_mm: 8", "height_mm: 12.04"))
    assert "0.98 mm" in p.message
    assert "voids[0].height_mm, voids[0].center_mm, the body's size" in p.allowed


TAPER = """\
body:
  kind: revolved
  profile_mm: [[0, 9], [90, 5.5]]
voids:
  - kind: chambers
    count: 5
    pitch_mm: 15
    depth_mm: 7
    width_mm: {w}
    height_mm: {h}
    corner_radius_mm: 1
"""


def test_chambers_that_follow_a_taper_fit_where_equal_ones_break_out():
    # The body's radius falls from 9 to 5.5 mm; the last chamber ends at x = 78.5, where it
    # is 9 - 3.5 x 78.5 / 90 = 5.95 mm. A 10 x 9 chamber with 1 mm corners reaches
    # sqrt(4^2 + 3.5^2) + 1 = 6.32 mm from the axis: out; a 7 x 7 one 4.54 mm: in.
    found = problems_of(TAPER.format(w=10, h=9))
    assert [p.path for p in found] == ["voids[0]"]
    assert "breaks through the body surface at (77.50," in found[0].message
    recipe_from_text(TAPER.format(w="{from: 10, to: 7}", h="{from: 9, to: 7}"))


def test_a_bore_wider_than_the_socket_is_reached_from_it():
    # A 4 mm tube into an 8 mm bore that starts 3 mm in, inside the 6 mm deep socket: the
    # socket's section lies inside the bore's, so the socket opens into it.
    text = """\
body: {kind: rod, diameter_mm: 16, length_mm: 50, end_round_mm: 2}
voids:
  - {kind: bore, diameter_mm: 8, length_mm: 40, start_mm: 3, end_round_mm: 4}
inlet: {socket_diameter_mm: 4, socket_depth_mm: 6}
"""
    r = recipe_from_text(text)
    assert r.voids[0].entry().radius_mm == 2 * r.inlet.socket_diameter_mm / 2
    # 2.5 mm off the axis the bore (radius 4) no longer holds the socket (radius 2), as
    # 2.5 + 2 > 4, nor the socket the bore: not reached.
    off = problems_of(text.replace("end_round_mm: 4}", "end_round_mm: 4, center_mm: [0, 2.5]}")
                      .replace("socket_depth_mm: 6}", "socket_depth_mm: 6, center_mm: [0, 0]}"))
    assert [p.message for p in off] == ["is not reached from the inlet socket"]
