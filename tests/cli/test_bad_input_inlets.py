"""Bad input for several inlets: both inlet fields, a group of voids fed by two sockets, a
socket no void opens into, a socket off its face, two sockets too close, a parting plane
that cannot run through every socket, and core prints whose key pockets merge. Exit status
2, one located line per problem naming the field, nothing written, no CAD work.

The base is the bundled two-way finger: a 80 x 16 x 24 mm bar (edge radius 2), two chamber
rows 12 mm wide and 7 mm high at (y, z) = (0, 5.5) and (0, -5.5), each fed from its own
4 mm socket, 6 mm deep, at the same centre on the x = 0 face. Every distance below is
elementary geometry of those numbers, known by construction."""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

BASE = (Path(__file__).resolve().parents[2] / "recipes"
        / "seedling-two-way-finger.yaml").read_text(encoding="utf-8")
LOWER = "    center_mm: [0, -5.5]\n    face: start\n"
PARTING = ("  axis: y\n  offset_mm: 0               # through both sockets' centres, so each "
           "core seats in both halves\n")

# Both fields: the one-socket block beside the list.
_both = edit(BASE, "parting:\n", "inlet:\n  socket_diameter_mm: 4\nparting:\n")
# A bore 8 mm across on the axis, x 20..60, reaches both rows (z within 4 of the axis, the
# rows from |z| = 2): one group of voids, which both sockets open into.
_bridged = edit(BASE, "inlets:\n", "  - kind: bore\n    diameter_mm: 8\n    length_mm: 40\n"
                "    start_mm: 20\n    center_mm: [0, 0]\ninlets:\n")
# A third socket on the axis of the far end face (x 74..80): no void's passage in it (the
# rows end at x = 66.5: seven 5 mm chambers at an 8 mm pitch centred on the 80 mm bar).
_idle = edit(BASE, LOWER, LOWER + "  - socket_diameter_mm: 4\n    socket_depth_mm: 6\n"
             "    center_mm: [0, 0]\n    face: end\n")
# The lower socket 12 mm across: its rim plus the 1 mm least wall reaches z = -12.5, past
# the face's edge at -12; its side lies 0.5 mm inside the bottom face (less where the edge
# rounds); it still holds the lower feed, but its print's square key (half width 6 + 1.5)
# and the upper one's (2 + 1.5), grown by the 0.3 mm clearance, are 11 - 11 - 0.6 = -0.6 mm
# apart, short of the 1.5 mm land (plan/layout.MIN_LAND_MM): 6 + 2 + 3 + 0.6 + 1.5 = 13.1.
_off = edit(BASE, "  - socket_diameter_mm: 4\n    socket_depth_mm: 6\n    center_mm: [0, -5.5]",
            "  - socket_diameter_mm: 12\n    socket_depth_mm: 6\n    center_mm: [0, -5.5]")
# Parted on z through the first socket (the default offset): the sockets lie at z = 5.5 and
# -5.5, so no plane normal to z runs through both.
_on_z = edit(BASE, PARTING, "  axis: z\n")
# Rows and sockets moved apart in y as well, (1, 5.5) and (-1, -5.5): no plane normal to y
# or z runs through both socket centres, so parting: auto has no candidate.
_skew = edit(BASE, PARTING, "  axis: auto\n")
for _old, _new in (("[0, 5.5]\n    feed", "[1, 5.5]\n    feed"),
                   ("[0, -5.5]\n    feed", "[-1, -5.5]\n    feed"),
                   ("[0, 5.5]\n    face", "[1, 5.5]\n    face"),
                   ("[0, -5.5]\n    face", "[-1, -5.5]\n    face")):
    _skew = edit(_skew, "    center_mm: " + _old, "    center_mm: " + _new)
