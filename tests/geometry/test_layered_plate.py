"""The layered process on a plate body (the bundled seed-tray pad: an eight-sided outline
with rounded corners), checked against sources outside the project as the bar's steps are
(tests/geometry/test_layered.py): each part a closed volume for manifold3d, no two parts of
a step (nor the pressed chambered part and the base step's parts) sharing volume, the two
layers together the closed-form actuator, every chamber open onto the bond face and closed
by the base, the posts releasing along their pull; and what a plate adds: the base tray's
guide the outline moved out by the clearance, the sheet the outline moved in by the cover
margin, the overflow hole open through the bridge.

Closed forms: the plate is its outline's area times its thickness, the area by the
shoelace formula of the sharp polygon less each convex rounding's spandrel r^2 (tan(t/2) -
t/2) (elementary plane geometry); a tapered post's section is its outline with every edge
moved in by t tan(draft) (the moved edge lines intersected, then the shoelace formula),
integrated with Simpson's rule, exact for the quadratic section area. Distances to the
outline: trimesh's plane cuts of the meshes against points sampled on the recipe's
outline; inside tests by matplotlib's point-in-path.
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import built_layered
from matplotlib.path import Path
from meshes import manifold

NAME = "seed-tray-pad"
VOLUME_TOL = 0.002


@pytest.fixture(scope="module")
def layered():
    return built_layered(NAME)



def turned_back(mesh) -> trimesh.Trimesh:
    v = np.array(mesh.vertices) * np.array([1.0, -1.0, -1.0])
    return trimesh.Trimesh(v, np.array(mesh.faces), process=False)


def shoelace(p) -> float:
    p = np.asarray(p, dtype=float)
    return 0.5 * float(np.dot(p[:, 0], np.roll(p[:, 1], -1)) - np.dot(np.roll(p[:, 0], -1),
                                                                       p[:, 1]))


def rounded_polygon_area(points, r) -> float:
    """Shoelace of the sharp convex polygon less every corner's spandrel (docstring)."""
    v = np.asarray(points, dtype=float)
    area = abs(shoelace(v))
    for i in range(len(v)):
        a, b = v[i] - v[i - 1], v[(i + 1) % len(v)] - v[i]
        t = math.acos(float(a @ b) / (np.linalg.norm(a) * np.linalg.norm(b)))
        area -= r * r * (math.tan(t / 2.0) - t / 2.0)
    return area


def inset_polygon_area(pts, d):
    p = np.asarray(pts, dtype=float)
    n = len(p)
    lines = []
    for i in range(n):
        a, b = p[i], p[(i + 1) % n]
        t = (b - a) / np.linalg.norm(b - a)
        lines.append((a + d * np.array([-t[1], t[0]]), t))
    out = []
    for i in range(n):
        (p0, t0), (p1, t1) = lines[i - 1], lines[i]
        s = np.linalg.solve(np.column_stack([t0, -t1]), p1 - p0)
        out.append(p0 + s[0] * t0)
    return abs(shoelace(out))


def simpson(f, h):
    return h / 6.0 * (f(0.0) + 4.0 * f(h / 2.0) + f(h))


def closed_form_actuator_mm3(m) -> float:
    r = m.recipe
    body = r.body
    layer = m.steps[0].layer
    tan = math.tan(math.radians(r.process.draft_deg))
    chambers = [p for p in layer.posts if "chamber" in p.name]
    (feed,) = [p for p in layer.posts if "feed" in p.name]
    voids = sum(simpson(lambda t, p=p: inset_polygon_area(p.outline_mm(), t * tan),
                        p.height_mm) for p in chambers)
    # The feed groove outside the chambers: its band lies in every chamber's straight-sided
    # part; it runs from the inlet face x = 0 into the last chamber, so outside them it is
    # the stretch before the first chamber and the gaps between them (each wider by the
    # draft on both sides at height t).
    lx = chambers[0].size_mm[0]
    n = len(chambers)
    gap = chambers[1].center_mm[0] - chambers[0].center_mm[0] - lx

    def outside(t):
        d = t * tan
        before = chambers[0].center_mm[0] - lx / 2.0 + d
        return (feed.size_mm[1] - 2 * d) * (before + (n - 1) * (gap + 2 * d))

    voids += simpson(outside, feed.height_mm)
    plate = rounded_polygon_area(body.outline_mm, body.corner_radius_mm) * body.thickness_mm
    return plate - voids


def section(mesh, z):
    """Segments (n, 2, 2) where the plane at height z cuts the mesh's triangles."""
    tm = trimesh.Trimesh(np.asarray(mesh.vertices), np.asarray(mesh.faces), process=False)
    lines = trimesh.intersections.mesh_plane(tm, (0.0, 0.0, 1.0), (0.0, 0.0, z))
    return lines[:, :, :2]


def distance_to_segments(q, segs):
    a, b = segs[:, 0], segs[:, 1]
    ab = b - a
    t = np.clip(np.sum((q[:, None] - a) * ab, axis=2) / np.sum(ab * ab, axis=1), 0.0, 1.0)
    return np.linalg.norm(q[:, None] - (a + t[..., None] * ab), axis=2).min(axis=1)


def outline_points(r, spacing=0.5):
    """Points on the recipe's outline (the plate's exact outline, sampled)."""
    return r.body.outline().boundary(spacing)


