"""The plan of a recipe with several inlets: one core support per socket, on its own face;
parting planes only through every socket centre (so each core print seats in both shells:
elementary geometry of a plane and the prints' axes)."""

from __future__ import annotations

from pathlib import Path

from recipe_text import END_FED, edit

from soft_molds.plan import plan_mold, plan_problems
from soft_molds.plan.layout import block_band_mm
from soft_molds.plan.parting import candidate_planes
from soft_molds.recipe import recipe_from_text

ROOT = Path(__file__).resolve().parents[2]
TWO_WAY = (ROOT / "recipes" / "seedling-two-way-finger.yaml").read_text()
PARTING = ("  axis: y\n  offset_mm: 0               # through both sockets' centres, so each "
           "core seats in both halves\n")


def test_auto_parting_offers_only_planes_through_both_sockets():
    r = recipe_from_text(edit(TWO_WAY, PARTING, "  axis: auto\n"))
    # Sockets at (y, z) = (0, 5.5) and (0, -5.5): of the candidates (y = 0 and the
    # quarter and half offsets either side; z through the first socket and the widest
    # section ...) only y = 0 holds both centres.
    assert candidate_planes(r) == [("y", 0.0)]
    assert plan_problems(r) == []


def test_one_core_support_per_socket_each_on_its_own_face():
    r = recipe_from_text(END_FED)
    step = plan_mold(r).step
    band = block_band_mm(r)
    length = r.body_length_mm
    start, end = step.core_supports
    assert (start.part, start.voids, start.pull_dir) == ("core-1", (0,), (-1.0, 0.0, 0.0))
    assert (end.part, end.voids, end.pull_dir) == ("core-2", (1,), (1.0, 0.0, 0.0))
    assert start.end_x_mm == 6.0 and start.start_x_mm == -band - r.mold.core_handle_mm
    assert end.end_x_mm == length - 6.0
    assert end.start_x_mm == length + band + r.mold.core_handle_mm
    # The square key sits inside the block's wall at its own face.
    (klo, khi) = end.key_box
    assert length < klo[0] < khi[0] < length + band
    (klo, khi) = start.key_box
    assert -band < klo[0] < khi[0] < 0.0
    assert [p.name for p in step.parts] == ["shell-lower", "shell-upper", "core-1", "core-2",
                                            "cast"]


def test_a_one_socket_recipe_keeps_its_one_core_named_core():
    from recipe_text import FINGER_TEXT

    step = plan_mold(recipe_from_text(FINGER_TEXT)).step
    assert [s.part for s in step.core_supports] == ["core"]
