"""Bad input for voids joined through voids: a group of voids that reaches no inlet (none
opens into the tube socket, and none overlaps a void that does), and a feed channel that
starts past the inlet face without a placed row. Exit status 2, one located line per
problem naming the void, nothing written. The base is the bundled plenum finger (a wide
bore x 3..17 mm from inside the 6 mm deep socket, its chamber row's feed channel starting
at x = 10 inside the bore, the first chamber at x = 19); positions are elementary
geometry, known by construction."""

from __future__ import annotations

from pathlib import Path

import pytest
from recipe_text import edit, line_of
from refusals import Expect, assert_build_refused

BASE = (Path(__file__).resolve().parents[2] / "recipes" / "plenum-finger.yaml").read_text(
    encoding="utf-8")
SHORTLY = "is not reached from the inlet socket"

# The bore starts at x = 7, past the 6 mm socket floor: it and the row it feeds are sealed
# off together, reported once, on the bore.
_sealed = edit(BASE, "    start_mm: 3\n", "    start_mm: 7\n")
# The feed starts at x = 18, past the bore's far end (17): the bore is reached, the row not.
_short_feed = edit(BASE, "feed_start_mm: 10", "feed_start_mm: 18")
# The bore ends at x = 10 exactly where the feed starts: touching faces are no passage.
_touching = edit(BASE, "    length_mm: 14\n", "    length_mm: 7\n")
_unplaced = edit(BASE, "    start_mm: 19\n", "")
_past = edit(BASE, "feed_start_mm: 10", "feed_start_mm: 20")

CASES = [
    ("bore-past-the-socket-seals-its-row-too", _sealed, (
        Expect("voids[0]", line_of(_sealed, "- kind: bore"),
               SHORTLY + " (nor is voids[1], joined to it)", None, "depth 6 mm"),)),
    ("feed-starting-beyond-the-bore", _short_feed, (
        Expect("voids[1]", line_of(_short_feed, "- kind: chambers"), SHORTLY, None,
               "or the void must overlap a void that is reached"),)),
    ("feed-only-touching-the-bore-end", _touching, (
        Expect("voids[1]", line_of(_touching, "- kind: chambers"), SHORTLY, None,
               "start x = 10 mm"),)),
    ("feed-start-without-a-placed-row", _unplaced, (
        Expect("voids[1].start_mm", line_of(_unplaced, "- kind: chambers"),
               "is required when the feed channel starts past the inlet face", None,
               "at least feed_start_mm (10 mm)"),)),
    ("feed-starting-past-the-first-chamber", _past, (
        Expect("voids[1].feed_start_mm", line_of(_past, "feed_start_mm: 20"),
               "starts the feed channel past the first chamber", "20.0",
               "at most start_mm (19 mm)"),)),
]


@pytest.mark.parametrize("name, text, expect", CASES, ids=[c[0] for c in CASES])
def test_void_group_reaching_no_inlet_exits_2_with_one_located_line_and_writes_nothing(
        name, text, expect, tmp_path, capsys, monkeypatch, no_cad_work):
    assert_build_refused(text, expect, tmp_path, capsys, monkeypatch)
