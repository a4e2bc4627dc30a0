"""The layered process in the plan: registered, two steps in pour order, one post per
chamber plus the feed groove, all standing on the bond face; and a one-shot recipe is the
same recipe (same hash, same plan) whether it names its process or not.

Demo recipe (our scenario): the co-op's layered seedling finger, bar z in [-7, 7] with a
4 mm base, so the bond face is z = -3 (by construction of the recipe).
"""

from __future__ import annotations

from pathlib import Path

from recipe_text import FINGER_TEXT

from soft_molds import load_recipe
from soft_molds.plan import plan_mold
from soft_molds.plan.model import LayerKind
from soft_molds.plan.processes import processes
from soft_molds.recipe import recipe_from_text

ROOT = Path(__file__).resolve().parents[2]


def test_layered_gives_a_chambered_then_a_base_step_on_one_bond_face():
    assert "layered" in processes()
    r = load_recipe(ROOT / "recipes" / "seedling-layered-finger.yaml")
    first, second = plan_mold(r).steps
    assert (first.name, second.name) == ("chambered", "base")
    assert first.layer is not None and second.layer is not None
    assert (first.layer.kind, second.layer.kind) == (LayerKind.CHAMBERED, LayerKind.BASE)
    assert first.layer.bond_z_mm == second.layer.bond_z_mm == -3.0
    posts = first.layer.posts
    assert len(posts) == 7 + 1  # seven chambers and the feed groove
    assert all(p.base_z_mm == -3.0 and p.draft_deg == 1.0 for p in posts)
    # Chambers 8 mm high from z = -3 reach z = 5, as the recipe's row does (1 + 8 / 2).
    assert [p.height_mm for p in posts[:7]] == [8.0] * 7
    assert [p.name for p in first.parts] == ["tray", "post-bridge", "cast"]
    assert [p.name for p in second.parts] == ["tray", "cast"]
    assert second.layer.sheet_inset_mm == 2.0


def test_naming_the_one_shot_process_changes_nothing():
    plain = recipe_from_text(FINGER_TEXT, "f.yaml", "f")
    named = recipe_from_text(FINGER_TEXT + "process:\n  kind: one-shot\n", "f.yaml", "f")
    assert plain.params_sha256() == named.params_sha256()
    assert [s.name for s in plan_mold(named).steps] == ["silicone"]
