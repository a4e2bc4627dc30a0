"""The section body as read from a recipe: each outline's placement in the y-z plane, the
default scale centre (the middle of the lowest extent), polygons written either way round,
and the kind's values surviving a pickle. Expected numbers by construction (a D of
diameter d spans y in [-d/2, d/2], z in [0, d/2])."""

from __future__ import annotations

import pickle
from pathlib import Path

import pytest

from soft_molds.recipe import load_recipe, recipe_from_text

ROOT = Path(__file__).resolve().parents[2]

BASE = """\
name: shape-probe
body:
  kind: section
{shape}
  length_mm: 60
  tip_scale: 0.5
voids:
  - kind: bore
    diameter_mm: 3
    length_mm: 20
    center_mm: [0, {bore_z}]
inlet:
  socket_diameter_mm: 4
  socket_depth_mm: 6
parting:
  axis: y
  offset_mm: 0
"""


@pytest.mark.parametrize(("shape", "bore_z", "lo", "hi", "centre"), [
    ("  outline: half-round\n  diameter_mm: 20", 4.0, (-10, 0), (10, 10), (0.0, 0.0)),
    ("  outline: circle\n  diameter_mm: 20", 0.0, (-10, -10), (10, 10), (0.0, -10.0)),
    ("  outline: ellipse\n  width_mm: 24\n  height_mm: 14", 0.0, (-12, -7), (12, 7),
     (0.0, -7.0)),
    ("  outline: rounded-rectangle\n  width_mm: 24\n  height_mm: 14\n  corner_radius_mm: 3",
     0.0, (-12, -7), (12, 7), (0.0, -7.0)),
    # sharp below, rounded above: the top edge stays at z = 14 between the roundings
    ("  outline: polygon\n  points_mm: [[-8, 2], [8, 2], [6, 14], [-6, 14]]\n"
     "  round_mm: [0, 0, 2, 2]", 6.0, (-8, 2), (8, 14), (0.0, 2.0)),
])
def test_each_outline_lies_where_the_reference_says_and_scales_about_its_lowest_middle(
        shape, bore_z, lo, hi, centre):
    r = recipe_from_text(BASE.format(shape=shape, bore_z=bore_z))
    (prim,) = r.body_primitives()
    (y0, z0), (y1, z1) = prim.outline.bounds()
    assert (y0, z0) == pytest.approx(lo, abs=1e-9)
    assert (y1, z1) == pytest.approx(hi, abs=1e-9)
    assert prim.scale_center_mm == pytest.approx(centre)
    # the lowest point of every section stays on the bottom plane when it is the centre
    lo3, _ = prim.bounds()
    assert lo3[2] == pytest.approx(lo[1], abs=1e-9)


def test_a_polygon_written_clockwise_is_the_same_solid():
    ccw = "  outline: polygon\n  points_mm: [[-8, 2], [8, 2], [6, 14], [-6, 14]]\n" \
          "  round_mm: [1, 1, 2, 2]"
    cw = "  outline: polygon\n  points_mm: [[-6, 14], [6, 14], [8, 2], [-8, 2]]\n" \
         "  round_mm: [2, 2, 1, 1]"
    a = recipe_from_text(BASE.format(shape=ccw, bore_z=6.0)).body_primitives()[0]
    b = recipe_from_text(BASE.format(shape=cw, bore_z=6.0)).body_primitives()[0]
    assert a.volume_mm3() == pytest.approx(b.volume_mm3(), rel=1e-12)
    assert a.outline.pieces() == b.outline.pieces()


def test_the_demo_recipes_read_pickle_and_compare_equal():
    for stem in ("seedling-taper-finger", "stem-d-finger"):
        r = load_recipe(ROOT / "recipes" / f"{stem}.yaml")
        assert r.body.KIND == "section" and r.body.outline == "half-round"
        assert pickle.loads(pickle.dumps(r)) == r
