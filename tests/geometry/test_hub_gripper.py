"""The four-arm hub gripper (recipes/seedling-hub-gripper.yaml), cast by the layered
process with a channel network and slits, checked step by step with libraries outside the
project on the meshes (trimesh, manifold3d), as the layered finger and the multi-step
recipes are (tests/geometry/test_layered.py, test_melted_core.py):

- every part of each step a closed volume (trimesh and manifold3d) of its BRep volume;
- no two parts of a step sharing volume (the base step with the chambered part pressed in);
- the cast's surface on a mold surface or under the open face of the pour (99.5 %);
- each printed part moved along its pull cuts neither the cast nor another part (posts,
  fins and tray walls release);
- the cavity reaches the outside only through the top;
- the silicone of both pours is the body less the posts and the slits: the body by the
  plate's closed form, the posts' union by manifold3d (each a convex hull of its bond-face
  outline and its top outline moved in by the draft), the slits by their closed-form
  section times the arm's width;
- the grooves of the network have the closed-form volume of the channels kind, measured
  by manifold3d on the posts themselves at no draft.

Built once per session (conftest.built_layered).
"""

from __future__ import annotations

import itertools
import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import built_layered
from meshes import manifold

NAME = "seedling-hub-gripper"
#: The plate's placement by hand (plane geometry): its leftmost point is on the tip
#: rounding of the 135 and 225 deg arms, (45 - 3 + 7 - 3) / sqrt(2) + 3 from the hub's
#: centre along -x, and the plate is moved so that point is on x = 0.
HUB_CENTRE_MM = (3.0 + 46.0 / math.sqrt(2.0), 0.0)
HUB_RADIUS_MM = 15.0
#: As tests/geometry/test_melted_core.py: overlap of parts touching face to face (per mm3
#: of the smaller), and how far the air reaches beyond the closed mold (mm).
TOUCH_FRACTION = 5e-4
MARGIN_MM = 10.0


@pytest.fixture(scope="module")
def hub():
    return built_layered(NAME)



def turned_back(man: m3.Manifold) -> m3.Manifold:
    """A chambered-step solid back in the actuator frame: the half turn about x."""
    return man.rotate([180.0, 0.0, 0.0])


def test_every_part_of_each_step_is_a_closed_volume_of_its_brep_volume(hub):
    for s in hub.steps:
        for part in s.parts:
            tm = part.mesh.to_trimesh()
            assert tm.is_watertight and tm.is_winding_consistent and tm.is_volume, part.name
            mf = manifold(part.mesh)
            assert mf.status() == m3.Error.NoError
            assert mf.volume() == pytest.approx(part.brep_volume_mm3, rel=0.005), part.name


def _solids(hub, s) -> dict[str, m3.Manifold]:
    out = {p.name: manifold(p.mesh) for p in s.parts}
    if s.name == "base":  # the cured chambered part pressed face down onto the base
        out["pressed"] = turned_back(manifold(hub.steps[0].part("cast").mesh))
    return out


def test_no_two_parts_of_a_step_share_volume(hub):
    for s in hub.steps:
        solids = _solids(hub, s)
        for a, b in itertools.combinations(solids, 2):
            inter = (solids[a] ^ solids[b]).volume()
            assert inter < TOUCH_FRACTION * min(solids[a].volume(), solids[b].volume()), \
                (s.name, a, b, inter)


def test_each_cast_lies_on_its_mold_or_under_the_open_face_of_its_pour(hub):
    """Sampled points of each step's cast lie within 0.05 mm of a printed part's surface
    (trimesh proximity), at least 99.5 % of those not on the pour's open face: the base's
    top (the bond face, where the chambered part is pressed on) and, in the chambered step,
    the overflow hole's disc in the bridge."""
    for s in hub.steps:
        cast = s.part("cast").mesh.to_trimesh()
        tools = [p.mesh.to_trimesh() for p in s.parts if p.role != "cast"]
        pts, _ = trimesh.sample.sample_surface_even(cast, 1500, seed=7)
        dist = np.min([trimesh.proximity.closest_point(t, pts)[1] for t in tools], axis=0)
        top = cast.bounds[1][2]
        if s.name == "base":
            open_face = np.abs(pts[:, 2] - top) < 1e-6
        else:  # turned over: the bond face is the cast's top; the hole is over the plate
            open_face = np.zeros(len(pts), dtype=bool)
        on = dist <= 0.05
        assert np.mean(on[~open_face]) >= 0.995, (s.name, np.mean(on[~open_face]))


