"""The overmold process in the plan: registered, a bladder then a skin step on one core
(the same core and key in both, so both steps are coaxial by construction), the skin's
cavity over the ridges or the thread plus the skin thickness, and a double guide whose
helices leave each crossing to exactly one of them.

Sources: a right- and a left-handed helix of one pitch from one start point turn by +t and
-t at the same x, so they meet wherever 2 t is a whole number of turns, t = k pi
(elementary geometry).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from soft_molds import load_recipe
from soft_molds.plan import plan_mold
from soft_molds.plan.model import OvermoldKind
from soft_molds.plan.processes import processes

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def steps():
    r = load_recipe(ROOT / "recipes" / "seedling-wound-finger.yaml")
    return r, plan_mold(r).steps


def test_overmold_gives_a_bladder_then_a_skin_step_on_one_core(steps):
    assert "overmold" in processes()
    r, (first, second) = steps
    assert (first.name, second.name) == ("bladder", "skin")
    assert first.overmold is not None and second.overmold is not None
    assert (first.overmold.kind, second.overmold.kind) == (OvermoldKind.BLADDER,
                                                           OvermoldKind.SKIN)
    assert first.overmold.core == second.overmold.core
    assert first.overmold.wall_mm == second.overmold.wall_mm  # same inlet wall, same key
    # Parted through the axis, pulls +z and -z.
    for s in (first, second):
        assert (s.parting.axis, s.parting.offset_mm) == ("z", 0.0)
    assert [p.name for p in first.parts] == ["shell-lower", "shell-upper", "core", "cast"]
    assert [p.name for p in second.parts] == ["shell-lower", "shell-upper", "cast"]


def test_the_skin_cavity_covers_ridges_and_thread_and_caps_the_core_tip(steps):
    r, (first, second) = steps
    p = r.process
    big = r.body.diameter_mm / 2.0
    assert second.overmold.cavity_radius_mm == pytest.approx(
        big + max(p.guide_height_mm, p.thread_diameter_mm) + p.skin_mm)
    assert second.overmold.cavity_end_x_mm == pytest.approx(
        second.overmold.core.end_x_mm + p.skin_mm)
    assert first.overmold.cavity_end_x_mm == pytest.approx(r.body.length_mm)
    assert second.overmold.core.end_x_mm > r.body.length_mm  # seated in the far wall


def test_each_crossing_of_a_double_guide_is_left_to_one_helix(steps):
    _, (first, _) = steps
    bl = first.overmold.bladder
    total = 2 * math.pi * (bl.length_mm - 2 * bl.guide_start_x_mm) / bl.guide_pitch_mm
    for k in range(int(total / math.pi) + 1):
        t = k * math.pi
        covering = {p.hand for p in bl.pieces if p.t0_rad <= t <= p.t1_rad}
        assert len(covering) == 1, (k, covering)
    # And no two pieces of opposite hands reach the same point: where both cover an x,
    # their angles +t and -t differ by more than the ridges' angular width there.
    right = [p for p in bl.pieces if p.hand > 0]
    left = [p for p in bl.pieces if p.hand < 0]
    ts = [i * total / 20000 for i in range(20001)]
    width_rad = bl.guide_width_mm * math.pi / bl.guide_pitch_mm  # x gap closes at p/pi
    for t in ts:
        if any(p.t0_rad <= t <= p.t1_rad for p in right) and \
                any(p.t0_rad <= t <= p.t1_rad for p in left):
            gap = abs((2 * t + math.pi) % (2 * math.pi) - math.pi) / 2.0
            assert gap > width_rad, t


HALF = ROOT / "recipes" / "seedling-bend-wound-finger.yaml"


@pytest.fixture(scope="module")
def half_steps():
    r = load_recipe(HALF)
    return r, plan_mold(r).steps


def test_a_round_bladder_hashes_without_the_half_round_fields(steps, half_steps):
    from recipe_text import edit, planned_from_text

    r, _ = steps
    h, _ = half_steps
    # The round recipe's process values are those it had before the half-round existed,
    # so its hash and manifest do not change.
    assert set(r.params()["process"]) == {
        "kind", "skin_mm", "guides", "guide_pitch_mm", "guide_height_mm",
        "guide_width_mm", "thread_diameter_mm"}
    assert {"bladder", "sheet", "cover_margin_mm"} <= set(h.params()["process"])
    # The sheet is part of what a half-round recipe builds: another sheet, another hash.
    fabric = planned_from_text(edit(HALF.read_text(), "sheet: paper", "sheet: fabric"))
    assert fabric.params_sha256() != planned_from_text(HALF.read_text()).params_sha256()


def test_a_half_round_bladder_parts_on_its_flat_face_and_the_skin_parallel_to_it(
        half_steps):
    r, (first, second) = half_steps
    p = r.process
    big, small = r.body.diameter_mm / 2.0, r.voids[0].diameter_mm / 2.0
    a, b = first.overmold, second.overmold
    assert a.bladder.half_round and a.bladder.wall_mm == pytest.approx(big - small)
    for s in (first, second):
        assert (s.parting.axis, s.parting.offset_mm) == ("z", 0.0)
    # Step 1: the flat face in the parting plane (the lower shell a plate of mold.wall_mm);
    # step 2: the skin's flat face thread + skin below it.
    assert a.flat_depth_mm == 0.0 and a.block_lo[2] == pytest.approx(-r.mold.wall_mm)
    assert b.flat_depth_mm == pytest.approx(p.thread_diameter_mm + p.skin_mm)
    assert b.block_lo[2] == pytest.approx(-(b.flat_depth_mm + r.mold.wall_mm))
    # One core for both: the bore's part above the flat wall, its key across z = 0 so the
    # parting plane splits its pocket in both steps.
    assert a.core == b.core and a.core.flat_z_mm == pytest.approx(big - small)
    (_, _, z0), (_, _, z1) = a.core.key_box
    assert z0 < 0.0 < small < z1
    # The sheet: on the thread, the cover margin in from the flat face's edges and ends.
    assert a.sheet is None and b.sheet is not None
    assert (b.sheet.x0_mm, b.sheet.x1_mm, b.sheet.half_width_mm, b.sheet.z_mm) == \
        pytest.approx((p.cover_margin_mm, r.body.length_mm - p.cover_margin_mm,
                       big - p.cover_margin_mm, -p.thread_diameter_mm))


def test_a_half_round_without_a_sheet_plans_none(half_steps):
    from recipe_text import edit, planned_from_text

    r = planned_from_text(edit(HALF.read_text(), "sheet: paper", "sheet: none"))
    _, second = plan_mold(r).steps
    assert second.overmold.sheet is None
