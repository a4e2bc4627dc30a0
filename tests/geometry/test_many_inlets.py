"""Mold sets with several inlets, one core per group of voids, checked with closed-form
geometry and with manifold3d (its own booleans and projections, not the code under test).

Two builds: the bundled two-way finger (two chamber rows one above the other, each fed
from its own socket in the x = 0 face, both cores pulled along -x), and a pair fed from
opposite faces (a chamber row from the x = 0 face, a bore from the x = 100 face, pulled
along +x), written here.

Sources: the Steiner formula for a box grown by a ball, V = abc + 2r(ab + bc + ca) +
pi r^2 (a + b + c) + 4/3 pi r^3 for the inner box a x b x c (Minkowski sum of convex
bodies); the cylinder pi r^2 h; the voids' union by elementary geometry (each feed channel
runs through the flat faces of its chambers and inside its wider, coaxial socket). A core
pulled along its axis sweeps a region inside the prism over its shadow on the plane normal
to the pull (its projection, manifold3d), from wherever it goes back to its own far end:
that prism missing a part proves the sweep misses it.
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
from conftest import built
from meshes import manifold
from recipe_text import END_FED

PI = math.pi



@pytest.fixture(scope="module")
def two_way():
    return built("seedling-two-way-finger")


@pytest.fixture(scope="module")
def end_fed():
    from soft_molds import build
    from soft_molds.recipe import recipe_from_text

    return build(recipe_from_text(END_FED, "end-fed-pair.yaml", "end-fed-pair"))


def rounded_box(a: float, b: float, c: float, r: float) -> float:
    """Box of outer size a x b x c, every edge rounded by r (Steiner formula)."""
    a, b, c = a - 2 * r, b - 2 * r, c - 2 * r
    return a * b * c + 2 * r * (a * b + b * c + c * a) + PI * r * r * (a + b + c) \
        + 4.0 / 3.0 * PI * r ** 3


def chamber_row(n: int, pitch: float, depth: float, cw: float, ch: float, cr: float,
                feed_r: float, start: float, sock_r: float, sock_t: float) -> float:
    """A row of n chambers from x = start, its feed channel from x = 0 to the middle of the
    last chamber, and its coaxial socket (wider than the channel) from x = 0 to sock_t."""
    chambers = n * rounded_box(depth, cw, ch, cr)
    channel_end = start + (n - 1) * pitch + depth / 2.0
    # Outside the chambers (n - 1 full depths and half the last) and the socket.
    outside = channel_end - (n - 1) * depth - depth / 2.0 - sock_t
    return chambers + PI * feed_r ** 2 * outside + PI * sock_r ** 2 * sock_t


# Two-way finger: 80 x 16 x 24 bar (r 2); two rows of 7 chambers 5 x 12 x 7 (r 1) at an
# 8 mm pitch, centred on the bar: first at (80 - 53) / 2 = 13.5; feeds r 1; sockets r 2, 6.
TWO_WAY_BODY = rounded_box(80.0, 16.0, 24.0, 2.0)
TWO_WAY_ROW = chamber_row(7, 8.0, 5.0, 12.0, 7.0, 1.0, 1.0, 13.5, 2.0, 6.0)
# End-fed pair: 100 x 20 x 14 bar (r 2); 4 chambers 5 x 8 x 8 (r 1), first at
# (100 - 29) / 2 = 35.5; a flat-ended bore r 3 over x 30..97 and the end socket r 2 over
# x 94..100 on its axis: the socket adds its 3 mm beyond the bore.
END_BODY = rounded_box(100.0, 20.0, 14.0, 2.0)
END_ROW = chamber_row(4, 8.0, 5.0, 8.0, 8.0, 1.0, 1.0, 35.5, 2.0, 6.0)
END_BORE = PI * 9.0 * 67.0 + PI * 4.0 * 3.0


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


@pytest.mark.parametrize("which, body, voids", [
    ("two_way", TWO_WAY_BODY, 2 * TWO_WAY_ROW),
    ("end_fed", END_BODY, END_ROW + END_BORE),
])
def test_cast_volume_is_the_body_less_every_void_in_closed_form(which, body, voids, request):
    molds = request.getfixturevalue(which)
    assert close(molds.volumes_mm3["body"], body, 0.001)
    assert close(molds.volumes_mm3["void_set"], voids, 0.001), (molds.volumes_mm3, voids)
    cast = molds.part("cast")
    # 0.1 % on the BRep, 0.5 % on the mesh, as for the one-core recipes.
    assert close(cast.brep_volume_mm3, body - voids, 0.001)
    assert close(cast.mesh.volume_mm3(), body - voids, 0.005)


@pytest.mark.parametrize("which, pulls", [
    ("two_way", {"core-1": (-1.0, 0.0, 0.0), "core-2": (-1.0, 0.0, 0.0)}),
    ("end_fed", {"core-1": (-1.0, 0.0, 0.0), "core-2": (1.0, 0.0, 0.0)}),
])
def test_each_group_of_voids_gets_its_own_core_pulled_out_of_its_sockets_face(
        which, pulls, request):
    molds = request.getfixturevalue(which)
    cores = {p.name: p.pull_dir for p in molds.parts if p.role == "core"}
    assert cores == pulls
    length = molds.recipe.body_length_mm
    for sup in molds.plan.step.core_supports:
        lo, hi = molds.part(sup.part).mesh.bbox_mm()
        # The print stands out of the block on the socket's side only.
        if sup.pull_dir[0] < 0:
            assert lo[0] < -molds.recipe.mold.wall_mm and hi[0] < length
        else:
            assert hi[0] > length + molds.recipe.mold.wall_mm and lo[0] > 0.0



#: (x, y, z) -> (y, z, x): the body's axis becomes the third one, which project() drops.
TO_Z = np.array([[0.0, 1.0, 0.0, 0.0], [0.0, 0.0, 1.0, 0.0], [1.0, 0.0, 0.0, 0.0]])


def swept_prism(core: m3.Manifold, pull_x: float, reach_mm: float) -> m3.Manifold:
    """A prism holding everything ``core`` passes through when pulled along ``pull_x`` (-1
    or +1 along x) by up to ``reach_mm``, in the TO_Z frame."""
    moved = core.transform(TO_Z)
    lo, hi = np.array(moved.bounding_box()[:3]), np.array(moved.bounding_box()[3:])
    a, b = (lo[2] - reach_mm, hi[2]) if pull_x < 0 else (lo[2], hi[2] + reach_mm)
    return m3.Manifold.extrude(moved.project(), b - a).translate([0.0, 0.0, a])


@pytest.mark.parametrize("which", ["two_way", "end_fed"])
def test_each_core_pulled_along_its_axis_cuts_neither_the_other_core_nor_the_opened_shells(
        which, request):
    """Demolding order: both shells off along their pulls (each moved by its own height),
    then each core out of the silicone along its socket's axis while the other core is
    still in place."""
    molds = request.getfixturevalue(which)
    solids = {p.name: manifold(p.mesh) for p in molds.parts}
    reach = 2.0 * molds.recipe.body_length_mm + 200.0
    opened = []
    for p in molds.parts:
        if p.role == "shell":
            pull = np.asarray(p.pull_dir)
            lo, hi = (np.asarray(c) for c in p.mesh.bbox_mm())
            opened.append(solids[p.name].translate(list(pull * float(abs((hi - lo) @ pull)))))
    cores = [p for p in molds.parts if p.role == "core"]
    assert len(cores) == 2
    for core in cores:
        prism = swept_prism(solids[core.name], core.pull_dir[0], reach)
        # The prism is where the core goes: it holds the silicone the core is drawn
        # through (the measure bites), and the core itself.
        assert (prism ^ solids["cast"].transform(TO_Z)).volume() > 100.0
        assert (prism ^ solids[core.name].transform(TO_Z)).volume() == pytest.approx(
            solids[core.name].volume(), rel=1e-3)
        for other in cores:
            if other.name != core.name:
                hit = (prism ^ solids[other.name].transform(TO_Z)).volume()
                assert hit < 1e-6, (core.name, other.name, hit)
        for shell in opened:
            assert (prism ^ shell.transform(TO_Z)).volume() < 1e-6, core.name


def test_the_end_fed_pair_parts_are_closed_and_do_not_interpenetrate(end_fed):
    """As tests/geometry/test_mold.py asks of the bundled recipes: every part a closed
    volume for manifold3d within 0.5 % of its BRep volume, no two overlapping by more than
    0.05 % of the smaller (coincident faces)."""
    solids = {}
    for p in end_fed.parts:
        mf = manifold(p.mesh)
        assert mf.status() == m3.Error.NoError, p.name
        assert mf.volume() == pytest.approx(p.brep_volume_mm3, rel=0.005), p.name
        solids[p.name] = mf
    names = sorted(solids)
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            inter = (solids[a] ^ solids[b]).volume()
            assert inter < 5e-4 * min(solids[a].volume(), solids[b].volume()), (a, b, inter)


def test_the_end_fed_pair_keeps_no_pry_notch_where_the_end_print_passes(end_fed):
    """The far end face's pry notch sits on the parting line in the middle of the face,
    where a print through that face would run: with a socket in the end face only the
    side notch is cut."""
    lay = end_fed.plan.step.settled_layout
    assert len(lay.notches) == 1
    u, v, _, _ = lay.notches[0]
    assert u < lay.block_hi[0]


def test_the_predicted_curve_bends_toward_the_first_sockets_row_not_extends(two_way):
    """A two-way finger inflates one row at a time: the curve is the first socket's row
    alone (pressurising both rows mirrored about the axis would wrongly read as a pure
    extender). The closed-form figures are checked in tests/analysis/test_motion.py."""
    assert two_way.motion is not None and two_way.motion.kind == "bending"


def test_the_end_fed_cast_surface_lies_on_mold_or_core_surfaces(end_fed):
    """As tests/geometry/test_mold.py asks of the bundled recipes (trimesh proximity):
    at least 99.5 % of the cast's sampled surface away from the sprue and vent mouths lies
    within 0.05 mm of a shell or core, so the cores' prints and both sockets are formed."""
    import trimesh

    cast = end_fed.part("cast").mesh.to_trimesh()
    tools = trimesh.util.concatenate([p.mesh.to_trimesh() for p in end_fed.parts
                                      if p.role != "cast"])
    pts, _ = trimesh.sample.sample_surface_even(cast, 3000, seed=7)
    _, dist, _ = trimesh.proximity.closest_point(tools, pts)
    w = end_fed.layout.frame.w_axis
    mouth = np.zeros(len(pts), dtype=bool)
    for o in end_fed.openings:
        d = pts - np.asarray(o.center_mm)
        radial = np.linalg.norm(np.delete(d, w, axis=1), axis=1)
        mouth |= (radial <= o.radius_mm + 0.1) & (d[:, w] > -1.0)
    assert np.mean((dist <= 0.05)[~mouth]) >= 0.995
    assert np.mean(mouth) <= 0.02


