"""Trapped air on a built mold, checked on a cast with two known high points.

The cast and the mold are built with manifold3d (exact booleans): a 40 x 20 x 10 mm slab with
two 6 x 6 x 4 mm towers, whose flat tops at z = 14 are the only ceilings air can gather
under (elementary geometry). Venting every high spot of the cavity is common practice; a
high point with no vent over it keeps a bubble.
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
from meshes import box, from_manifold

from soft_molds.analysis.trapped_air import AirReport, combine, trapped_air
from soft_molds.meshdata import TriMesh

UP = (0.0, 0.0, 1.0)
TOWER_XY = ((10.0, 10.0), (30.0, 10.0))  # tower centres; tops at z = 10 + 4 = 14
TOP_Z = 14.0


def _cast() -> m3.Manifold:
    slab = box((0, 0, 0), (40, 20, 10))
    for x, y in TOWER_XY:
        slab = slab + box((x - 3, y - 3, 10), (x + 3, y + 3, TOP_Z))
    return slab


def _vent(x: float, y: float) -> m3.Manifold:
    # Radius 1 mm, from just inside the tower top up past the block's top face (z = 24).
    return m3.Manifold.cylinder(13.0, 1.0, circular_segments=32).translate((x, y, TOP_Z - 1.0))


def _air(vented: tuple[int, ...]) -> AirReport:
    cast = _cast()
    mold = box((-10, -10, -5), (50, 30, 24)) - cast
    for i in vented:
        mold = mold - _vent(*TOWER_XY[i])
    return trapped_air(from_manifold(cast), UP, from_manifold(mold))


def _near(p: tuple[float, float, float], xy: tuple[float, float]) -> bool:
    return math.hypot(p[0] - xy[0], p[1] - xy[1]) <= 3.5


def test_only_the_unvented_tower_keeps_a_bubble():
    rep = _air(vented=(0,))
    assert len(rep.high_points) == 2  # elementary geometry: the two tower tops
    assert len(rep.trapped) == 1
    (hp,) = rep.trapped
    assert _near(hp.position_mm, TOWER_XY[1])  # construction: tower 2 at (30, 10)
    assert hp.position_mm[2] == pytest.approx(TOP_Z, abs=0.01)  # construction: 10 + 4
    assert rep.escape_rays[0] > 0   # tower 1: some ray runs up its vent
    assert rep.escape_rays[1] == 0


def test_both_towers_vented_trap_no_air():
    rep = _air(vented=(0, 1))
    assert len(rep.high_points) == 2
    assert rep.trapped == ()
    assert all(n > 0 for n in rep.escape_rays)


def test_no_vent_traps_air_under_both_towers():
    rep = _air(vented=())
    assert len(rep.trapped) == 2
    assert sorted(_near(hp.position_mm, TOWER_XY[0]) for hp in rep.trapped) == [False, True]
    assert all(hp.position_mm[2] == pytest.approx(TOP_Z, abs=0.01) for hp in rep.trapped)


def test_combine_keeps_every_face_and_the_sum_of_volumes():
    a_man = box((0, 0, 0), (1, 2, 3))
    b_man = m3.Manifold.sphere(2.0, circular_segments=64).translate((10.0, 0.0, 0.0))
    a, b = from_manifold(a_man), from_manifold(b_man)
    both: TriMesh = combine([a, b])
    assert len(both.faces) == len(a.faces) + len(b.faces)
    # manifold3d's own volumes as the independent reference (box: 1 x 2 x 3 = 6 mm3).
    assert a_man.volume() == pytest.approx(6.0)
    # manifold3d hands its vertices out as float32, hence the 1e-6 tolerance.
    assert both.volume_mm3() == pytest.approx(a_man.volume() + b_man.volume(), rel=1e-6)
    assert both.volume_mm3() == pytest.approx(a.volume_mm3() + b.volume_mm3(), rel=1e-12)
    # Same triangles, in order: b's indices are shifted past a's vertices.
    assert np.array_equal(both.triangles(), np.concatenate([a.triangles(), b.triangles()]))
