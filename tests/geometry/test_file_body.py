"""A body drawn in a STEP file gives the same mold set as the same body from recipe fields:
the seedling finger's 70 x 16 x 14 mm bar, rounded by 2 mm, written with cadquery's own
fillet into a STEP file and named by a ``file`` body, against the bundled ``bar`` recipe.
One build of each (the bar's is shared through conftest).

Outside references: the Steiner formula of the rounded box (abc + 2r(ab+bc+ca) +
pi r^2 (a+b+c) + 4/3 pi r^3, inner box a x b x c), the chamber row's closed form (boxes,
cylinders: tests/geometry/test_volumes.py), trimesh and manifold3d reading the meshes
with their own code.
"""

from __future__ import annotations

import itertools
import math
from collections import Counter

import manifold3d as m3
import pytest
import stepfiles
from conftest import ROOT, built, recipe_path
from meshes import manifold


def _volumes():
    """The closed forms of tests/geometry/test_volumes.py (a test module, loaded by path)."""
    import importlib.util

    spec = importlib.util.spec_from_file_location(
        "closed_form_volumes", ROOT / "tests" / "geometry" / "test_volumes.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


VOLUMES = _volumes()
FINGER = VOLUMES.FINGER
finger_void_volume = VOLUMES.finger_void_volume
rounded_box_volume = VOLUMES.rounded_box_volume

BAR = """\
body:
  kind: bar
  length_mm: 70
  width_mm: 16
  height_mm: 14
  edge_radius_mm: 2"""
DRAWN = """\
body:
  kind: file
  path: bar.step"""

_built: dict[str, object] = {}


@pytest.fixture(scope="module")
def drawn(tmp_path_factory):
    """The finger with its bar drawn in a STEP file (built once for this file)."""
    if "drawn" not in _built:
        from soft_molds import build, load_recipe

        folder = tmp_path_factory.mktemp("drawn-finger")
        (folder / "bar.step").write_bytes(stepfiles.rounded_box_bytes(70.0, 16.0, 14.0, 2.0))
        text = recipe_path("seedling-finger").read_text()
        assert BAR in text
        (folder / "seedling-finger.yaml").write_text(text.replace(BAR, DRAWN))
        _built["drawn"] = build(load_recipe(folder / "seedling-finger.yaml"))
    return _built["drawn"]


def test_every_part_holds_the_volume_of_the_bar_recipes_part(drawn):
    bar = built("seedling-finger")
    assert [p.name for p in drawn.parts] == [p.name for p in bar.parts]
    for a, b in zip(drawn.parts, bar.parts):
        assert a.brep_volume_mm3 == pytest.approx(b.brep_volume_mm3, rel=1e-3), a.name


def test_the_review_finds_the_same_checks_at_the_same_severities(drawn):
    bar = built("seedling-finger")

    def seen(molds) -> Counter:
        return Counter((f.check, f.severity.value, f.part) for f in molds.findings)

    assert seen(drawn) == seen(bar)


def test_the_cast_holds_the_closed_form_volume(drawn):
    f = FINGER
    want = rounded_box_volume(f["L"], f["W"], f["H"], f["R"]) - finger_void_volume()
    assert drawn.part("cast").brep_volume_mm3 == pytest.approx(want, rel=1e-3)
    assert drawn.volumes_mm3["body"] == pytest.approx(
        rounded_box_volume(f["L"], f["W"], f["H"], f["R"]), rel=1e-6)



def test_parts_are_closed_and_do_not_interpenetrate(drawn):
    """The independent checks every bundled mold set gets (tests/geometry/test_mold.py;
    the bundled drawn demo, seedling-pad-from-cad, gets all of them there)."""
    solids = {}
    for part in drawn.parts:
        tm = part.mesh.to_trimesh()
        assert tm.is_watertight and tm.is_winding_consistent and tm.is_volume, part.name
        mf = manifold(part.mesh)
        assert mf.status() == m3.Error.NoError, part.name
        assert mf.volume() == pytest.approx(part.brep_volume_mm3, rel=0.005), part.name
        solids[part.name] = mf
    for a, b in itertools.combinations(solids, 2):
        inter = (solids[a] ^ solids[b]).volume()
        assert inter < 5e-4 * min(solids[a].volume(), solids[b].volume()), (a, b)


def test_the_motion_prediction_agrees_with_the_bar_recipes(drawn):
    bar = built("seedling-finger")
    assert drawn.motion is not None and bar.motion is not None
    a, b = drawn.motion, bar.motion
    # The motion model reads sections of the cast mesh: the same body, meshed from two
    # BReps, moves alike to within a percent.
    assert a.model == b.model
    assert math.isclose(a.linear_deg_per_kpa, b.linear_deg_per_kpa, rel_tol=0.01)
    assert math.isclose(a.valid_to_kpa, b.valid_to_kpa, rel_tol=0.01)
