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


#: A bar fed from both ends (our scenario: a tray pusher variant): a chamber row from the
#: x = 0 socket and a bore from the x = 100 socket, at y = -4.5 and 4.5 mm.
END_FED = """\
name: end-fed-pair
body: {kind: bar, length_mm: 100, width_mm: 20, height_mm: 14, edge_radius_mm: 2}
voids:
  - {kind: chambers, count: 4, pitch_mm: 8, depth_mm: 5, width_mm: 8, height_mm: 8,
     corner_radius_mm: 1, center_mm: [-4.5, 0], feed_diameter_mm: 2}
  - {kind: bore, diameter_mm: 6, length_mm: 67, start_mm: 30, center_mm: [4.5, 0]}
inlets:
  - {socket_diameter_mm: 4, socket_depth_mm: 6, center_mm: [-4.5, 0]}
  - {socket_diameter_mm: 4, socket_depth_mm: 6, center_mm: [4.5, 0], face: end}
parting: {axis: z, offset_mm: 0}
"""