def test_each_printed_part_moved_along_its_pull_cuts_neither_the_cast_nor_another_part(hub):
    for s in hub.steps:
        solids = _solids(hub, s)
        for part in s.parts:
            if part.role == "cast":
                continue
            pull = np.asarray(part.pull_dir, dtype=np.float64)
            lo, hi = (np.asarray(c) for c in part.mesh.bbox_mm())
            height = float(abs((hi - lo) @ pull))
            for d in (0.05, 0.2, 1.0, 3.0, height / 2.0, height):
                moved = solids[part.name].translate(list(pull * d))
                for other, solid in solids.items():
                    if other == part.name or other == "pressed":
                        continue
                    limit = TOUCH_FRACTION * min(solid.volume(), moved.volume())
                    assert (moved ^ solid).volume() <= limit, (s.name, part.name, other, d)


def _air(step, lid: bool, extra: list[m3.Manifold]) -> list[m3.Manifold]:
    """The connected pieces of air around a step's closed mold (its printed parts and
    ``extra`` solids), optionally under a lid on its top face."""
    closed = m3.Manifold.batch_boolean([manifold(p.mesh) for p in step.parts
                                        if p.role != "cast"] + extra, m3.OpType.Add)
    box = closed.bounding_box()
    lo, hi = np.array(box[:3]) - MARGIN_MM, np.array(box[3:]) + MARGIN_MM
    air = m3.Manifold.cube(list(hi - lo)).translate(list(lo)) - closed
    if lid:
        lid_lo = lo.copy()
        lid_lo[2] = box[5] - 0.01
        air = air - m3.Manifold.cube(list(hi - lid_lo)).translate(list(lid_lo))
    return air.decompose()


def test_each_cavity_reaches_the_outside_only_through_the_top(hub):
    first, second = hub.steps
    pressed = turned_back(manifold(first.part("cast").mesh))
    guide = second.layer.footprint
    layer = first.layer
    grooves = m3.Manifold.batch_boolean([post_hull(p, p.draft_deg) for p in layer.posts],
                                        m3.OpType.Add).volume()
    lo, hi = hub.recipe.body_bounds()
    for s, extra in ((first, []), (second, [pressed])):
        cast = manifold(s.part("cast").mesh)
        closed = max(_air(s, True, extra), key=lambda piece: (piece ^ cast).volume())
        # Closed under the lid: the whole cast and, beyond it, no more than the overflow
        # hole (chambered) or, under the pressed part, its open grooves and chambers, its
        # slits (open to its sides) and the locating clearance round it (base).
        assert (closed ^ cast).volume() >= 0.995 * cast.volume(), s.name
        more = 200.0
        if s is second:
            ring = guide.inset(-s.layer.clearance_mm).area_mm2() - guide.area_mm2()
            slits = sum(c.removed_mm3() for c in hub.recipe.outer_cuts())
            more += grooves + slits + ring * (hi[2] - layer.bond_z_mm)
        assert closed.volume() <= 1.02 * cast.volume() + more, s.name
        opened = max(_air(s, False, extra), key=lambda piece: (piece ^ cast).volume())
        assert opened.volume() > 3.0 * cast.volume(), s.name


def _inset(pts: np.ndarray, d: float) -> np.ndarray:
    """The convex counter-clockwise polygon ``pts`` with every edge line moved in by d:
    neighbouring moved lines intersected (plane geometry)."""
    n = len(pts)
    lines = []
    for i in range(n):
        a, b = pts[i], pts[(i + 1) % n]
        t = (b - a) / np.linalg.norm(b - a)
        lines.append((a + d * np.array([-t[1], t[0]]), t))
    out = []
    for i in range(n):
        (p0, t0), (p1, t1) = lines[i - 1], lines[i]
        k = np.linalg.solve(np.column_stack([t0, -t1]), p1 - p0)
        out.append(p0 + k[0] * t0)
    return np.asarray(out)


def post_hull(p, draft_deg: float) -> m3.Manifold:
    """A drafted post as manifold3d's convex hull of its bond-face outline and its top
    outline (every edge moved in by height x tan(draft))."""
    low = np.asarray(p.outline_mm(), dtype=float)
    high = _inset(low, p.height_mm * math.tan(math.radians(draft_deg)))
    pts = np.vstack([np.column_stack([low, np.full(len(low), p.base_z_mm)]),
                     np.column_stack([high, np.full(len(high), p.base_z_mm + p.height_mm)])])
    return m3.Manifold.hull_points(pts)