# Sockets of the second item without a centre: only the first inlet may follow the first
# void.
_no_centre = edit(BASE, "    center_mm: [0, -5.5]\n    face: start\n", "    face: start\n")
# Rows 5 mm high at z = +-3.5 and their 4 mm sockets 7 mm apart: 3 mm of silicone between
# the sockets, but each print's square key stands 1.5 mm beyond the print (3.5 mm half
# width), so the two pockets (grown by the 0.3 mm clearance) would be 7 - 7 - 0.6 = -0.6 mm
# apart, short of the 1.5 mm land (plan/layout.MIN_LAND_MM): 2 + 2 + 3 + 0.6 + 1.5 = 9.1.
_keys = (BASE.replace("[0, 5.5]", "[0, 3.5]").replace("[0, -5.5]", "[0, -3.5]")
         .replace("    height_mm: 7\n", "    height_mm: 5\n"))

def after(text: str, anchor: str, needle: str) -> int:
    """1-based line of the first line holding ``needle`` after the only line holding
    ``anchor``."""
    start = line_of(text, anchor)
    lines = text.splitlines()
    return next(i for i in range(start + 1, len(lines) + 1) if needle in lines[i - 1])


def second(text: str, needle: str) -> int:
    """1-based line of the second line holding ``needle``."""
    hits = [i for i, ln in enumerate(text.splitlines(), 1) if needle in ln]
    return hits[1]


CASES = [
    ("inlet-and-inlets", _both, (
        Expect("inlets", line_of(_both, "inlets:"), "is given with inlet", None,
               "one of the two"),)),
    ("two-sockets-feed-one-group", _bridged, (
        Expect("inlets[1].center_mm", after(_bridged, "inlets:", "center_mm: [0, -5.5]"),
               "opens into the void group voids[0], voids[1], voids[2], which inlets[0] "
               "feeds too: two inlets feed one void group; one core can leave through one "
               "socket only", "[0.0, -5.5]", "one inlet per group of joined voids"),)),
    ("socket-feeding-no-void", _idle, (
        Expect("inlets[2].center_mm", line_of(_idle, "center_mm: [0, 0]"),
               "puts a socket that no void opens into", "[0.0, 0.0]",
               "a socket a void's passage opens into"),)),
    ("socket-off-its-face", _off, (
        Expect("inlets[1].center_mm", after(_off, "inlets:", "center_mm: [0, -5.5]"),
               "puts the socket off the flat inlet face (x = 0) or closer than "
               "checks.min_wall_mm = 1 mm to its edge", "[0.0, -5.5]",
               "a point of the x = 0 face"),
        Expect("inlets[1]", line_of(_off, "socket_diameter_mm: 12"),
               "leaves a silicone wall of", None, "at least checks.min_wall_mm = 1 mm"),
        Expect("inlets[1].center_mm", after(_off, "inlets:", "center_mm: [0, -5.5]"),
               "puts its core print's key pocket -0.60 mm from the key pocket of inlets[0]'s "
               "print", "[0.0, -5.5]", "socket centres at least 13.1 mm apart"))),
    ("parting-plane-misses-a-socket", _on_z, (
        Expect("parting.offset_mm", line_of(_on_z, "parting:"),
               "cannot pass through every socket axis: the socket centres lie at z = 5.5, "
               "-5.5 mm", "5.5", "put the sockets at the same z, or set parting.axis: y"),)),
    ("auto-parting-without-a-plane-through-both", _skew, (
        Expect("parting.axis", line_of(_skew, "axis: auto"),
               "auto finds no plane through every socket centre (y, z) = (1, 5.5), "
               "(-1, -5.5) mm", "'auto'", "put both sockets at the same z, or at the same y"),)),
    ("second-socket-without-a-centre", _no_centre, (
        Expect("inlets[1].center_mm", second(_no_centre, "- socket_diameter_mm: 4"),
               "is required", None, "only the first inlet on the start face"),)),
    ("key-pockets-of-two-prints-merge", _keys, (
        Expect("inlets[1].center_mm", after(_keys, "inlets:", "center_mm: [0, -3.5]"),
               "puts its core print's key pocket -0.60 mm from the key pocket of inlets[0]'s "
               "print", "[0.0, -3.5]", "socket centres at least 9.1 mm apart"),)),
]


@pytest.mark.parametrize("name, text, expect", CASES, ids=[c[0] for c in CASES])
def test_bad_inlets_exit_2_with_one_located_line_each_and_write_nothing(
        name, text, expect, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(text, expect, tmp_path, capsys, monkeypatch)
