"""Where the layered plan opens a channel network fed from its mouth on the body's outline
with no socket: the four-arm hub gripper (recipes/seedling-hub-gripper.yaml), fed on the
hub's edge at 180 deg between its two left arms (numbers only, no CAD work).

Sources: the plate's placement by hand (plane geometry): its leftmost point lies on the
tip rounding of the 135 and 225 deg arms, 3 + (45 - 3 + 7 - 3) / sqrt(2) from the hub's
centre along -x, and the plate is moved so that point is on x = 0; the hub's edge is the
circle of radius 15 about that centre.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from recipe_text import planned_from_text

from soft_molds.plan import plan_mold
from soft_molds.plan.processes.layered import FEED_OVERRUN_MM

ROOT = Path(__file__).resolve().parents[2]
HUB = (ROOT / "recipes" / "seedling-hub-gripper.yaml").read_text()
CENTRE = (3.0 + 46.0 / math.sqrt(2.0), 0.0)
RADIUS = 15.0


@pytest.fixture(scope="module")
def planned():
    r = planned_from_text(HUB, name="seedling-hub-gripper")
    return r, plan_mold(r).steps[0].layer


def test_the_hub_gripper_has_no_socket_and_echoes_none(planned):
    r, _ = planned
    assert r.inlets == ()
    assert r.params()["inlets"] == []


def test_the_mouth_lies_on_the_outline_on_the_hubs_edge_at_180_deg(planned):
    r, layer = planned
    (net,) = r.voids
    x0, y0 = net.paths[0][0]
    assert math.dist((x0, y0), CENTRE) == pytest.approx(RADIUS, abs=1e-9)
    assert math.degrees(math.atan2(y0 - CENTRE[1], x0 - CENTRE[0])) == pytest.approx(180.0)
    outline = layer.footprint.outline
    assert outline is not None
    assert abs(float(outline.sdf(np.array([[x0, y0]]))[0])) < 1e-9


def test_only_the_feed_post_crosses_the_outline_and_its_notch_crosses_the_tray_wall(planned):
    r, layer = planned
    (net,) = r.voids
    x0, _ = net.paths[0][0]
    outline = layer.footprint.outline
    crossing = [p for p in layer.posts
                if (outline.sdf(np.asarray(p.outline_mm(), dtype=float)) > 0.0).any()]
    assert [p.name for p in crossing] == ["voids[0].paths[0] segment 1"]
    (feed,) = crossing
    pts = np.asarray(feed.outline_mm(), dtype=float)
    # The post runs FEED_OVERRUN_MM beyond the mouth along its own direction (+x here:
    # the feed heads from the hub's edge to its centre), the groove's width across.
    assert pts[:, 0].min() == pytest.approx(x0 - FEED_OVERRUN_MM, abs=1e-9)
    assert pts[:, 1].max() - pts[:, 1].min() == pytest.approx(net.width_mm, abs=1e-9)
    # The notch, the post grown by the locating clearance, reaches from inside the body
    # into the tray wall beyond the outline (outside the body, inside the tray's block).
    c = layer.clearance_mm
    notch_lo = x0 - FEED_OVERRUN_MM - c
    lo, _ = r.body_bounds()
    half = net.width_mm / 2.0 + c
    ends = np.array([[notch_lo, -half], [notch_lo, half], [x0 + 1.0, 0.0]])
    d = outline.sdf(ends)
    assert d[0] > 0.0 and d[1] > 0.0 and d[2] < 0.0
    assert notch_lo > lo[0] - layer.wall_mm


def test_the_overflow_hole_keeps_clear_of_the_feeds_notch(planned):
    r, layer = planned
    (net,) = r.voids
    xy = layer.overflow_xy_mm
    assert xy is not None
    keep = r.mold.vent_diameter_mm / 2.0
    x0, y0 = net.paths[0][0]
    assert math.dist(xy, (x0, y0)) > keep + FEED_OVERRUN_MM + layer.clearance_mm
