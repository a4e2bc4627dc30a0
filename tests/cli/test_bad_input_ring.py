"""Bad input for the ``ring`` body and the ``annulus`` void: exit status 2, one located
line per problem naming the field, the value and what is allowed; nothing written, and no
CAD work (the ``no_cad_work`` fixture). The limits are elementary geometry of the annulus
(radial wall = (outer - inner) / 2; the channel spans bore radius + wall to that + depth)."""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

ROOT = Path(__file__).resolve().parents[2]
CUFF = (ROOT / "recipes" / "stem-ring-cuff.yaml").read_text()


@dataclass(frozen=True)
class Case:
    name: str
    text: str
    expect: tuple[Expect, ...]


def _e(path: str, line: int | None, message: str, got: str | None = None,
       allowed: str | None = None) -> Expect:
    return Expect(path, line, message, got, allowed)


_inner_big = edit(CUFF, "inner_diameter_mm: 20", "inner_diameter_mm: 44")
_round_big = edit(CUFF, "edge_round_mm: 1.5", "edge_round_mm: 6")
_deep = edit(CUFF, "depth_mm: 3\n", "depth_mm: 10\n")
_tall = edit(CUFF, "    height_mm: 10\n", "    height_mm: 14\n")
_wide_socket = edit(CUFF, "socket_diameter_mm: 4", "socket_diameter_mm: 12")
# An open groove through the outer face: (44 - 20) / 2 - 2 = 10 mm deep, square corners.
_outside = edit(edit(CUFF, "opens_to: none ", "opens_to: outside\n    corner_round_mm: 0 "),
                "depth_mm: 3\n", "depth_mm: 10\n")
_inside = edit(CUFF, "opens_to: none ", "opens_to: inside ")
_sideways = edit(CUFF, "opens_to: none ", "opens_to: up ")
_pulled = edit(CUFF, "kind: dissolved ", "kind: pulled ")
_channel_round = edit(CUFF, "    opens_to: none", "    corner_round_mm: 2\n    opens_to: none")
_feed = edit(CUFF, "    opens_to: none", "    feed_diameter_mm: 9.5\n    opens_to: none")
_wall0 = edit(CUFF, "wall_mm: 2 ", "wall_mm: 0 ")
_flat = edit(CUFF, "  height_mm: 14\n", "  height_mm: -14\n")
_bar = edit(CUFF, "  kind: ring\n  inner_diameter_mm: 20\n  outer_diameter_mm: 44\n"
            "  height_mm: 14\n  edge_round_mm: 1.5\n",
            "  kind: bar\n  length_mm: 44\n  width_mm: 30\n  height_mm: 14\n")

CASES = [
    # 44 - 20 = 0: no ring; at least 44 + 2 x 0.05 (the least size).
    Case("inner-not-below-outer", _inner_big, (
        _e("body.outer_diameter_mm", line_of(_inner_big, "outer_diameter_mm"),
           "leaves no ring round the bore", "44.0", "at least 44.1 mm"),)),
    # 0.45 x min((44 - 20) / 2, 14) = 5.4 mm.
    Case("edge-rounding-too-big", _round_big, (
        _e("body.edge_round_mm", line_of(_round_big, "edge_round_mm"),
           "is too large for the ring", "6.0", "at most 5.4 mm"),)),
    # 10 + 2 + 10 = 22 mm reaches the outer radius 22.
    Case("channel-through-the-outer-face", _deep, (
        _e("voids[0].depth_mm", line_of(_deep, "    depth_mm"), "takes the channel through the "
           "ring's outer face: the bore's radius (10 mm) + wall_mm + depth_mm = 22 mm",
           "10.0"),)),
    Case("height-negative", _flat, (
        _e("body.height_mm", line_of(_flat, "  height_mm: -14"), "is out of range", "-14"),)),
    Case("channel-as-tall-as-the-ring", _tall, (
        _e("voids[0].height_mm", line_of(_tall, "    height_mm: 14"),
           "is not below the ring's height", "14.0", "less than body.height_mm (14 mm)"),)),
    # The mouth's rim (6 + 1.5 mm round the centre) reaches z = 7.5, past the top face at
    # 7; the socket's side (radius 6) leaves 7 - 6 = 1 mm to it.
    Case("socket-off-the-outer-face", _wide_socket, (
        _e("inlet.center_mm", line_of(_wide_socket, "inlet:"),
           "puts the socket off the curved outer face touching x = 0"),
        _e("inlet", line_of(_wide_socket, "inlet:"), "leaves a silicone wall of 1.00 mm"),)),
    # The closed cuff's socket stays: an open groove is fed through its collar instead.
    Case("open-groove-with-an-inlet", _outside, (
        _e("inlet", line_of(_outside, "inlet:"), "is given, but the open groove has no tube "
           "socket: air enters through the collar", None, "leave out the inlet block"),)),
    Case("opens-to-inside-not-built", _inside, (
        _e("voids[0].opens_to", line_of(_inside, "opens_to"), "is inside: that channel "
           "needs a collapsible core", "'inside'", "none"),)),
    Case("opens-to-unknown", _sideways, (
        _e("voids[0].opens_to", line_of(_sideways, "opens_to"), "", "'up'",
           "one of none, outside, inside"),)),
    # 0.45 x min(3, 10) = 1.35 mm.
    Case("channel-rounding-too-big", _channel_round, (
        _e("voids[0].corner_round_mm", line_of(_channel_round, "corner_round_mm"),
           "is too large for the channel", "2.0", "at most 1.35 mm"),)),
    Case("feed-wider-than-the-channel", _feed, (
        _e("voids[0].feed_diameter_mm", line_of(_feed, "feed_diameter_mm"),
           "is wider than the channel's flat outer face", "9.5", "at most height_mm - 2 x "
           "corner_round_mm (9 mm)"),)),
    Case("wall-zero", _wall0, (
        _e("voids[0].wall_mm", line_of(_wall0, "    wall_mm: 0"), "is out of range", "0"),)),
    Case("annulus-in-a-bar", _bar, (
        _e("voids[0].kind", line_of(_bar, "kind: annulus"), "runs round a ring, and the body "
           "is not one (body.kind is bar)"),)),
    # The lost-core way out is named: a closed channel's core cannot leave by the socket.
    Case("closed-channel-on-a-pulled-core", _pulled, (
        _e("voids[0]", line_of(_pulled, "kind: pulled"), "is a closed channel all round the "
           "ring: its core cannot be drawn out through the socket; it needs a lost core",
           "'pulled'", "core.kind: melted | dissolved"),)),
]


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_bad_ring_or_annulus_input_exits_2_with_one_located_line_and_writes_nothing(
        case, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(case.text, case.expect, tmp_path, capsys, monkeypatch)


def test_every_new_field_has_a_bad_input_case():
    from soft_molds.recipe.kinds.annulus import Annulus
    from soft_molds.recipe.kinds.ring import Ring

    paths = {re.sub(r"\[\d+\]", "[0]", e.path) for c in CASES for e in c.expect}
    # inner_diameter_mm is refused through outer_diameter_mm (the pair's relation).
    for f in Ring.FIELDS:
        if f.name != "inner_diameter_mm":
            assert f"body.{f.name}" in paths, f.name
    for f in Annulus.FIELDS:
        assert f"voids[0].{f.name}" in paths, f.name