def test_every_part_of_each_step_is_a_closed_volume_for_manifold3d(layered):
    for s in layered.steps:
        for p in s.parts:
            man = manifold(p.mesh)
            assert man.status() == m3.Error.NoError, (s.name, p.name)
            assert man.volume() == pytest.approx(p.brep_volume_mm3, rel=0.005), (s.name, p.name)


def test_no_two_parts_of_a_step_share_volume(layered):
    for s in layered.steps:
        parts = [manifold(p.mesh) for p in s.parts]
        if s.name == "base":
            first = layered.steps[0].part("cast").mesh
            tm = turned_back(first)
            parts.append(manifold(type(first)(tm.vertices, tm.faces)))
        for i in range(len(parts)):
            for j in range(i + 1, len(parts)):
                assert (parts[i] ^ parts[j]).volume() < 1e-3, (s.name, i, j)


def test_the_two_layers_make_the_closed_form_actuator(layered):
    want = closed_form_actuator_mm3(layered)
    brep = sum(s.part("cast").brep_volume_mm3 for s in layered.steps)
    mesh = sum(manifold(s.part("cast").mesh).volume() for s in layered.steps)
    assert brep == pytest.approx(want, rel=VOLUME_TOL)
    assert mesh == pytest.approx(want, rel=VOLUME_TOL)


def test_every_chamber_opens_onto_the_bond_face_and_the_base_closes_it(layered):
    layer = layered.steps[0].layer
    first = turned_back(layered.steps[0].part("cast").mesh)
    base = layered.steps[1].part("cast").mesh.to_trimesh()
    bond = layer.bond_z_mm
    chambers = [p for p in layer.posts if "chamber" in p.name]
    assert len(chambers) == layered.recipe.voids[0].count
    down = np.array([[0.0, 0.0, -1.0]])
    for p in chambers:
        x, y = p.center_mm[0], p.center_mm[1] + p.size_mm[1] / 4.0
        inside = np.array([[x, y, bond + 0.5]])
        assert not first.contains(inside)[0], p.name
        assert len(first.ray.intersects_location(inside, down)[0]) == 0, p.name
        hits, _, _ = base.ray.intersects_location(inside, down)
        assert len(hits) > 0 and hits[:, 2].max() == pytest.approx(bond, abs=1e-6), p.name


def test_posts_release_along_plus_z_with_at_least_the_set_draft(layered):
    step = layered.steps[0]
    bridge = step.part("post-bridge")
    layer = step.layer
    tri = np.asarray(bridge.mesh.vertices)[np.asarray(bridge.mesh.faces)]
    c = tri.mean(axis=1)
    inside = Path(outline_points(layered.recipe)).contains_points(c[:, :2] * [1.0, -1.0])
    post = inside & (c[:, 2] < -layer.bond_z_mm - 1e-6)
    n = np.cross(tri[post, 1] - tri[post, 0], tri[post, 2] - tri[post, 0])
    n /= np.linalg.norm(n, axis=1, keepdims=True)
    draft = np.degrees(np.arcsin(-n[:, 2]))
    assert post.sum() > 100
    assert draft.min() >= layered.recipe.process.draft_deg - 1e-6


def test_the_base_trays_guide_is_the_outline_moved_out_by_the_clearance(layered):
    r = layered.recipe
    s = layered.steps[1]
    lo, hi = r.body_bounds()
    bond = s.layer.bond_z_mm
    # Midway up the guide: the tray's inner wall there, against the plate's outline.
    segs = section(s.part("tray").mesh, (bond + hi[2]) / 2.0)
    pts = outline_points(r)
    gap = distance_to_segments(pts, segs)
    # Convex corners grow by arcs drawn as chords: at most the mesh chord inside.
    assert gap.min() == pytest.approx(r.mold.clearance_mm, abs=0.02)
    assert gap.max() == pytest.approx(r.mold.clearance_mm, abs=0.02)


def test_the_sheet_is_the_outline_moved_in_by_the_cover_margin(layered):
    r = layered.recipe
    s = layered.steps[1]
    sheet = s.layer.footprint.inset(s.layer.sheet_inset_mm)
    pts = sheet.outline.boundary(0.25)
    body = r.body.outline()
    # Every point of the sheet's edge lies the margin inside the plate's exact outline.
    assert np.allclose(body.sdf(pts), -r.process.cover_margin_mm, atol=1e-9)
    # The base cast's section: every sheet point is inside it, the margin from its edge.
    lo, hi = s.part("cast").mesh.bbox_mm()
    segs = section(s.part("cast").mesh, (lo[2] + hi[2]) / 2.0)
    cover = distance_to_segments(pts, segs)
    assert cover.min() == pytest.approx(r.process.cover_margin_mm, abs=0.02)
    cover_finding = [f for f in layered.findings if f.check == "sheet-cover"]
    assert cover_finding and cover_finding[0].value == pytest.approx(cover.min(), abs=0.02)


def test_the_overflow_hole_goes_through_the_bridge_over_the_cast(layered):
    step = layered.steps[0]
    xy = step.layer.overflow_xy_mm
    assert xy is not None
    bridge = turned_back(step.part("post-bridge").mesh)
    start = np.array([[xy[0], xy[1], step.layer.bond_z_mm - 10.0]])
    hits, _, _ = bridge.ray.intersects_location(start, np.array([[0.0, 0.0, 1.0]]))
    assert len(hits) == 0
    # Over the pocket: inside the plate's outline, clear of its edge.
    assert layered.recipe.body.outline().sdf(np.array([xy]))[0] < -1.0
