"""Bad input for a ring with an open groove (``annulus`` with ``opens_to: outside``): exit
status 2, one located line naming the field and what is allowed, nothing written, and no
CAD work (the ``no_cad_work`` fixture). The limits are elementary geometry of the demo
ring (bore radius 8, outer radius 16, height 12, edge rounding 1: a groove from 8 + wall
to 16, under 12 - 2 x 1 = 10 mm high)."""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import refused_once

ROOT = Path(__file__).resolve().parents[2]
OPEN = (ROOT / "recipes" / "stem-ring-cuff-open.yaml").read_text()
_VOID = "  - kind: annulus\n"

CASES = [
    # The collar feeds the groove: a socket in the silicone is refused, whatever its place.
    ("inlet-given", OPEN + "inlet:\n  socket_diameter_mm: 4\n", "inlet:", "inlet",
     ("no tube socket", "collar", "leave out the inlet block")),
    ("inlets-given", OPEN + "inlets:\n  - center_mm: [0, -4]\n", "inlets:", "inlets",
     ("no tube socket", "collar")),
    ("rounded-corners", edit(OPEN, "corner_round_mm: 0 ", "corner_round_mm: 0.5 "),
     "corner_round_mm", "voids[0].corner_round_mm", ("square edges", "0 with opens_to: outside")),
    # 8 + 2 + 5 = 15 < 16: an outer wall would be left (that is a closed channel).
    ("groove-short-of-the-outer-face", edit(OPEN, "depth_mm: 6 ", "depth_mm: 5 "),
     "depth_mm", "voids[0].depth_mm", ("to the ring's outer face", "6 mm")),
    # 8 + 8 = 16: the wall reaches the outer radius.
    ("wall-through-the-ring", edit(OPEN, "wall_mm: 2 ", "wall_mm: 8 "), "    wall_mm",
     "voids[0].wall_mm", ("leaves no groove", "less than the ring's radial wall (8 mm)")),
    # 12 - 2 x 1 = 10 mm of straight outer face.
    ("groove-into-the-edge-roundings", edit(OPEN, "    height_mm: 6\n", "    height_mm: 10\n"),
     "    height_mm: 10", "voids[0].height_mm", ("rounded edges", "10 mm")),
    ("parting-across-y", edit(OPEN, "axis: z", "axis: y"), "parting:", "parting",
     ("must be z = 0", "parting.axis: z, parting.offset_mm: 0")),
    ("parting-off-the-middle", edit(OPEN, "offset_mm: 0 ", "offset_mm: 1 "), "parting:",
     "parting", ("must be z = 0",)),
    ("in-steps", OPEN + "process:\n  kind: layered\n", "kind: layered", "process.kind",
     ("casts an open groove in steps", "one-shot")),
    ("with-another-void", edit(OPEN, _VOID, "  - kind: annulus\n    wall_mm: 2\n"
                               "    depth_mm: 2\n    height_mm: 4\n" + _VOID),
     "opens_to: outside", "voids[1].opens_to", ("the ring's only void",)),
    ("parting-auto", edit(edit(OPEN, "axis: z", "axis: auto"), "  offset_mm: 0 ",
                                                         "  # offset_mm: 0 "),
     "parting:", "parting", ("must be z = 0",)),
    ("on-a-lost-core", OPEN + "core:\n  kind: dissolved\n", "core:", "core",
     ("no core", "two plates", "leave out the core block", "(got 'dissolved')")),
    ("held-by-magnets", OPEN + "core:\n  support: magnets\n", "core:", "core",
     ("no core", "(got 'magnets')")),
]


@pytest.mark.parametrize(("name", "text", "needle", "field", "words"), CASES,
                         ids=[c[0] for c in CASES])
def test_open_groove_input_the_tool_cannot_build_exits_2_with_one_located_line(
        name, text, needle, field, words, tmp_path, capsys, no_cad_work):
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, needle)}: {field}:"), line
    assert all(w in line for w in words), line


def test_the_inside_groove_is_still_refused_with_its_reason(tmp_path, capsys, no_cad_work):
    text = edit(OPEN, "opens_to: outside ", "opens_to: inside ")
    path, line = refused_once(text, tmp_path, capsys)
    assert line.startswith(f"{path}:{line_of(text, 'opens_to')}: voids[0].opens_to:"), line
    assert "collapsible core" in line
