"""Mold-block rules checked on the plan, before the kernel: keys, clamp holes, notches,
sprue and parting plane must leave printable walls and no undercut. Wall figures are
worked out by hand from the layout (keys and bolts on a line flange_mm / 2 in from the
block edge; MIN_LAND_MM = 1.5 mm, about four 0.4 mm perimeters, common practice)."""

from __future__ import annotations

import pytest
from recipe_text import planned_from_text

from soft_molds.errors import RecipeError
from soft_molds.recipe import recipe_from_text

BASE = """
name: rules
body: {kind: bar, length_mm: 60, width_mm: 16, height_mm: 14, edge_radius_mm: 2}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 40, end_round_mm: 2}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 6}
"""


def problems(extra: str) -> dict[str, str]:
    try:
        planned_from_text(BASE + extra, "rules.yaml", "rules")
    except RecipeError as exc:
        return {p.path: p.message + " " + p.allowed for p in exc.problems}
    return {}


def test_defaults_pass():
    assert problems("") == {}


def test_key_socket_too_close_to_the_block_edge_is_refused():
    # flange 10 -> key centre 5 mm from the edge; socket radius 3.9 + 0.3 + 1.5 > 5.
    got = problems("mold: {flange_mm: 10, key_diameter_mm: 7.8}\n")
    assert "mold.key_diameter_mm" in got and "outer faces" in got["mold.key_diameter_mm"]
    # 2 * (5 - 1.5 - 0.3) = 6.4 mm is the largest key that fits.
    assert "at most 6.4 mm" in got["mold.key_diameter_mm"]
    assert problems("mold: {flange_mm: 10, key_diameter_mm: 6.4}\n") == {}


def test_key_socket_through_the_upper_shell_top_is_refused():
    # Upper shell: 7 mm of body above the plane + 5 mm wall = 12 mm; 12 - 1.5 - 0.3 = 10.2.
    got = problems("mold: {key_height_mm: 10}\n")
    assert got == {}
    got = problems("mold: {wall_mm: 4, key_height_mm: 10}\n")
    assert "mold.key_height_mm" in got and "at most 9.2 mm" in got["mold.key_height_mm"]


def test_clamp_hole_rule_guards_a_narrow_flange():
    """The field range (flange >= 10 mm) keeps these rules quiet for every allowed bolt; a
    recipe forced past validation shows they bite: flange 7 -> bolt centre 3.5 mm from the
    edge; an M5 hole (5.5 mm, ISO 273 medium) leaves 0.75 mm < 1.5 mm of wall."""
    from dataclasses import replace

    from soft_molds.plan.layout import layout_problems, plan_layout

    r = recipe_from_text(BASE, "rules.yaml", "rules")
    assert layout_problems(r, plan_layout(r, "z", 0.0), lambda _p: None) == []
    narrow = replace(r, mold=replace(r.mold, flange_mm=7.0, clamp_bolt="M5",
                                     key_diameter_mm=3.0))
    got = {p.path: p.message for p in layout_problems(narrow, plan_layout(narrow, "z", 0.0),
                                                      lambda _p: None)}
    assert "clamp holes" in got["mold.clamp_bolt"]


def test_sprue_wider_than_the_cavity_top_is_refused():
    # 0.8 x 16 mm body width = 12.8 mm.
    got = problems("mold: {sprue_diameter_mm: 13}\n")
    assert "mold.sprue_diameter_mm" in got and "12.8" in got["mold.sprue_diameter_mm"]


def test_parting_plane_off_a_rods_axis_is_an_undercut():
    rod = """
name: rod
body: {kind: rod, diameter_mm: 20, length_mm: 50, end_round_mm: 2}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 30, center_mm: [0, 4]}
"""
    with pytest.raises(RecipeError) as err:
        planned_from_text(rod, "rod.yaml", "rod")
    paths = {p.path: p for p in err.value.problems}
    assert "parting.offset_mm" in paths and "undercut" in paths["parting.offset_mm"].message


def test_default_parting_plane_follows_an_off_centre_socket_in_a_bar():
    r = recipe_from_text(BASE.replace("end_round_mm: 2}", "end_round_mm: 2, center_mm: [0, 1.5]}"),
                         "b.yaml", "b")
    # The bar's straight sides span z in [-5, 5] (7 - edge radius 2): z = 1.5 is inside.
    assert r.parting.axis == "z" and r.parting.offset_mm == pytest.approx(1.5)


# ---- parting: auto -----------------------------------------------------------------------
def test_auto_parting_with_no_plane_keeping_the_rules_is_refused_before_the_kernel():
    # flange 10 leaves a key at most 6.4 mm wide (as worked out above) on every candidate
    # plane, the block being the same along both cross axes' flanges: no plane keeps the
    # rules, so validation says so instead of the kernel failing to choose.
    got = problems("parting: {axis: auto}\nmold: {flange_mm: 10, key_diameter_mm: 7.8}\n")
    assert "auto finds no candidate plane that keeps the rules" in got["parting.axis"]
    assert "at most 6.4 mm" in got["mold.key_diameter_mm"]


def test_auto_parting_with_a_plane_keeping_the_rules_passes():
    assert problems("parting: {axis: auto}\n") == {}


def test_a_locked_core_print_is_left_to_the_review_when_a_plane_keeps_the_rules():
    from soft_molds.plan import PlaneScore
    from soft_molds.plan.parting import choose

    r = recipe_from_text(BASE + "parting: {axis: auto}\n", "rules.yaml")
    broken = PlaneScore("z", 3.0, 0.0, 0.0, 5.0, rule="leaves too little wall")
    locked = PlaneScore("y", 0.0, 2.0, 12.5, 4.0)  # keeps the rules, locks the core print
    chosen = choose(r, [broken, locked])
    assert (chosen.parting.axis, chosen.parting.offset_mm) == ("y", 0.0)
