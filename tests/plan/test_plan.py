"""The plan of a one-shot mold, checked against hand arithmetic: parts and their pull
directions, the block laid around the body's bounds (wall + flange beyond them), the core
support, and a body that is not centred on the x axis planned from its own geometry."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds.errors import RecipeError
from soft_molds.plan import Opening, Role, plan_mold, with_openings
from soft_molds.plan.parting import candidate_planes
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.fields import Field, number
from soft_molds.recipe.primitives import RoundedBox, RoundedRod
from soft_molds.recipe.registry import BODY_KINDS, body_kind


def test_one_shot_plan_has_one_step_with_four_parts_and_their_pulls():
    plan = plan_mold(recipe_from_text(FINGER_TEXT, "f.yaml", "f"))
    (step,) = plan.steps
    got = {(p.name, p.role, p.pull_dir) for p in step.parts}
    # Parting axis z points up: lower pulls -z, upper +z, the core -x out of the inlet.
    assert got == {("shell-lower", Role.SHELL, (0.0, 0.0, -1.0)),
                   ("shell-upper", Role.SHELL, (0.0, 0.0, 1.0)),
                   ("core", Role.CORE, (-1.0, 0.0, 0.0)),
                   ("cast", Role.CAST, None)}
    assert step.openings == ()


def test_the_block_is_the_body_bounds_grown_by_wall_and_flange():
    r = recipe_from_text(FINGER_TEXT, "f.yaml", "f")
    lay = plan_mold(r).step.settled_layout
    lo, hi = r.body_bounds()
    band = r.mold.wall_mm + r.mold.flange_mm
    # In the parting plane (x and y) the block reaches wall + flange past the body; across
    # it (z) the wall alone.
    assert lay.block_lo == pytest.approx((lo[0] - band, lo[1] - band, lo[2] - r.mold.wall_mm))
    assert lay.block_hi == pytest.approx((hi[0] + band, hi[1] + band, hi[2] + r.mold.wall_mm))


def test_the_core_print_runs_from_outside_the_block_to_the_socket_floor():
    r = recipe_from_text(FINGER_TEXT, "f.yaml", "f")
    sup = plan_mold(r).step.core_supports[0]
    band = r.mold.wall_mm + r.mold.flange_mm
    assert sup.start_x_mm == pytest.approx(-band - r.mold.core_handle_mm)
    assert sup.end_x_mm == r.inlet.socket_depth_mm
    assert sup.radius_mm == r.inlet.socket_diameter_mm / 2.0
    (klo, khi) = sup.key_box
    # The key sits inside the inlet wall (x in [-band, 0]) with a land each side.
    assert -band < klo[0] < khi[0] < 0.0


def test_openings_enter_the_plan_as_given():
    plan = plan_mold(recipe_from_text(FINGER_TEXT, "f.yaml", "f"))
    ops = (Opening("sprue", (30.0, 0.0, 7.0), 2.0, 6.5),)
    assert with_openings(plan, ops).step.openings == ops
    assert plan.step.openings == ()  # plans are values: the first is unchanged


@pytest.fixture
def offset_bar():
    """A body kind that lies off the x axis (centre at y = 5, z = 3)."""
    @body_kind("probe-offset-bar")
    @dataclass(frozen=True)
    class OffsetBar:
        FIELDS: ClassVar[tuple[Field, ...]] = (number("length_mm", "length along x"),)
        length_mm: float

        @classmethod
        def cross_check(cls, v, path, line):
            return []

        def primitives(self):
            return (RoundedBox((self.length_mm / 2.0, 5.0, 3.0), (self.length_mm, 16.0, 14.0),
                               2.0),)

    yield OffsetBar
    BODY_KINDS.pop("probe-offset-bar", None)


OFFSET_TEXT = """
name: offset
body: {kind: probe-offset-bar, length_mm: 60}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 40, center_mm: [5, 3], end_round_mm: 2}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 6}
parting: {axis: z}
"""


def test_a_body_off_the_axis_is_planned_around_its_own_bounds(offset_bar):
    r = recipe_from_text(OFFSET_TEXT, "o.yaml", "o")
    step = plan_mold(r).step
    assert step.settled_parting.offset_mm == 3.0  # through the socket, at (5, 3)
    lay = step.settled_layout
    band = r.mold.wall_mm + r.mold.flange_mm
    assert lay.block_lo[1] == pytest.approx(5.0 - 8.0 - band)
    assert lay.block_hi[2] == pytest.approx(3.0 + 7.0 + r.mold.wall_mm)
    # The widest section along z is z = 3 (the box's middle), not z = 0.
    assert ("z", 3.0) in candidate_planes(r)
    assert ("z", 0.0) not in candidate_planes(r)


def test_a_plane_off_the_widest_section_of_an_off_axis_rod_is_refused():
    @body_kind("probe-offset-rod")
    @dataclass(frozen=True)
    class OffsetRod:
        FIELDS: ClassVar[tuple[Field, ...]] = (number("length_mm", "length along x"),)
        length_mm: float

        @classmethod
        def cross_check(cls, v, path, line):
            return []

        def primitives(self):
            return (RoundedRod("x", 0.0, self.length_mm, (5.0, 3.0), 10.0, 1.0),)

    text = OFFSET_TEXT.replace("probe-offset-bar", "probe-offset-rod")
    try:
        centred = plan_mold(recipe_from_text(text, "o.yaml", "o"))  # socket on the axis
        high = recipe_from_text(edit(text, "center_mm: [5, 3]", "center_mm: [5, 6]"), "o.yaml",
                                "o")
        with pytest.raises(RecipeError) as err:
            plan_mold(high)
    finally:
        BODY_KINDS.pop("probe-offset-rod", None)
    assert centred.step.settled_parting.offset_mm == 3.0
    # z = 6 is 3 mm off the rod's axis at z = 3: a chord of 2 sqrt(100 - 9) < 20 mm.
    msgs = {p.path: p.message for p in err.value.problems}
    assert "widest" in msgs["parting.offset_mm"]


def test_a_body_that_does_not_start_at_the_inlet_face_is_refused(offset_bar, tmp_path):
    import soft_molds

    @body_kind("probe-late-bar")
    @dataclass(frozen=True)
    class LateBar:
        FIELDS: ClassVar[tuple[Field, ...]] = (number("length_mm", "length along x"),)
        length_mm: float

        @classmethod
        def cross_check(cls, v, path, line):
            return []

        def primitives(self):
            return (RoundedBox((self.length_mm / 2.0 + 2.0, 5.0, 3.0),
                               (self.length_mm, 16.0, 14.0), 2.0),)

    path = tmp_path / "late.yaml"
    path.write_text(OFFSET_TEXT.replace("probe-offset-bar", "probe-late-bar"))
    try:
        with pytest.raises(RecipeError) as err:
            soft_molds.load_recipe(path)
    finally:
        BODY_KINDS.pop("probe-late-bar", None)
    # Reported with the recipe's own problems (the socket no longer meets the body), at once.
    found = {p.path: p for p in err.value.problems}
    assert "inlet face x = 0" in found["body"].message and found["body"].value == 2.0
    assert "inlet.center_mm" in found
