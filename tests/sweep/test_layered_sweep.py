"""The sweep refuses a layered variant whose checks fail, as it does a one-shot one, and
does not build a finished one again (its typed stepped manifest is the record).

Demo recipe (our scenario): the co-op's layered seedling finger with its posts drafted
0.6 deg against ``checks.min_draft_deg`` = 1 deg (common practice 0.5-2 deg for rigid
molds): the ``post-draft`` check fails.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from stl import mesh as npstl

from soft_molds import load_recipe
from soft_molds.export.files import json_bytes
from soft_molds.export.sheet import STEP_GAP_MM, stepped_row
from soft_molds.export.steps_manifest import read_stepped_manifest
from soft_molds.export.typedjson import to_json
from soft_molds.sweep.cache import earlier_outcome
from soft_molds.sweep.outcome import Status
from soft_molds.sweep.plan import plan_tasks
from soft_molds.sweep.runner import run_variant

ROOT = Path(__file__).resolve().parents[2]


def test_a_layered_variant_with_too_little_post_draft_is_refused_and_nothing_written(
        tmp_path):
    text = (ROOT / "recipes" / "seedling-layered-finger.yaml").read_text()
    text = text.replace("  draft_deg: 1\n", "  draft_deg: 0.6\n").replace(
        "  min_wall_mm: 1.0\n", "  min_wall_mm: 1.0\n  min_draft_deg: 1.0\n")
    path = tmp_path / "low-draft.yaml"
    path.write_text(text)
    out = tmp_path / "out"
    o = run_variant(load_recipe(path), str(out))
    assert o.status is Status.REFUSED
    assert (o.errors, o.warnings) == (1, 0)
    assert o.reason.startswith("post-draft: least post draft 0.600 deg")
    assert not (out / "seedling-layered-finger" / "A" / "manifest.json").exists()
    o = run_variant(load_recipe(path), str(out), force=True)
    assert o.status is Status.BUILT
    assert (out / "seedling-layered-finger" / "A" / "manifest.json").exists()

    # The same run, asked again: nothing is built. Without --force the earlier forced
    # variant counts as refused; with it, as up to date with the figures the build gave.
    (task,) = plan_tasks([path])
    again = earlier_outcome(task, out, force=True)
    assert again is not None and again.status is Status.UP_TO_DATE
    assert (again.silicone_cm3, again.mix_g, again.errors) == (o.silicone_cm3, o.mix_g, 1)
    refused = earlier_outcome(task, out, force=False)
    assert refused is not None and refused.status is Status.REFUSED
    assert refused.reason.endswith("(written earlier with --force)")
    # The typed manifest reads back to the very bytes that were written.
    folder = out / "seedling-layered-finger" / "A"
    man = read_stepped_manifest(folder)
    assert json_bytes(to_json(man)) == (folder / "manifest.json").read_bytes()
    assert [s.folder for s in man.steps] == ["step-1-chambered", "step-2-base"]
    # A part changed on disk since: the variant is built again.
    stl = folder / man.steps[0].parts[0].file
    stl.write_bytes(stl.read_bytes() + b"\0")
    assert earlier_outcome(task, out, force=True) is None

    # The family sheet's row for it: each pour's silicone, and each step's cast cut across
    # y, stacked. Outside reference: the recipe's own sizes (a 70 mm long, 14 mm tall bar
    # whose bond face is 4 mm up), read against the sections' extents, and the STL files
    # read by numpy-stl (an independent reader) for each cast's height.
    row = stepped_row(man, folder)
    figs = dict(row.figures)
    assert figs["pour 1"].startswith(f"chambered {man.steps[0].pour.cast_mm3 / 1000:.2f} cm3")
    assert figs["pour 2"].startswith(f"base {man.steps[1].pour.cast_mm3 / 1000:.2f} cm3")
    heights = []
    for s in man.steps:
        z = npstl.Mesh.from_file(str(folder / s.folder / "cast.stl")).vectors[:, :, 2]
        heights.append(float(z.max() - z.min()))
    assert heights == pytest.approx([14.0 - 4.0, 4.0], abs=1e-6)
    xs, zs = row.section[:, :, 0], row.section[:, :, 1]
    assert float(xs.max() - xs.min()) == pytest.approx(70.0, abs=1e-6)
    # Two stacked pieces with the gap between them: total height = both casts + the gap.
    assert float(zs.max() - zs.min()) == pytest.approx(sum(heights) + STEP_GAP_MM, abs=1e-6)
    assert row.badge == "error: post-draft"
