"""What every overmold build must hold, step by step, checked on both bundled overmold
recipes (the round wound finger and the half-round bender, each built once per session)
with libraries outside the project: every part a closed volume for trimesh and
manifold3d with the volume the kernel measured, no two parts of a step (the skin step
with the bladder and core it is poured around) sharing volume, the cast's surface lying
on a shell, the core or the first pour except under the sprue and vents, and the cavity
reaching the outside only through them.
"""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import built_steps
from meshes import manifold

NAMES = ["seedling-wound-finger", "seedling-bend-wound-finger"]
#: Two parts only touching share less than this (mm3): coincident faces meshed apart.
TOUCH_MM3 = 0.05


@pytest.fixture(scope="module", params=NAMES)
def om(request):
    return built_steps(request.param)



def area_mm2(mesh) -> float:
    t = np.asarray(mesh.vertices)[np.asarray(mesh.faces)]
    return float(np.linalg.norm(np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0]), axis=1).sum()
                 / 2.0)


def around(om, step):
    """The solids a step's cast is poured against: its printed parts, and for the skin the
    bladder and the core it stays on."""
    first = om.steps[0]
    extra = [] if step is first else [first.part("cast"), first.part("core")]
    return [p for p in step.parts if p.role != "cast"] + extra


def test_every_part_of_each_step_is_a_closed_manifold_volume(om):
    for s in om.steps:
        for p in s.parts:
            tm = p.mesh.to_trimesh()
            assert tm.is_watertight and tm.is_winding_consistent and tm.is_volume, p.name
            solid = manifold(p.mesh)
            assert solid.status() == m3.Error.NoError, (s.name, p.name)
            # Every facet lies within the chord of the surface it stands for, so the two
            # volumes differ by at most chord x area, and by the project's mesh rule by at
            # most 0.5 % (a thin segment core's curved face loses 0.22 %).
            bound = min(om.recipe.mesh.chord_mm * area_mm2(p.mesh),
                        0.005 * p.brep_volume_mm3)
            assert solid.volume() == pytest.approx(p.brep_volume_mm3, abs=bound), \
                (s.name, p.name)


def test_no_two_parts_of_a_step_share_volume(om):
    # Parts that touch are meshed apart, each within the chord c of the surface they
    # share: two such meshes of one surface of area A overlap by at most c x A, slivers
    # that vanish once a part moves off (see the release tests). A is bounded by the
    # smaller part's whole surface; parts that truly interpenetrate share far more.
    chord = om.recipe.mesh.chord_mm
    for s in om.steps:
        meshes = [p.mesh for p in (*around(om, s), s.part("cast"))]
        solids = [manifold(m) for m in meshes]
        for i in range(len(solids)):
            for j in range(i + 1, len(solids)):
                limit = chord * min(area_mm2(meshes[i]), area_mm2(meshes[j]))
                shared = (solids[i] ^ solids[j]).volume()
                assert shared < max(TOUCH_MM3, limit), (s.name, i, j, shared, limit)


def mouths(step, pts: np.ndarray) -> np.ndarray:
    """Which points lie under a sprue or vent of ``step`` (within its radius + 0.1 mm of
    its axis, no more than 1 mm below the lowest point of the ceiling it is cut from)."""
    out = np.zeros(len(pts), dtype=bool)
    for o in step.openings:
        d = pts - np.asarray(o.center_mm)
        out |= (np.hypot(d[:, 0], d[:, 1]) <= o.radius_mm + 0.1) & (pts[:, 2] > foot(o) - 1.0)
    return out


def foot(o) -> float:
    """The lowest point of the cavity's ceiling an opening is cut from (mm, z)."""
    return float(o.center_mm[2] if o.floor_mm is None else o.floor_mm)


def test_each_cast_lies_on_a_mold_a_core_or_the_first_pour_but_under_its_openings(
        om):
    """Sampled points of each cast's surface lie within 0.05 mm of a surface it was poured
    against (trimesh proximity): at least 99.5 % of those away from the sprue and vent
    mouths, which take at most 5 % of the surface."""
    for s in om.steps:
        cast = s.part("cast").mesh.to_trimesh()
        tools = trimesh.util.concatenate([p.mesh.to_trimesh() for p in around(om, s)])
        pts, _ = trimesh.sample.sample_surface_even(cast, 3000, seed=7)
        _, dist, _ = trimesh.proximity.closest_point(tools, pts)
        mouth = mouths(s, pts)
        assert np.mean(dist[~mouth] <= 0.05) >= 0.995, s.name
        assert np.mean(mouth) <= 0.05, s.name


AXES = ((1, 0, 0), (-1, 0, 0), (0, 1, 0), (0, -1, 0), (0, 0, 1), (0, 0, -1))


def grown(solid: m3.Manifold, by_mm: float) -> m3.Manifold:
    """``solid`` united with its copies moved ``by_mm`` along each axis both ways: a crude
    dilation, enough to close the films two facetings of one surface leave between them
    (under mesh.chord_mm thick, so closed by any move over chord / cos 45 deg)."""
    return m3.Manifold.batch_boolean(
        [solid, *(solid.translate(tuple(by_mm * e for e in a)) for a in AXES)],
        m3.OpType.Add)


def test_each_cavity_reaches_the_outside_only_through_its_top_openings(om):
    """The mold block less every solid in it (shells, core, first pour, each grown by
    0.1 mm to close the films between facetings) and less the cast leaves pieces of air:
    every piece that touches the cast (the cast grown by 0.2 mm meets it) lies in the
    sprue and vent bores above it and runs out of the top face."""
    for s in om.steps:
        o = s.overmold
        block = m3.Manifold.cube(tuple(b - a for a, b in zip(o.block_lo, o.block_hi))
                                 ).translate(o.block_lo)
        cast = manifold(s.part("cast").mesh)
        air = block - m3.Manifold.batch_boolean(
            [grown(manifold(p.mesh), 0.1) for p in around(om, s)] + [cast], m3.OpType.Add)
        near = grown(cast, 0.2)
        top = o.block_hi[2]
        bores = m3.Manifold.batch_boolean(
            [m3.Manifold.cylinder(top - foot(op) + 2.0, op.radius_mm + 0.1,
                                  op.radius_mm + 0.1, 64).translate(
                (op.center_mm[0], op.center_mm[1], foot(op) - 1.0))
             for op in s.openings], m3.OpType.Add)
        touching = [piece for piece in air.decompose()
                    if (piece ^ near).volume() > TOUCH_MM3]
        # Every opening is air that touches the cast, and nothing else is.
        assert len(touching) == len(s.openings), s.name
        for piece in touching:
            assert (piece - bores).volume() < TOUCH_MM3, (s.name, piece.volume(),
                                                          piece.bounding_box())
            assert piece.bounding_box()[5] == pytest.approx(top, abs=1e-3), s.name
