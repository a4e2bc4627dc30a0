"""The layered build's manufacturability findings, each measured against a hand value.

Demo recipe (our scenario): the co-op's layered seedling finger, a 70 x 16 x 14 mm bar
(z in [-7, 7]) whose base layer is ``process.base_mm`` = 4 mm (bond face z = -3), posts
drafted 1 deg, a paper sheet inset ``process.cover_margin_mm`` = 2 mm, mold walls 5 mm,
``checks.min_wall_mm`` = 1 mm and the default ``checks.min_draft_deg`` = 0.5 deg.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
import trimesh
from conftest import built_layered

from soft_molds.analysis.findings import Severity
from soft_molds.analysis.layered_checks import (
    DRAFT_TOL_DEG,
    air_findings,
    base_layer_finding,
    post_draft_finding,
    print_plans,
    printing_findings,
    recipe_printer,
    sheet_cover_finding,
)
from soft_molds.analysis.printability import Printer
from soft_molds.analysis.trapped_air import combine
from soft_molds.meshdata import TriMesh

NAME = "seedling-layered-finger"


@pytest.fixture(scope="module")
def layered():
    return built_layered(NAME)


def one(findings, check, part=None):
    hits = [f for f in findings if f.check == check and (part is None or f.part == part)]
    assert len(hits) == 1, hits
    return hits[0]


# --- post draft -------------------------------------------------------------------------


def test_post_draft_measured_equals_the_set_draft_to_a_hundredth_of_a_degree(layered):
    f = one(layered.findings, "post-draft")
    # Hand value: the recipe sets process.draft_deg = 1; the posts' side facets are planar,
    # so the mesh carries it exactly (to float noise).
    assert f.severity is Severity.INFO
    assert f.value == pytest.approx(1.0, abs=0.01)
    assert f.part == "chambered post-bridge"


def test_post_draft_is_an_error_under_the_house_minimum():
    # Posts drafted 0.6 deg against checks.min_draft_deg = 1 deg (common practice 0.5-2
    # deg for rigid molds): the posts may not release.
    f = post_draft_finding(0.6, 0.6, 1.0, "chambered post-bridge")
    assert f.severity is Severity.ERROR
    assert (f.value, f.limit) == (0.6, 1.0)


def test_post_draft_is_an_error_when_the_built_posts_lost_draft():
    f = post_draft_finding(1.0 - 2 * DRAFT_TOL_DEG, 1.0, 0.5, "p")
    assert f.severity is Severity.ERROR and f.limit == 1.0
    # Float noise of a planar facet is no loss.
    assert post_draft_finding(1.0 - 1e-12, 1.0, 0.5, "p").severity is Severity.INFO


def test_check_fails_a_layered_recipe_whose_draft_is_under_the_minimum(tmp_path, capsys):
    from pathlib import Path

    from soft_molds.cli import main

    text = (Path(__file__).resolve().parents[2] / "recipes" / f"{NAME}.yaml").read_text()
    assert "  draft_deg: 1\n" in text and "  min_wall_mm: 1.0\n" in text
    text = text.replace("  draft_deg: 1\n", "  draft_deg: 0.6\n").replace(
        "  min_wall_mm: 1.0\n", "  min_wall_mm: 1.0\n  min_draft_deg: 1.0\n")
    path = tmp_path / "low-draft.yaml"
    path.write_text(text)
    assert main(["check", str(path)]) == 1
    out = capsys.readouterr().out
    assert "FAIL" in out
    assert "ERROR   post-draft" in out and "least post draft 0.600 deg" in out


# --- trapped air ------------------------------------------------------------------------


def test_every_pour_is_open_upward_so_no_air_is_trapped(layered):
    for s in layered.steps:
        fs = [f for f in layered.findings if f.check == "trapped-air"
              and f.part == f"{s.name} tray"]
        assert [f.severity for f in fs] == [Severity.INFO]
        assert fs[0].value == 0.0


def test_a_lid_over_the_tray_traps_the_air_of_the_pour(layered):
    # Close the chambered tray with a slab just above its rim: rays straight up from the
    # cast's high points (the bond face, at z = +3 turned over) now meet it.
    s = layered.steps[0]
    tray = s.part("tray")
    lo, hi = tray.mesh.bbox_mm()
    slab = trimesh.creation.box(extents=(hi[0] - lo[0] + 2, hi[1] - lo[1] + 2, 1.0))
    slab.apply_translation(((lo[0] + hi[0]) / 2, (lo[1] + hi[1]) / 2, hi[2] + 1.0))
    lid = TriMesh(np.asarray(slab.vertices, dtype=float), np.asarray(slab.faces))
    closed = replace(s, parts=tuple(replace(p, mesh=combine([p.mesh, lid]))
                                    if p.name == "tray" else p for p in s.parts))
    errors = [f for f in air_findings(closed) if f.severity is Severity.ERROR]
    assert len(errors) >= 1
    assert errors[0].where_mm[2] == pytest.approx(hi[2], abs=0.1)


# --- base layer and sheet cover ---------------------------------------------------------


def test_base_layer_is_as_thick_as_the_recipe_says(layered):
    f = one(layered.findings, "base-layer")
    # Hand value: process.base_mm = 4; cross-checked on the cast's bounds by trimesh.
    cast = layered.steps[1].part("cast").mesh
    t = trimesh.Trimesh(cast.vertices, cast.faces, process=False)
    assert f.value == pytest.approx(4.0, abs=1e-6)
    assert f.value == pytest.approx(float(t.bounds[1][2] - t.bounds[0][2]), abs=1e-9)
    assert f.severity is Severity.INFO and f.limit == 1.0


def test_base_layer_off_the_recipe_or_under_the_min_wall_is_an_error():
    assert base_layer_finding(3.5, 4.0, 1.0, "b").severity is Severity.ERROR
    thin = base_layer_finding(0.8, 0.8, 1.0, "b")
    assert thin.severity is Severity.ERROR and thin.limit == 1.0


def test_sheet_is_covered_by_the_cover_margin_on_every_side(layered):
    f = one(layered.findings, "sheet-cover")
    # Hand value: process.cover_margin_mm = 2 against checks.min_wall_mm = 1.
    assert f.value == pytest.approx(2.0, abs=1e-6)
    assert f.severity is Severity.INFO and f.limit == 1.0


def test_sheet_cover_under_the_min_wall_is_an_error():
    f = sheet_cover_finding(0.5, 1.0, "base cast")
    assert f.severity is Severity.ERROR and (f.value, f.limit) == (0.5, 1.0)


# --- printability -----------------------------------------------------------------------


def test_every_printed_part_has_its_wall_measured(layered):
    walls = {f.part: f for f in layered.findings if f.check == "print-wall"}
    assert sorted(walls) == ["base tray", "chambered post-bridge", "chambered tray"]
    assert all(f.severity is Severity.INFO for f in walls.values())
    # Base tray: the pocket and the guide are the body and the footprint grown by the
    # clearance, the block by clearance + mold.wall_mm: walls of 5 mm, less the label cut
    # into its side where the label stands (hand value).
    depth = layered.recipe.label_settings.depth_mm
    assert walls["base tray"].value == pytest.approx(5.0 - depth, abs=0.01)
    # Post bridge: its thinnest member is the feed groove's 2 mm square post, drafted 1 deg
    # over its 2 mm height: between 2 - 2 * 2 tan(1 deg) and 2 mm across (hand value).
    lo = 2.0 - 4.0 * math.tan(math.radians(1.0))
    assert lo - 1e-6 <= walls["chambered post-bridge"].value <= 2.0 + 1e-6
    assert walls["chambered tray"].value >= Printer().min_wall_mm


def test_a_tray_longer_than_any_pose_on_a_small_printer_is_an_error(layered):
    # The chambered tray is 80 x 26 x 15 mm: on a 50 x 50 mm bed 50 mm high the 80 mm
    # side fits neither upright (80 > 50) nor flat (80 > 50 sqrt 2 = 70.7, the bed's
    # diagonal).
    s = layered.steps[0]
    small = replace(recipe_printer(layered.recipe), bed_mm=(50.0, 50.0), height_mm=50.0)
    f = one(printing_findings(print_plans(s, small), small), "build-volume", "chambered tray")
    assert f.severity is Severity.ERROR


# --- the command line -------------------------------------------------------------------


def test_check_on_the_bundled_layered_recipe_passes_and_lists_its_findings(capsys):
    from pathlib import Path

    from soft_molds.cli import main

    path = Path(__file__).resolve().parents[2] / "recipes" / f"{NAME}.yaml"
    assert main(["check", "-v", str(path)]) == 0
    out = capsys.readouterr().out
    # Eight notes, one overhang note per labelled part (the debossed strokes on a side
    # wall have short ceilings that bridge; common practice: gaps under ~5 mm bridge) and
    # one pressure note per wall group of the chamber row (four).
    assert "checks: 0 error(s), 0 warning(s), 15 note(s)" in out
    for check in ("print-wall", "post-draft", "trapped-air", "base-layer", "sheet-cover"):
        assert f"note    {check}" in out


# --- pressure and motion of the finished actuator ----------------------------------------


def test_the_finished_actuator_gets_its_walls_checked_and_bends_about_its_sheet(layered):
    # The pressure check runs on the finished actuator as on a one-shot cast: one finding
    # per wall group of the chamber row (the closed-form membranes of the recipe).
    groups = [f for f in layered.findings if f.check == "pressure"]
    assert len(groups) == 4 and all(f.severity is Severity.INFO for f in groups)
    mo = layered.motion
    assert mo is not None and mo.model == "sheet-bending"
    # The sheet lies on the bond face, where each chamber's floor is: the pressure's lever
    # arm about it is half the chamber's height (8 mm in the recipe), to the mesh's
    # accuracy along the slightly tilted bending direction the feed groove gives.
    assert mo.inputs.lever_arm_mm == pytest.approx(4.0, abs=0.05)
    assert mo.at_working is not None and mo.at_working.angle_deg > 0.0
    assert mo.valid_to_kpa == pytest.approx(min(f.value for f in groups if f.value), rel=1e-3)
