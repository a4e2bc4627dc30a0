"""Disc magnets the tool cannot seat are refused before any CAD work: exit 2, one located
line naming the field and what is allowed, nothing written.

Cases: a support value that does not exist; magnets on a layered recipe (no core print);
magnets on a melted core (its print is cast, not printed); a magnet too wide for the
print's key: the 5 mm socket's key is 6 mm long along x (one_shot: at most 6 mm, a land
of 1.5 mm each side), so a pocket of d + press fit leaves (6 - d - fit) / 2 of plastic on
each side, which must reach perimeters x nozzle = 4 x 0.4 = 1.6 mm (the printer's least
solid wall): a 4 mm magnet pressed into a 3.9 mm pocket leaves 1.05 mm; the largest that
fits is 6 - 3.2 + 0.1 = 2.9 mm (arithmetic of the planned key). Line numbers are found
by text in the recipes.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

ROOT = Path(__file__).resolve().parents[2]
PAD = (ROOT / "recipes" / "tray-lift-pad.yaml").read_text()
WAX = (ROOT / "recipes" / "tray-lift-pad-wax.yaml").read_text()
MAGNETS = "core:\n  support: magnets\n"

CASES = [
    ("unknown-support", edit(PAD, "support: magnets ", "support: glue "), "support: glue",
     "core.support", ("glue", "prints, magnets, both")),
    ("layered", (ROOT / "recipes" / "seedling-layered-finger.yaml").read_text() + MAGNETS,
     "support: magnets", "core.support", ("no core print", "magnets")),
    ("melted", edit(WAX, "material: wax", "material: wax\n  support: both"),
     "support: both", "core.support", ("cast, not printed", "pulled or dissolved")),
    ("too-wide", edit(PAD, "magnet_diameter_mm: 2 ", "magnet_diameter_mm: 4 "),
     "magnet_diameter_mm: 4", "core.magnet_diameter_mm",
     ("1.05 mm of plastic", "6 mm across", "at most 2.90 mm", "1.6 mm")),
]


@pytest.mark.parametrize(("name", "text", "needle", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_magnets_the_tool_cannot_seat_exit_2_with_one_located_line(
        name, text, needle, field, words, tmp_path, capsys, no_cad_work):
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, needle)}: {field}"), line
    assert all(w in line for w in words), line


def test_the_largest_magnet_that_keeps_the_wall_is_accepted():
    # 2.9 mm less 0.1 mm of press fit: a 2.8 mm pocket, (6 - 2.8) / 2 = 1.6 mm each side;
    # 0.05 mm more and the wall is short.
    from soft_molds.plan import plan_problems
    from soft_molds.recipe import recipe_from_text

    def problems(d: str) -> list:
        text = edit(PAD, "magnet_diameter_mm: 2 ", f"magnet_diameter_mm: {d} ")
        return plan_problems(recipe_from_text(text, "pad.yaml", "pad"))

    assert problems("2.9") == []
    (p,) = problems("2.95")
    assert p.path == "core.magnet_diameter_mm" and "1.57 mm of plastic" in p.message