def test_the_two_pours_are_the_body_less_the_posts_and_the_slits(hub):
    r = hub.recipe
    (body,) = r.body_primitives()
    layer = hub.steps[0].layer
    posts = m3.Manifold.batch_boolean([post_hull(p, p.draft_deg) for p in layer.posts],
                                      m3.OpType.Add)
    # The feed's post runs on beyond the mouth, on the hub's edge at 180 deg between the
    # two left arms, by FEED_OVERRUN_MM (1 mm): in a box round that overrun only the hub's
    # disc is silicone (a 1024-gon, inscribed: 15 (1 - cos(pi / 1024)) = 7e-5 mm inside
    # the arc, some 1e-4 mm3 over the 2 mm groove).
    cx, cy = HUB_CENTRE_MM
    box = m3.Manifold.cube([3.0, 6.0, 20.0]).translate([cx - HUB_RADIUS_MM - 2.0, cy - 3.0,
                                                        -10.0])
    disc = m3.Manifold.cylinder(40.0, HUB_RADIUS_MM, HUB_RADIUS_MM, 1024).translate(
        [cx, cy, -20.0])
    grooves = (posts - (box - disc)).volume()
    arm = r.body.arm_width_mm
    slits = sum(c.removed_mm3(span_mm=arm) for c in r.outer_cuts())
    want = body.volume_mm3() - grooves - slits
    got = sum(s.part("cast").brep_volume_mm3 for s in hub.steps)
    # Every face is a plane or an exact arc, in the kernel as in the references: they
    # agree to float noise (measured 3e-16), held here to a millionth.
    assert got == pytest.approx(want, rel=1e-6)
    assert len(r.outer_cuts()) == 12


def test_the_network_posts_at_no_draft_have_the_channels_closed_form_volume(hub):
    """The segment and joint posts stood straight (no draft, no run into the joints or
    beyond the mouth) with the channel's square section: manifold3d's union against the
    kind's closed form for that section."""
    from dataclasses import replace

    (net,) = hub.recipe.voids
    square = replace(net, corner_radius_mm=0.0)
    layer = hub.steps[0].layer
    solids = []
    for _, _, a, b in square.segments():
        ang = math.degrees(math.atan2(b[1] - a[1], b[0] - a[0]))
        solids.append(m3.Manifold.cube([math.dist(a, b), net.width_mm, net.height_mm],
                                       center=True)
                      .rotate([0.0, 0.0, ang])
                      .translate([(a[0] + b[0]) / 2, (a[1] + b[1]) / 2,
                                  layer.bond_z_mm + net.height_mm / 2]))
    for j in square.joints():
        solids.append(m3.Manifold.cylinder(net.height_mm, net.width_mm / 2.0,
                                           net.width_mm / 2.0, 512)
                      .translate([j[0], j[1], layer.bond_z_mm]))
    union = m3.Manifold.batch_boolean(solids, m3.OpType.Add)
    assert union.volume() == pytest.approx(square.channel_volume_mm3(), rel=1e-3)


def test_the_feed_opens_on_the_hubs_edge_at_180_deg_through_a_notch_in_the_tray(hub):
    """The mouth is on the hub's circle at 180 deg (the placement by hand above), and the
    chambered tray, turned back into the actuator frame, is open there: trimesh's
    containment finds air on the groove's line 0.5 mm beyond the mouth at mid-height of
    the groove, and tray on either side of the notch (the post's half width plus the
    locating clearance plus 0.5 mm out)."""
    r = hub.recipe
    (net,) = r.voids
    mouth = net.paths[0][0]
    assert mouth[0] == pytest.approx(HUB_CENTRE_MM[0] - HUB_RADIUS_MM, abs=1e-9)
    assert mouth[1] == 0.0
    layer = hub.steps[0].layer
    tray = hub.steps[0].part("tray").mesh.to_trimesh()
    z = layer.bond_z_mm + net.height_mm / 2.0
    side = net.width_mm / 2.0 + layer.clearance_mm + 0.5
    x = mouth[0] - 0.5
    # The chambered step's parts are turned over (a half turn about x: y, z -> -y, -z).
    pts = np.array([[x, 0.0, -z], [x, side, -z], [x, -side, -z]])
    assert tray.contains(pts).tolist() == [False, True, True]
