"""The ``file`` body's mesh-backed primitive against the closed form of the same solid: a
rounded box drawn with cadquery and read back answers distance, bounds, sections,
surface samples and volume as the ``RoundedBox`` primitive does, to the mesh's chord.

Outside references: the rounded box's exact signed distance (the Minkowski sum of a box
and a ball: the box's distance less the radius), its Steiner volume
abc + 2r(ab+bc+ca) + pi r^2 (a+b+c) + 4/3 pi r^3 (inner box a x b x c), the rotation
matrices of a turn about x, y and z (right-handed), elementary geometry for the sections.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
import stepfiles

from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.kinds.file import FileBody
from soft_molds.recipe.meshsolid import MeshSolid
from soft_molds.recipe.primitives import RoundedBox

# The seedling finger's bar: 70 x 16 x 14 mm, every edge rounded by 2 mm.
L, W, H, R = 70.0, 16.0, 14.0, 2.0
BOX = RoundedBox((L / 2.0, 0.0, 0.0), (L, W, H), R)
RECIPE = """\
body: {{kind: file, path: bar.step{extra}}}
voids:
  - {{kind: bore, diameter_mm: 4, length_mm: 50, end_round_mm: 2}}
"""

_cache: dict[str, object] = {}
PRINTER = {"bed_mm": (220.0, 220.0), "height_mm": 250.0}


def folder_with_bar(tmp_path_factory, at=(0.0, 0.0, 0.0)) -> Path:
    key = f"folder{at}"
    if key not in _cache:
        folder = Path(tmp_path_factory.mktemp("bar"))
        (folder / "bar.step").write_bytes(stepfiles.rounded_box_bytes(L, W, H, R, at))
        _cache[key] = folder
    return _cache[key]  # type: ignore[return-value]


def read(tmp_path_factory, at=(0.0, 0.0, 0.0), translate=(0.0, 0.0, 0.0),
         rotate=(0.0, 0.0, 0.0)) -> FileBody:
    """The bar drawn at ``at``, read as a file body with a placement."""
    key = f"body{at}{translate}{rotate}"
    if key not in _cache:
        body, problems = FileBody("bar.step", translate, rotate).read_file(
            folder_with_bar(tmp_path_factory, at), PRINTER, "body", {})
        assert not problems and body is not None, problems
        _cache[key] = body
    return _cache[key]  # type: ignore[return-value]


def recipe(tmp_path_factory):
    if "recipe" not in _cache:
        _cache["recipe"] = recipe_from_text(RECIPE.format(extra=""),
                                            base_dir=folder_with_bar(tmp_path_factory))
    return _cache["recipe"]


def solid(tmp_path_factory) -> MeshSolid:
    (p,) = read(tmp_path_factory).primitives()
    assert isinstance(p, MeshSolid)
    return p


def steiner(a: float, b: float, c: float, r: float) -> float:
    a, b, c = a - 2 * r, b - 2 * r, c - 2 * r
    return a * b * c + 2 * r * (a * b + b * c + c * a) + math.pi * r * r * (a + b + c) \
        + 4.0 / 3.0 * math.pi * r ** 3


def test_volume_and_bounds_are_the_solids(tmp_path_factory):
    p = solid(tmp_path_factory)
    assert p.volume_mm3() == pytest.approx(steiner(L, W, H, R), rel=1e-6)
    lo, hi = p.bounds()
    assert lo == pytest.approx([0.0, -W / 2, -H / 2], abs=1e-6)
    assert hi == pytest.approx([L, W / 2, H / 2], abs=1e-6)


def test_signed_distance_matches_the_closed_form_inside_outside_and_far(tmp_path_factory):
    p = solid(tmp_path_factory)
    rng = np.random.default_rng(7)
    pts = np.concatenate([rng.uniform([-5, -12, -10], [75, 12, 10], (3000, 3)),
                          rng.uniform([-60, -60, -60], [130, 60, 60], (500, 3))])
    got, want = p.sdf(pts), BOX.sdf(pts)
    chord = p.body.chord_mm
    # The mesh is inscribed in the rounded faces (its vertices lie on them): within the
    # chord of the exact distance, and the same side wherever that is decided.
    assert np.abs(got - want).max() <= chord + 1e-9
    clear = np.abs(want) > chord
    assert np.all(np.sign(got[clear]) == np.sign(want[clear]))
    # Flat faces are exact: a point 1 mm inside the middle of the top face.
    assert p.sdf(np.array([[L / 2, 0.0, H / 2 - 1.0]]))[0] == pytest.approx(-1.0, abs=1e-9)


@pytest.mark.parametrize("v, w, t", [(1, 2, 0.0), (1, 2, 6.5), (0, 2, 6.9), (2, 1, -7.5),
                                     (1, 0, 1.0), (0, 1, 0.0)])
def test_sections_match_the_closed_form(tmp_path_factory, v, w, t):
    got = solid(tmp_path_factory).section_extent(v, w, t)
    want = BOX.section_extent(v, w, t)
    assert got is not None and want is not None
    # A section through a rounded edge cuts the chords of the mesh: inside by the chord.
    assert got == pytest.approx(want, abs=solid(tmp_path_factory).body.chord_mm)


def test_a_plane_beyond_the_body_misses_it(tmp_path_factory):
    assert solid(tmp_path_factory).section_extent(1, 2, H / 2 + 0.1) is None


def test_surface_samples_lie_on_the_surface_and_cover_it(tmp_path_factory):
    pts = solid(tmp_path_factory).surface_samples(1.0)
    assert np.abs(BOX.sdf(pts)).max() <= solid(tmp_path_factory).body.chord_mm + 1e-9
    # every face is reached: the extremes along each axis are the box's
    assert pts.min(axis=0) == pytest.approx([0.0, -W / 2, -H / 2], abs=0.02)
    assert pts.max(axis=0) == pytest.approx([L, W / 2, H / 2], abs=0.02)


def test_placement_turns_about_x_then_y_then_z_then_moves(tmp_path_factory):
    # Drawn centred on the origin. Rz(90) takes x to y and y to -x: the 16 mm width lies
    # along x, centred, and moved by 8 along x it starts at x = 0.
    centred = (-L / 2, 0.0, 0.0)
    (p,) = read(tmp_path_factory, centred, (8.0, 0.0, 0.0), (0.0, 0.0, 90.0)).primitives()
    lo, hi = p.bounds()
    assert lo == pytest.approx([0.0, -L / 2, -H / 2], abs=1e-6)
    assert hi == pytest.approx([W, L / 2, H / 2], abs=1e-6)
    # Rx(90) first (y to z, z to -y), then Ry(90) (z to x, x to -z): the width ends along
    # x, the height along y, the length along z. In the other order (Ry, then Rx) the
    # length would end along y: the order is observable.
    (p,) = read(tmp_path_factory, centred, (8.0, 0.0, 0.0), (90.0, 90.0, 0.0)).primitives()
    lo, hi = p.bounds()
    assert hi - lo == pytest.approx([W, H, L], abs=1e-6)
    assert p.volume_mm3() == pytest.approx(steiner(L, W, H, R), rel=1e-6)


def test_the_echo_carries_the_files_digest(tmp_path_factory):
    import hashlib

    r = recipe(tmp_path_factory)
    data = (folder_with_bar(tmp_path_factory) / "bar.step").read_bytes()
    echo = r.params()["body"]
    assert echo["sha256"] == hashlib.sha256(data).hexdigest()
    assert set(echo) == {"kind", "path", "translate_mm", "rotate_deg", "sha256"}


def test_the_parting_plane_defaults_to_the_chosen_one(tmp_path_factory):
    assert recipe(tmp_path_factory).parting.axis == "auto"


KERNEL_FREE = """\
import sys, pathlib
from soft_molds.errors import RecipeError
from soft_molds.recipe import load_recipe
folder = pathlib.Path(sys.argv[1])
(folder / "notes.step").write_text("a pad, drawn on paper")
for name in ("missing.step", "notes.step"):
    (folder / "r.yaml").write_text(
        "body: {kind: file, path: " + name + "}\\n"
        "voids: [{kind: bore, diameter_mm: 4, length_mm: 30}]\\n")
    try:
        load_recipe(folder / "r.yaml")
    except RecipeError as exc:
        print(exc.problems[0].path, exc.problems[0].message.split(" (")[0])
print("cadquery" in sys.modules, "OCP" in sys.modules)
"""


def test_a_missing_or_foreign_file_is_refused_before_the_kernel_loads(tmp_path):
    import subprocess
    import sys

    out = subprocess.run([sys.executable, "-c", KERNEL_FREE, str(tmp_path)],
                         capture_output=True, text=True, timeout=120, check=True).stdout
    assert out.splitlines() == ["body.path names no file",
                                "body.path is not a STEP file", "False False"]
