"""A core block the tool cannot cast is refused before any CAD work: exit 2, one located
line per problem naming the field and what is allowed, nothing written.

Cases: a core kind that does not exist, a core material that does not exist, a melted
core with two inlets (two cores, one core mold), a melted core in a layered process
(which casts no core of this kind), a printer that holds the silicone mold but not the
core mold (156.7 mm long: the core's print, key and grip tab lie beyond the body; a
110 mm bed's diagonal is 155.6 mm) and a melted core with no inlet to drain through: an
inverted U (a bore up from the socket, a crossing chamber at x 52-58, a second bore back
down from it to x = 20), whose far leg below the crossing keeps its melt, about
pi 2^2 (52 - 20) = 402 mm3 (closed form of the cylinder) plus the grid's edge cells.
Line numbers are found by text in the recipes.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

from soft_molds.cli import main

ROOT = Path(__file__).resolve().parents[2]
WAX = (ROOT / "recipes" / "tray-lift-pad-wax.yaml").read_text()
MELTED = "core:\n  kind: melted\n"
POCKET = """\
name: pocket
body: {kind: bar, length_mm: 70, width_mm: 50, height_mm: 14, edge_radius_mm: 2}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 58}
  - {kind: chambers, count: 1, depth_mm: 6, width_mm: 30, height_mm: 6, start_mm: 52}
  - {kind: bore, diameter_mm: 4, start_mm: 20, length_mm: 36, center_mm: [10, 0]}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 6}
""" + MELTED

CASES = [
    ("unknown-kind", edit(WAX, "kind: melted ", "kind: frozen "), "kind: frozen",
     "core.kind", ("frozen", "pulled, dissolved, melted")),
    ("unknown-material", edit(WAX, "material: wax", "material: beeswax"),
     "material: beeswax", "core.material", ("beeswax", "wax, low-melt-alloy")),
    ("two-inlets", (ROOT / "recipes" / "seedling-two-way-finger.yaml").read_text() + MELTED,
     "kind: melted", "core.kind", ("one core mold", "2 inlets")),
    ("layered", (ROOT / "recipes" / "seedling-layered-finger.yaml").read_text() + MELTED,
     "kind: melted", "core.kind", ("process.kind one-shot", "layered")),
    ("core-mold-off-the-bed",
     WAX + "printer:\n  bed_mm: [110, 110]\n  height_mm: 110\n", "bed_mm: [110, 110]",
     "printer.bed_mm", ("shell-lower (156.733 x 74", "in the core mold")),
    ("no-drain", POCKET, "kind: melted", "core.kind",
     ("no inlet to drain through", "near (20.")),
]


@pytest.mark.parametrize(("name", "text", "needle", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_a_core_the_tool_cannot_cast_exits_2_with_one_located_line(
        name, text, needle, field, words, tmp_path, capsys, no_cad_work):
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, needle)}: {field}"), line
    assert all(w in line for w in words), line
    if name == "no-drain":
        pocket = float(re.search(r"leaves ([0-9.]+) mm3", line).group(1))
        assert pocket == pytest.approx(math.pi * 2.0 ** 2 * (52 - 20), rel=0.06)


def test_check_refuses_the_same_recipe_before_building(tmp_path, capsys, no_cad_work):
    path = tmp_path / "recipe.yaml"
    path.write_text(edit(WAX, "material: wax", "material: beeswax"))
    assert main(["check", str(path)]) == 2
    assert "core.material" in capsys.readouterr().err
