"""Bad input for the ``plate`` body and for a plate cast layered: exit status 2, one
located line naming the field, nothing written, refused before any CAD work.

Line numbers are those of the documents here, found by text. The hub's limits are
elementary geometry: an arm of half width h meets the hub circle of radius R at
sqrt(R^2 - h^2) along its axis, 2 asin(h / R) of the circle apart; two arms whose angular
gap is at least that meet only inside the disc.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

ROOT = Path(__file__).resolve().parents[2]
PAD = (ROOT / "recipes" / "seed-tray-pad.yaml").read_text()

# Demo scenario: a four-armed flat gripper that lifts seedling plugs by their rims, cast in
# one piece; a bore along the arm that points at the inlet face feeds it.
HUB = """\
# demo scenario: a four-armed plug lifter
name: plug-lifter
body:
  kind: plate
  thickness_mm: 10
  hub_diameter_mm: 30
  arm_count: 4
  arm_length_mm: 45
  arm_width_mm: 14
  tip_round_mm: 3
voids:
  - kind: bore
    diameter_mm: 3
    length_mm: 30
inlet:
  socket_diameter_mm: 4
  socket_depth_mm: 6
"""

CASES = [
    # (name, text, (old, new), field, words; the line is where ``new`` is)
    ("both-outlines", HUB, ("  arm_count: 4\n", "  arm_count: 4\n  outline_mm: [[0, 0], "
                            "[9, 0], [0, 9]]\n"), "body.hub_diameter_mm",
     "is not used with outline_mm"),
    ("no-outline", HUB, ("  hub_diameter_mm: 30\n  arm_count: 4\n  arm_length_mm: 45\n"
                         "  arm_width_mm: 14\n  tip_round_mm: 3\n", ""), "body.outline_mm",
     "is required (or the hub fields)"),
    ("hub-without-arm-count", HUB, ("  arm_count: 4\n", ""), "body.arm_count",
     "is required with hub_diameter_mm"),
    ("corner-radius-on-a-hub", HUB, ("  tip_round_mm: 3\n",
                                     "  tip_round_mm: 3\n  corner_radius_mm: 2\n"),
     "body.corner_radius_mm", "is not used by a hub outline"),
    ("arm-as-wide-as-the-hub", HUB, ("arm_width_mm: 14", "arm_width_mm: 30"),
     "body.arm_width_mm", "is not narrower than the hub"),
    ("tip-round-over-half-width", HUB, ("tip_round_mm: 3", "tip_round_mm: 8"),
     "body.tip_round_mm", "is more than half the arm's width"),
    # sqrt(15^2 - 7^2) + 3 = 16.27 mm: an arm of 16 ends inside the hub's reach.
    ("arm-inside-the-hub", HUB, ("arm_length_mm: 45", "arm_length_mm: 16"),
     "body.arm_length_mm", "leaves the arms no straight side beyond the hub"),
    ("angle-per-arm", HUB, ("  tip_round_mm: 3\n", "  tip_round_mm: 3\n"
                            "  arm_angles_deg: [0, 90, 180]\n"), "body.arm_angles_deg",
     "does not give one angle per arm"),
    # 2 asin(7 / 15) = 55.6 deg: arms 40 deg apart overlap.
    ("arms-overlap", HUB, ("  tip_round_mm: 3\n", "  tip_round_mm: 3\n"
                           "  arm_angles_deg: [180, 220, 0, 90]\n"), "body.arm_angles_deg",
     "makes the arms at 180 and 220 deg overlap"),
    ("too-many-arms-for-the-hub", HUB, ("arm_count: 4", "arm_count: 7"), "body.arm_count",
     "makes the arms at"),
    ("angle-out-of-range", HUB, ("  tip_round_mm: 3\n", "  tip_round_mm: 3\n"
                                 "  arm_angles_deg: [0, 90, 180, 400]\n"),
     "body.arm_angles_deg[3]", "is out of range"),
    ("no-thickness", HUB, ("thickness_mm: 10", "thickness_mm: 0"), "body.thickness_mm",
     "is out of range"),
    ("outline-crosses-itself", PAD, ("[70, -9], [70, 9]", "[70, 9], [70, -9]"),
     "body.outline_mm[4]", "starts an edge that crosses"),
    ("rounding-too-big", PAD, ("corner_radius_mm: 4", "corner_radius_mm: 30"),
     "body.outline_mm[0]", "has a rounding that does not fit"),
    ("one-rounding-per-corner", PAD, ("corner_radius_mm: 4", "corner_radius_mm: [4, 4]"),
     "body.corner_radius_mm", "does not give one rounding per point"),
    # The pad is 34 mm wide at most, 18 at its inlet edge: a 9.5 mm margin leaves no sheet
    # across the left edge's corners (its offset turns the edge round).
    ("margin-too-big-for-the-plate", PAD, ("cover_margin_mm: 2.5", "cover_margin_mm: 17"),
     "process.cover_margin_mm", "does not fit the plate's outline"),
    ("bond-face-above-the-plate", PAD, ("base_mm: 3 ", "base_mm: 12 "), "process.base_mm",
     "puts the bond face at or above the plate's top"),
]


@pytest.mark.parametrize(("name", "text", "change", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_a_bad_plate_exits_2_with_one_located_line(name, text, change, field, words,
                                                    tmp_path, capsys, no_cad_work):
    changed = edit(text, *change)
    path, line = refused_once(changed, tmp_path, capsys)
    needle = change[1].strip().splitlines()[-1] if change[1].strip() else "body:"
    if name == "no-outline":  # the block's own line
        needle = "body:"
    if name == "both-outlines":  # the first hub field, naming the others
        needle = "hub_diameter_mm"
    if name == "rounding-too-big":  # the corner's point, on the outline's line
        needle = "outline_mm:"
    assert line.startswith(f"{path}:{line_of(changed, needle)}: {field}"), line
    assert words in line, line


def test_a_round_tipped_arm_gives_the_socket_no_flat_face(tmp_path, capsys, monkeypatch,
                                                         no_cad_work):
    from refusals import Expect, assert_build_refused

    # Half the width rounds the tip: the socket's rim (2 mm + 1 mm wall) leaves the face.
    text = edit(HUB, "tip_round_mm: 3", "tip_round_mm: 7")
    line = line_of(text, "socket_diameter_mm") - 1
    assert_build_refused(text, (
        Expect("inlet.center_mm", line, "puts the socket off the flat inlet face (x = 0)"),
        Expect("inlet", line, "leaves a silicone wall of")), tmp_path, capsys, monkeypatch)


def test_a_flat_tipped_hub_with_a_bore_is_planned_one_shot():
    # Cheap (no CAD): the recipe passes every rule and its plan has one pour with one core
    # leaving through the socket in the tip of the arm at x = 0; a one-shot build of it was
    # measured (about 8 s, cast 23 785 mm3) while writing this kind.
    from recipe_text import planned_from_text

    from soft_molds.plan import plan_mold

    recipe = planned_from_text(HUB)
    (step,) = plan_mold(recipe).steps
    assert len(step.core_supports) == 1
    lo, hi = recipe.body_bounds()
    assert abs(lo[0]) < 1e-9 and abs(hi[0] - 90.0) < 1e-9
