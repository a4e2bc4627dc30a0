"""The layered casting card says where the tube goes when a channel network opens on the
outline with no socket (no CAD work: the line is worked out from the recipe alone).

Source: the hub gripper's mouth by hand (plane geometry, as tests/plan/
test_layered_mouth_plan.py): the hub's centre at x = 3 + 46 / sqrt(2) = 35.527 mm, its edge
15 mm to the left, x = 20.527 mm, printed to 0.01 mm."""

from __future__ import annotations

from pathlib import Path

from recipe_text import planned_from_text

from soft_molds.export.layered import mouth_text

ROOT = Path(__file__).resolve().parents[2]


def test_the_card_puts_the_tube_on_the_hubs_edge_at_180_deg():
    r = planned_from_text((ROOT / "recipes" / "seedling-hub-gripper.yaml").read_text())
    assert mouth_text(r) == ("The feed groove opens on the body's outline on the hub's edge "
                             "at 180 deg, x = 20.53, y = 0 mm (there is no socket): seal a "
                             "tube into it with a drop of the same silicone.")


def test_a_row_fed_through_its_socket_keeps_the_inlet_face_line():
    r = planned_from_text((ROOT / "recipes" / "seed-tray-pad.yaml").read_text())
    assert mouth_text(r).startswith("The feed groove opens on the inlet face:")
