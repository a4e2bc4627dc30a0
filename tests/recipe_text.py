"""Helpers for tests that edit recipe text and look up its lines."""

from __future__ import annotations

from pathlib import Path

#: Test recipe (demo scenario): one finger of the co-op's seedling gripper.
FINGER_TEXT = (Path(__file__).resolve().parent / "data" / "finger-test.yaml").read_text()


def edit(text: str, old: str, new: str) -> str:
    """``text`` with the single occurrence of ``old`` replaced (fails if not exactly one)."""
    assert text.count(old) == 1, f"{old!r} occurs {text.count(old)} times"
    return text.replace(old, new)


def line_of(text: str, needle: str) -> int:
    """1-based line of the only line of ``text`` that contains ``needle``."""
    hits = [i for i, ln in enumerate(text.splitlines(), 1) if needle in ln]
    assert len(hits) == 1, f"{needle!r} on lines {hits}"
    return hits[0]


def planned_from_text(text: str, source: str = "recipe", name: str = "recipe"):
    """A recipe from text, refused (RecipeError) when it breaks a recipe rule or a rule of
    the mold it plans: what ``soft_molds.load_recipe`` does for a file."""
    from soft_molds.errors import RecipeError
    from soft_molds.plan import plan_problems
    from soft_molds.recipe import recipe_from_text

    r = recipe_from_text(text, source, name)
    problems = plan_problems(r)
    if problems:
        raise RecipeError(problems, source)
    return r
