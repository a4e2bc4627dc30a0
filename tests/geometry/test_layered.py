"""The layered process's two steps, checked against sources outside the project: each part
a closed volume for manifold3d, no two parts of a step (nor the pressed chambered part and
the base step's parts) sharing volume, the two layers together the closed-form actuator,
every chamber open onto the bond face and closed by the base, and the posts releasing
along their pull.

Closed forms: the volume of a rounded box is the Steiner formula of its inner box
(V = abc + 2r(ab + bc + ca) + pi r^2 (a + b + c) + 4/3 pi r^3); a tapered prism's section
is its outline with every edge moved in by t tan(draft), here constructed by intersecting
the moved edge lines and measured with the shoelace formula, and integrated with Simpson's
rule, exact for polynomials up to the third degree (the section area is quadratic in t).
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import built_layered
from meshes import manifold

NAME = "seedling-layered-finger"
#: Agreement of the built actuator with the closed form (relative).
VOLUME_TOL = 0.002


@pytest.fixture(scope="module")
def layered():
    return built_layered(NAME)



def turned_back(mesh) -> trimesh.Trimesh:
    """A chambered-step mesh back in the actuator frame: the half turn about x again."""
    v = np.array(mesh.vertices) * np.array([1.0, -1.0, -1.0])
    return trimesh.Trimesh(v, np.array(mesh.faces), process=False)


def steiner_rounded_box_mm3(size, r):
    a, b, c = (s - 2 * r for s in size)
    return a * b * c + 2 * r * (a * b + b * c + c * a) + math.pi * r * r * (a + b + c) \
        + 4.0 / 3.0 * math.pi * r ** 3


def inset_polygon_area(pts, d):
    """Area of the convex polygon ``pts`` (counter-clockwise) with every edge line moved in
    by ``d``: neighbouring moved lines intersected, then the shoelace formula."""
    p = np.asarray(pts, dtype=float)
    n = len(p)
    lines = []
    for i in range(n):
        a, b = p[i], p[(i + 1) % n]
        t = (b - a) / np.linalg.norm(b - a)
        inward = np.array([-t[1], t[0]])
        lines.append((a + d * inward, t))
    out = []
    for i in range(n):
        (p0, t0), (p1, t1) = lines[i - 1], lines[i]
        s = np.linalg.solve(np.column_stack([t0, -t1]), p1 - p0)
        out.append(p0 + s[0] * t0)
    q = np.asarray(out)
    return 0.5 * abs(np.dot(q[:, 0], np.roll(q[:, 1], -1)) - np.dot(np.roll(q[:, 0], -1), q[:, 1]))


def simpson(f, h):
    return h / 6.0 * (f(0.0) + 4.0 * f(h / 2.0) + f(h))


def closed_form_actuator_mm3(m) -> float:
    r = m.recipe
    (body,) = r.body_primitives()
    layer = m.steps[0].layer
    tan = math.tan(math.radians(r.process.draft_deg))
    chambers = [p for p in layer.posts if "chamber" in p.name]
    (feed,) = [p for p in layer.posts if "feed" in p.name]
    voids = sum(simpson(lambda t, p=p: inset_polygon_area(p.outline_mm(), t * tan),
                        p.height_mm) for p in chambers)
    # The feed groove outside the chambers: its band |y| < w/2 lies in every chamber's
    # straight-sided part; it runs from the inlet face x = 0 to the last chamber's middle.
    lx = chambers[0].size_mm[0]
    x_end = feed.center_mm[0] + feed.size_mm[0] / 2.0
    n = len(chambers)

    def outside(t):
        d = t * tan
        length = (x_end - d) - (n - 1) * (lx - 2 * d) - (lx / 2.0 - 2 * d)
        return (feed.size_mm[1] - 2 * d) * length

    voids += simpson(outside, feed.height_mm)
    return steiner_rounded_box_mm3(body.size_mm, body.radius_mm) - voids


def test_every_part_of_each_step_is_a_closed_volume_for_manifold3d(layered):
    for s in layered.steps:
        for p in s.parts:
            man = manifold(p.mesh)
            assert man.status() == m3.Error.NoError, (s.name, p.name)
            assert man.volume() == pytest.approx(p.brep_volume_mm3, rel=0.005), (s.name, p.name)


def test_no_two_parts_of_a_step_share_volume(layered):
    for s in layered.steps:
        parts = [manifold(p.mesh) for p in s.parts]
        if s.name == "base":  # the chambered part pressed in, in the actuator frame
            first = layered.steps[0].part("cast").mesh
            tm = turned_back(first)
            parts.append(manifold(type(first)(tm.vertices, tm.faces)))
        for i in range(len(parts)):
            for j in range(i + 1, len(parts)):
                shared = (parts[i] ^ parts[j]).volume()
                # Touching faces only: less than a thousandth of a cubic millimetre.
                assert shared < 1e-3, (s.name, i, j, shared)


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
    assert len(chambers) == 7
    for p in chambers:
        # Off the feed groove's band, so the probe is in the chamber proper.
        x, y = p.center_mm[0], p.center_mm[1] + p.size_mm[1] / 4.0
        inside = np.array([[x, y, bond + 0.5]])
        assert not first.contains(inside)[0], p.name
        down, up = np.array([[0.0, 0.0, -1.0]]), np.array([[0.0, 0.0, 1.0]])
        # Open: straight down from the chamber the chambered layer has no silicone.
        assert len(first.ray.intersects_location(inside, down)[0]) == 0, p.name
        # Closed: the base layer lies right below, its top on the bond face.
        hits, _, _ = base.ray.intersects_location(inside, down)
        assert len(hits) > 0 and hits[:, 2].max() == pytest.approx(bond, abs=1e-6), p.name
        assert base.contains(np.array([[x, y, bond - 0.5]]))[0], p.name
        # And the chamber's ceiling is the chambered layer's silicone.
        hits, _, _ = first.ray.intersects_location(inside, up)
        assert hits[:, 2].min() == pytest.approx(bond + p.height_mm, abs=1e-6), p.name


def test_posts_release_along_plus_z_with_at_least_the_set_draft(layered):
    step = layered.steps[0]
    bridge = step.part("post-bridge")
    assert bridge.pull_dir == (0.0, 0.0, 1.0)
    layer = step.layer
    tri = np.asarray(bridge.mesh.vertices)[np.asarray(bridge.mesh.faces)]
    c = tri.mean(axis=1)
    (cx, cy), (lx, ly) = layer.footprint.center_mm, layer.footprint.size_mm
    # Turned over, the posts hang below the plate (z < -bond) over the footprint.
    post = ((np.abs(c[:, 0] - cx) < lx / 2) & (np.abs(c[:, 1] + cy) < ly / 2)
            & (c[:, 2] < -layer.bond_z_mm - 1e-6))
    n = np.cross(tri[post, 1] - tri[post, 0], tri[post, 2] - tri[post, 0])
    n /= np.linalg.norm(n, axis=1, keepdims=True)
    # A facet of a part pulled along +z leaves the silicone when its outward normal points
    # down by at least sin(draft): draft = asin(-n_z).
    draft = np.degrees(np.arcsin(-n[:, 2]))
    set_deg = layered.recipe.process.draft_deg
    assert post.sum() > 100
    assert draft.min() >= set_deg - 1e-6
    assert np.isclose(draft, set_deg, atol=1e-6).sum() > 50  # the post sides themselves


def test_every_printed_part_carries_the_variant_label_cut_into_a_flat_face(layered):
    # Variants cast side by side must not be mixed up: every tray and bridge has the label
    # cut in. Outside reference: manifold3d's volume of the part against the same part with
    # its label box filled back in (a union with the box clipped to the part's convex hull):
    # the difference is the text cut away.
    for s in layered.steps:
        printed = {p.name for p in s.parts if p.role != "cast"}
        assert set(s.label_boxes) == printed, s.name
        for name, (lo, hi) in s.label_boxes.items():
            part = manifold(s.part(name).mesh)
            box = m3.Manifold.cube(np.subtract(hi, lo)).translate(lo)
            hull = m3.Manifold.hull(part)
            filled = part + (box ^ hull)
            removed = filled.volume() - part.volume()
            assert removed > 1.0, (s.name, name)                     # mm3: text was cut
            # On an outer face: the box straddles one face of the part's bounding box.
            v = s.part(name).mesh.vertices
            plo, phi = v.min(axis=0), v.max(axis=0)
            assert any(lo[k] < b < hi[k] for k in range(3) for b in (plo[k], phi[k]))
