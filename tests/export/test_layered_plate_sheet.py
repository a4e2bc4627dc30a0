"""The strain-limiting sheet template of a plate cast layered (the bundled seed-tray pad),
written from the plan alone (no CAD work): a 1:1 page whose outline is the pad's outline
moved in by the cover margin.

Source: the inner parallel curve at distance m of a convex polygon whose corners are
rounded by r >= m is the polygon with every edge line moved in by m (the moved lines
intersected), its corners rounded by r - m; a rounding of radius rho on a corner turning by
t takes rho^2 (tan(t/2) - t/2) off the sharp corner (elementary plane geometry); the
shoelace formula for the areas. The page's outline is the arcs' chords, one a degree:
short of the arcs by at most rho^2 (t - sin t) / 2 per degree, under 1e-4 here.
"""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest

from soft_molds.export.layered import sheet_outline, sheet_svg
from soft_molds.plan import plan_mold
from soft_molds.recipe.load import load_recipe

ROOT = Path(__file__).resolve().parents[2]


def shoelace(p) -> float:
    p = np.asarray(p, dtype=float)
    return 0.5 * abs(float(np.dot(p[:, 0], np.roll(p[:, 1], -1))
                           - np.dot(np.roll(p[:, 0], -1), p[:, 1])))


def inset_rounded_polygon_area(points, r, m) -> float:
    p = np.asarray(points, dtype=float)  # counter-clockwise, as the pad's are written
    n = len(p)
    lines = []
    for i in range(n):
        a, b = p[i], p[(i + 1) % n]
        t = (b - a) / np.linalg.norm(b - a)
        lines.append((a + m * np.array([-t[1], t[0]]), t))
    corners = []
    for i in range(n):
        (p0, t0), (p1, t1) = lines[i - 1], lines[i]
        s = np.linalg.solve(np.column_stack([t0, -t1]), p1 - p0)
        corners.append(p0 + s[0] * t0)
    area = shoelace(corners)
    for i in range(n):
        a, b = p[i] - p[i - 1], p[(i + 1) % n] - p[i]
        t = math.acos(float(a @ b) / (np.linalg.norm(a) * np.linalg.norm(b)))
        area -= (r - m) ** 2 * (math.tan(t / 2.0) - t / 2.0)
    return area


def test_the_plates_sheet_is_its_outline_moved_in_by_the_cover_margin():
    r = load_recipe(ROOT / "recipes" / "seed-tray-pad.yaml")
    base = plan_mold(r).steps[1].layer
    m = r.process.cover_margin_mm
    svg = sheet_svg(sheet_outline(base.footprint.inset(base.sheet_inset_mm)), "test")
    root = ET.fromstring(svg)
    ns = {"s": "http://www.w3.org/2000/svg"}
    vb = [float(v) for v in root.get("viewBox").split()]
    assert float(root.get("width").removesuffix("mm")) == pytest.approx(vb[2])
    poly = root.find("s:polygon[@id='sheet-outline']", ns)
    xy = np.array([[float(v) for v in p.split(",")] for p in poly.get("points").split()])
    want = inset_rounded_polygon_area(r.body.outline_mm, r.body.corner_radius_mm, m)
    # Written to 1e-4 mm a coordinate: the area to about perimeter x 1e-4.
    assert shoelace(xy) == pytest.approx(want, rel=1e-5)
    # Every corner of the page's outline lies m inside the pad's outline, read back 1:1:
    # the page's margin is 10 mm, the sheet's leftmost x is m (the pad's left edge is
    # straight, on x = 0) and its top y is 17 - m (the pad's top edge, straight, y = 17);
    # the page's y points down.
    pts = np.column_stack([xy[:, 0] - 10.0 + m, (17.0 - m) + 10.0 - xy[:, 1]])
    assert np.allclose(r.body.outline().sdf(pts), -m, atol=1e-4)
