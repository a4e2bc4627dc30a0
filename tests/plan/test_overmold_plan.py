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
