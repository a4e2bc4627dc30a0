"""The melted-core build of each bundled melted-core recipe (the wax tray-lift pad, the
wax stem ring cuff whose core is a closed ring channel), step by step, checked with
independent libraries on the meshes (manifold3d booleans and connected components, trimesh
proximity), as every one-shot mold set is (tests/geometry/test_mold.py,
test_mold_release.py):

- each step: every part closed and of its exact volume, no two parts sharing volume, the
  cast's surface on a mold surface or under an opening (99.5 %), each shell pulled along
  its pull cuts no rigid part, the cavity reaches the outside only through the top;
- the core mold's cavity is the core: outside the opening columns (the same cylinders
  taken from both) the closed cavity and the core agree to 0.1 %;
- the core mold casts the silicone step's core: the same solid.

Each recipe is built once per session (conftest.built_steps).
"""

from __future__ import annotations

import itertools

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import MELTED, built_steps
from meshes import manifold

#: As in test_mold_release.py: overlap of parts touching face to face (per mm3 of the
#: smaller), and how far the air reaches beyond the closed mold (mm).
TOUCH_FRACTION = 5e-4
MARGIN_MM = 10.0


@pytest.fixture(scope="module", params=MELTED)
def melted(request):
    return built_steps(request.param)



def test_the_recipe_is_built_in_two_named_steps(melted):
    assert [s.folder for s in melted.steps] == ["step-1-core-mold", "step-2-silicone"]
    assert [p.name for p in melted.steps[0].parts] == ["shell-lower", "shell-upper", "cast"]
    assert [p.name for p in melted.steps[1].parts] == ["shell-lower", "shell-upper", "core",
                                                       "cast"]


def test_every_part_of_each_step_is_a_closed_volume_of_its_exact_volume(melted):
    for s in melted.steps:
        for part in s.parts:
            tm = part.mesh.to_trimesh()
            assert tm.is_watertight and tm.is_winding_consistent and tm.is_volume, part.name
            mf = manifold(part.mesh)
            assert mf.status() == m3.Error.NoError
            # manifold3d's own volume of the same triangles against the BRep's.
            assert mf.volume() == pytest.approx(part.brep_volume_mm3, rel=0.005), part.name


def test_no_two_parts_of_a_step_share_volume(melted):
    for s in melted.steps:
        solids = {p.name: manifold(p.mesh) for p in s.parts}
        for a, b in itertools.combinations(solids, 2):
            inter = (solids[a] ^ solids[b]).volume()
            assert inter < 5e-4 * min(solids[a].volume(), solids[b].volume()), (s.name, a, b)


def test_each_cast_lies_on_its_mold_or_under_an_opening(melted):
    """Sampled points of each step's cast (the core in step 1) lie within 0.05 mm of a
    printed part's surface (trimesh proximity), at least 99.5 % of those away from the
    sprue and vent mouths, which take at most 3 % of the surface."""
    w = melted.silicone.layout.frame.w_axis
    for s in melted.steps:
        cast = s.part("cast").mesh.to_trimesh()
        tools = trimesh.util.concatenate([p.mesh.to_trimesh() for p in s.parts
                                          if p.role != "cast"])
        pts, _ = trimesh.sample.sample_surface_even(cast, 3000, seed=7)
        _, dist, _ = trimesh.proximity.closest_point(tools, pts)
        mouth = np.zeros(len(pts), dtype=bool)
        for o in s.openings:
            d = pts - np.asarray(o.center_mm)
            radial = np.linalg.norm(np.delete(d, w, axis=1), axis=1)
            mouth |= (radial <= o.radius_mm + 0.1) & (d[:, w] > -1.0)
        on = dist <= 0.05
        assert np.mean(on[~mouth]) >= 0.995, (s.name, np.mean(on[~mouth]))
        assert np.mean(mouth) <= 0.03, s.name


def test_each_shell_pulled_along_its_pull_cuts_no_rigid_part(melted):
    for s in melted.steps:
        rigid = {p.name: manifold(p.mesh) for p in s.parts if p.role != "cast"}
        for part in s.parts:
            if part.role != "shell":
                continue
            pull = np.asarray(part.pull_dir, dtype=np.float64)
            lo, hi = (np.asarray(c) for c in part.mesh.bbox_mm())
            height = float(abs((hi - lo) @ pull))
            for d in (0.05, 0.2, 1.0, 3.0, height / 2.0, height):
                moved = rigid[part.name].translate(list(pull * d))
                for other, solid in rigid.items():
                    if other != part.name:
                        limit = TOUCH_FRACTION * min(solid.volume(), moved.volume())
                        assert (moved ^ solid).volume() <= limit, (s.name, part.name, other)


def _air(step, up: int, lid: bool, seats: list[m3.Manifold] = ()) -> list[m3.Manifold]:
    """The connected pieces of air around a step's closed mold (its printed parts and the
    ``seats`` filling the chord-sized gap where a core print meets its seat), optionally
    under a lid on its top face."""
    closed = m3.Manifold.batch_boolean([manifold(p.mesh) for p in step.parts
                                        if p.role != "cast"] + list(seats), m3.OpType.Add)
    box = closed.bounding_box()
    lo, hi = np.array(box[:3]) - MARGIN_MM, np.array(box[3:]) + MARGIN_MM
    air = m3.Manifold.cube(list(hi - lo)).translate(list(lo)) - closed
    if lid:
        lid_lo = lo.copy()
        lid_lo[up] = box[3 + up] - 0.01
        air = air - m3.Manifold.cube(list(hi - lid_lo)).translate(list(lid_lo))
    return air.decompose()


