"""A vent or sprue mouth keeps a band of flat ceiling between it and the ceiling's rim.

Found by the drawn-recipe property test: a three-armed plate (sharp top edges) whose vent
mouths came out exactly tangent to the straight sides of the outline left the upper
shell a cavity ceiling of zero width there, which the mesher could not triangulate (the
recipe passed validation and then failed in the kernel). Reference for the clearance:
the plate outline's exact signed distance (closed form, lines and arcs), independent of
the high-point search that placed the mouths.
"""

from __future__ import annotations

import pytest

from soft_molds.analysis.highpoints import MOUTH_RIM_BAND_MM

RECIPE = """\
name: drawn-three-arm
body: {kind: plate, thickness_mm: 14.84, hub_diameter_mm: 31.76, arm_count: 3,
       arm_length_mm: 27.34, arm_width_mm: 26.36, tip_round_mm: 1.02}
voids:
  - {kind: bore, diameter_mm: 3.34, length_mm: 18.77, end_round_mm: 0.54}
"""


@pytest.fixture(scope="module")
def three_arm(tmp_path_factory):
    from soft_molds import build, load_recipe

    path = tmp_path_factory.mktemp("drawn") / "drawn-three-arm.yaml"
    path.write_text(RECIPE)
    recipe = load_recipe(path)
    return recipe, build(recipe)


def test_the_drawn_three_arm_plate_builds_with_closed_shells(three_arm):
    _, molds = three_arm
    upper = molds.part("shell-upper").mesh
    import trimesh

    tm = trimesh.Trimesh(upper.vertices, upper.faces, process=False)
    assert tm.is_watertight and tm.is_winding_consistent


def test_every_mouth_on_the_flat_top_keeps_the_band_from_the_outline(three_arm):
    recipe, molds = three_arm
    outline = recipe.body.solid().outline  # type: ignore[attr-defined]
    import numpy as np

    mouths = molds.plan.step.openings
    assert len(mouths) >= 2
    for m in mouths:
        d = float(outline.sdf(np.array([[m.center_mm[0], m.center_mm[1]]]))[0])
        # Inside the outline by at least the mouth's radius plus the band (1e-6: rounding of
        # the mouth's centre to 1e-6 mm).
        assert d <= -(m.radius_mm + MOUTH_RIM_BAND_MM) + 1e-6, (m, d)