def test_the_end_fed_cavity_reaches_the_outside_only_through_the_top(end_fed):
    """As tests/geometry/test_mold_release.py asks of the bundled recipes (manifold3d
    booleans and connected pieces): with a lid on the top face, the air that holds the cast
    is closed, holding no more than the cast and what stands in the sprue and vents; both
    print seats (through the start wall and the end wall) are filled line to line with a
    cylinder twice the chord proud of the print, as there."""
    r = end_fed.recipe
    rigid = [manifold(p.mesh) for p in end_fed.parts if p.role != "cast"]
    seats = []
    for sup in end_fed.plan.step.core_supports:
        lo, hi = end_fed.part(sup.part).mesh.bbox_mm()
        seat_r = sup.inlet.socket_diameter_mm / 2.0 + 2.0 * r.mesh.chord_mm
        cy, cz = sup.inlet.center_mm
        x0, x1 = ((r.body_length_mm + 0.05, hi[0]) if sup.pull_dir[0] > 0
                  else (lo[0], -0.05))
        seats.append(m3.Manifold.cylinder(x1 - x0, seat_r, seat_r, 96)
                     .rotate([0.0, 90.0, 0.0]).translate([x0, cy, cz]))
    closed = m3.Manifold.batch_boolean([*rigid, *seats], m3.OpType.Add)
    box = closed.bounding_box()
    lo, hi = np.array(box[:3]) - 10.0, np.array(box[3:]) + 10.0
    air = m3.Manifold.cube(list(hi - lo)).translate(list(lo)) - closed
    w = int(np.argmax(np.abs(end_fed.pour_up)))
    lid_lo = lo.copy()
    lid_lo[w] = box[3 + w] - 0.01
    air = air - m3.Manifold.cube(list(hi - lid_lo)).translate(list(lid_lo))
    cast = manifold(end_fed.part("cast").mesh)
    cavity = max(air.decompose(), key=lambda piece: (piece ^ cast).volume())
    assert (cavity ^ cast).volume() >= 0.995 * cast.volume()
    fill = end_fed.volumes_mm3["fill"]
    assert cavity.volume() <= 1.05 * (cast.volume() + fill) + 1.0