def _print_seats(molds) -> list[m3.Manifold]:
    """A cylinder twice the chord proud of each core print, through the block's inlet
    wall only (x < 0), as test_mold_release.py fills that designed line-to-line contact."""
    r = molds.recipe
    out = []
    for sup in molds.plan.step.core_supports:
        lo, _ = molds.part(sup.part).mesh.bbox_mm()
        seat_r = sup.inlet.socket_diameter_mm / 2.0 + 2.0 * r.mesh.chord_mm
        cy, cz = sup.inlet.center_mm
        out.append(m3.Manifold.cylinder(-0.05 - lo[0], seat_r, seat_r, 96)
                   .rotate([0.0, 90.0, 0.0]).translate([lo[0], cy, cz]))
    return out


def _holding_piece(pieces: list[m3.Manifold], cast: m3.Manifold) -> m3.Manifold:
    return max(pieces, key=lambda piece: (piece ^ cast).volume())


def test_each_cavity_reaches_the_outside_only_through_the_top(melted):
    first, second = melted.steps
    up = melted.silicone.layout.frame.w_axis
    seats = _print_seats(second.molds)
    for s, fill, extra in ((first, first.fill_mm3, []),
                           (second, second.molds.volumes_mm3["fill"], seats)):
        cast = manifold(s.part("cast").mesh)
        cavity = _holding_piece(_air(s, up, True, extra), cast)
        # Closed under the lid: the whole cast and, beyond it, only what stands in the
        # sprue, funnel and vents.
        assert (cavity ^ cast).volume() >= 0.995 * cast.volume(), s.name
        assert cavity.volume() <= 1.05 * (cast.volume() + fill) + 1.0, s.name
        # Without it, open to the air above (it can be poured).
        open_cavity = _holding_piece(_air(s, up, False, extra), cast)
        assert open_cavity.volume() > 3.0 * cast.volume(), s.name


def test_the_core_mold_cavity_is_the_core_to_a_thousandth(melted):
    """Take from the closed cavity and from the core the same columns over every sprue
    and vent (the funnel's radius at most, from a mm below the mouth's floor up through the
    lid): what is left of the two must agree to 0.1 % (manifold3d volumes)."""
    first = melted.steps[0]
    r = melted.recipe
    up = melted.silicone.layout.frame.w_axis
    core = manifold(first.part("cast").mesh)
    cavity = _holding_piece(_air(first, up, lid=True), core)
    top = float(manifold(first.part("shell-upper").mesh).bounding_box()[3 + up])
    columns = []
    for o in first.openings:
        radius = (r.mold.funnel_diameter_mm / 2.0 if str(o.kind) == "sprue"
                  else o.radius_mm + 0.2)
        floor = (o.floor_mm if o.floor_mm is not None else o.center_mm[up]) - 1.0
        c = m3.Manifold.cylinder(top + 5.0 - floor, radius, radius, 64)
        if up == 1:
            c = c.rotate([-90.0, 0.0, 0.0])
        at = list(o.center_mm)
        at[up] = floor
        columns.append(c.translate(at))
    cols = m3.Manifold.batch_boolean(columns, m3.OpType.Add)
    rest_cavity, rest_core = (cavity - cols).volume(), (core - cols).volume()
    assert rest_core >= 0.9 * core.volume()  # the columns take little of the core
    assert rest_cavity == pytest.approx(rest_core, rel=1e-3)
    assert (core - cavity).volume() <= 1e-3 * core.volume()


def test_the_core_mold_casts_the_silicone_steps_core(melted):
    first, second = melted.steps
    cast, core = first.part("cast"), second.part("core")
    assert cast.brep_volume_mm3 == core.brep_volume_mm3
    assert np.array_equal(cast.mesh.vertices, core.mesh.vertices)
    assert melted.core_volume_mm3 == pytest.approx(manifold(core.mesh).volume(), rel=5e-3)


def test_the_planned_core_box_is_the_built_cores_box(melted):
    """The plan lays the core mold around the core's box from numbers (voids, print, key,
    grip tab); the built core's mesh (vertices on the surface, so inside the true box by at
    most a chord) fills it."""
    from soft_molds.plan.processes.melted_core import core_bounds

    step = melted.silicone.plan.step
    lo, hi = core_bounds(melted.recipe, step, step.settled_parting)
    mlo, mhi = melted.steps[0].part("cast").mesh.bbox_mm()
    chord = melted.recipe.mesh.chord_mm
    assert np.all(np.asarray(mlo) >= np.asarray(lo) - 1e-6)
    assert np.all(np.asarray(mhi) <= np.asarray(hi) + 1e-6)
    assert np.asarray(mlo) == pytest.approx(np.asarray(lo), abs=chord)
    assert np.asarray(mhi) == pytest.approx(np.asarray(hi), abs=chord)
    assert melted.plan.steps[0].layout.body_lo == pytest.approx(lo)
