"""Where the layered plan puts a plate's overflow hole (numbers only, no CAD work).

Sources: the pad's far edge is its straight side x = 70 between its rounded corners, so on
the middle line y = 0 the far end is x = 70 (the recipe's own corners); distances to the
posts' and the outline's edges by brute force over points sampled every 0.02 mm on them.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from recipe_text import edit, planned_from_text

from soft_molds.plan import plan_mold

ROOT = Path(__file__).resolve().parents[2]
PAD = (ROOT / "recipes" / "seed-tray-pad.yaml").read_text()


def boundary_distance(point, pts) -> float:
    return float(np.min(np.linalg.norm(np.asarray(pts) - np.asarray(point), axis=1)))


def dense(polygon, step=0.02):
    p = np.asarray(polygon, dtype=float)
    out = []
    for a, b in zip(p, np.roll(p, -1, axis=0)):
        k = max(1, int(np.ceil(np.linalg.norm(b - a) / step)))
        out.append(a + np.arange(k)[:, None] / k * (b - a))
    return np.concatenate(out)


def test_the_pads_hole_lies_midway_between_the_last_post_and_the_far_end():
    r = planned_from_text(PAD)
    layer = plan_mold(r).steps[0].layer
    far = max(p.center_mm[0] + p.size_mm[0] / 2.0 for p in layer.posts)
    assert layer.overflow_xy_mm == pytest.approx(((far + 70.0) / 2.0, 0.0), abs=1e-9)


def test_with_no_room_beyond_the_posts_the_hole_keeps_clear_of_edge_and_posts():
    # Six deeper chambers reach to x = 65 and a 5 mm hole needs 3.5 mm of plastic round
    # it: midway to the far end (x = 67.5) is only 2.5 mm from the last post.
    text = edit(edit(edit(PAD, "count: 5", "count: 6"), "    depth_mm: 6", "    depth_mm: 8"),
                "  wall_mm: 4\n", "  wall_mm: 4\n  vent_diameter_mm: 5\n")
    r = planned_from_text(text)
    layer = plan_mold(r).steps[0].layer
    xy = layer.overflow_xy_mm
    assert xy is not None and xy[0] < 65.0
    keep = r.mold.vent_diameter_mm / 2.0 + 1.0
    edge = r.body.outline().boundary(0.02)
    assert boundary_distance(xy, edge) >= keep - 0.02
    for p in layer.posts:
        pts = dense(p.outline_mm())
        inside = (abs(xy[0] - p.center_mm[0]) < p.size_mm[0] / 2.0
                  and abs(xy[1] - p.center_mm[1]) < p.size_mm[1] / 2.0)
        assert not inside and boundary_distance(xy, pts) >= keep - 0.02, p.name
