"""Silicone walls of chamber rows as the review measures them on the built cast: the long
finger whose default row once sat 0.5 mm past its socket now builds clean, and a wall
between chambers too thin for checks.min_wall_mm is an error naming the keys that set it.
Expected walls by elementary geometry from the recipe numbers."""

from __future__ import annotations

import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds import build
from soft_molds.analysis.findings import Severity
from soft_molds.recipe import recipe_from_text


def _walls(molds):
    return [f for f in molds.findings if f.check == "silicone-wall"]


def test_a_long_finger_with_a_deep_socket_builds_without_a_thin_wall():
    # 95 mm bar, 8 mm socket, 10 chambers 6 mm deep every 8 mm (a 78 mm row): the default
    # row starts at 8 + 1 = 9 mm, so 1 mm of silicone lies between the socket floor and the
    # first chamber; centred at (95 - 78) / 2 = 8.5 it would have been 0.5 mm.
    text = edit(edit(edit(edit(FINGER_TEXT, "length_mm: 70", "length_mm: 95"), "count: 3",
                          "count: 10"), "depth_mm: 5", "depth_mm: 6"),
                "socket_depth_mm: 6", "socket_depth_mm: 8")
    molds = build(recipe_from_text(text, "long.yaml", "long-finger"))
    assert [f.severity for f in _walls(molds)] == [Severity.INFO, Severity.INFO]
    between = [f for f in _walls(molds) if "between" in f.message]
    assert between[0].value == pytest.approx(1.0, abs=0.05)


def test_a_thin_wall_between_chambers_names_pitch_and_depth():
    # chambers 7.5 mm deep every 8 mm leave 0.5 mm between neighbours
    text = edit(FINGER_TEXT, "depth_mm: 5", "depth_mm: 7.5")
    molds = build(recipe_from_text(text, "thin.yaml", "thin-walls"))
    (f,) = [f for f in _walls(molds) if f.severity == Severity.ERROR]
    assert f.value == pytest.approx(0.5, abs=0.05)
    assert f.message.endswith("; change voids[0].pitch_mm, voids[0].depth_mm, "
                              "checks.min_wall_mm")
