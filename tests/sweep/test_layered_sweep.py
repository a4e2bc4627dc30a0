"""The sweep refuses a layered variant whose checks fail, as it does a one-shot one.

Demo recipe (our scenario): the co-op's layered seedling finger with its posts drafted
0.6 deg against ``checks.min_draft_deg`` = 1 deg (common practice 0.5-2 deg for rigid
molds): the ``post-draft`` check fails.
"""

from __future__ import annotations

from pathlib import Path

from soft_molds import load_recipe
from soft_molds.sweep.outcome import Status
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
