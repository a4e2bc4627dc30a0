"""The magnet pockets of a core held by a disc magnet pair, measured on the built meshes
of the dissolved tray-lift pad (``core.support: magnets``, 2 x 1 mm discs, -0.1 mm press
fit; built once per session).

References: a least-squares circle fit (the algebraic fit of Kasa, 1976: x^2 + y^2 + D x
+ E y + F = 0 solved as a linear system with numpy) to the mesh vertices on each pocket's
wall gives its axis and diameter, independent of how the build placed them; rays cast
with trimesh measure the plastic round the pocket; trimesh and manifold3d judge the parts
closed and apart. A pocket diameter of magnet diameter + press fit (negative: a press fit,
about -0.1 mm on a printed hole) is common practice.
"""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import pytest
from conftest import built_variant
from meshes import manifold

from soft_molds.plan.magnets import (
    POCKET_DEPTH_CLEARANCE_MM,
    core_pocket_walls_mm,
    magnet_pockets,
    print_wall_mm,
)

NAME = "tray-lift-pad"


@pytest.fixture(scope="module")
def pad():
    molds = built_variant(NAME, "A")
    step = molds.plan.step
    (sup,) = step.core_supports
    pockets = magnet_pockets(molds.recipe, sup, step.settled_parting)
    assert pockets is not None
    return molds, sup, pockets


def circle_fit(pts: np.ndarray) -> tuple[np.ndarray, float]:
    """Centre and radius of the least-squares circle through 2-D points (Kasa)."""
    a = np.column_stack([pts[:, 0], pts[:, 1], np.ones(len(pts))])
    b = -(pts[:, 0] ** 2 + pts[:, 1] ** 2)
    (d, e, f), *_ = np.linalg.lstsq(a, b, rcond=None)
    centre = np.array([-d / 2.0, -e / 2.0])
    return centre, float(np.sqrt(centre @ centre - f))


def wall_vertices(mesh, pockets, w_lo: float, w_hi: float) -> np.ndarray:
    """Across-axis coordinates of the vertices on a pocket's round wall: within 0.1 mm of
    its planned radius from its planned axis, strictly between its planned ends."""
    v = np.asarray(mesh.vertices)
    a = pockets.axis
    across = [k for k in range(3) if k != a]
    rel = v[:, across] - np.asarray(pockets.centre_mm)[across]
    r = np.linalg.norm(rel, axis=1)
    keep = (np.abs(r - pockets.radius_mm) < 0.1) & (v[:, a] > w_lo - 1e-6) \
        & (v[:, a] < w_hi + 1e-6)
    return v[keep][:, across]


def test_the_planned_pockets_are_the_magnet_plus_its_fit_and_clearance(pad):
    molds, _, pockets = pad
    c = molds.recipe.core
    assert (c.magnet_diameter_mm, c.magnet_thickness_mm, c.press_fit_mm) == (2.0, 1.0, -0.1)
    assert pockets.diameter_mm == pytest.approx(1.9)
    assert pockets.depth_mm == pytest.approx(1.0 + POCKET_DEPTH_CLEARANCE_MM)
    # The seat's floor lies one fit clearance below the key's underside.
    assert pockets.core_face_mm - pockets.seat_face_mm == pytest.approx(
        molds.recipe.mold.clearance_mm)


def test_both_pockets_measure_magnet_diameter_plus_press_fit_and_are_coaxial(pad):
    molds, _, pockets = pad
    d = pockets.depth_mm
    core = wall_vertices(molds.part("core").mesh, pockets, pockets.core_face_mm,
                         pockets.core_face_mm + d)
    seat = wall_vertices(molds.part("shell-lower").mesh, pockets, pockets.seat_face_mm - d,
                         pockets.seat_face_mm)
    assert len(core) >= 16 and len(seat) >= 16
    (cc, rc), (cs, rs) = circle_fit(core), circle_fit(seat)
    want = molds.recipe.core.magnet_diameter_mm + molds.recipe.core.press_fit_mm
    assert 2.0 * rc == pytest.approx(want, abs=0.02)
    assert 2.0 * rs == pytest.approx(want, abs=0.02)
    assert float(np.linalg.norm(cc - cs)) <= 0.05
    # The pockets' walls run the whole depth: vertices at both ends of each.
    a = pockets.axis
    v = np.asarray(molds.part("core").mesh.vertices)
    on = v[np.abs(np.linalg.norm(v[:, [k for k in range(3) if k != a]]
                                 - cc, axis=1) - rc) < 0.02]
    assert on[:, a].max() == pytest.approx(pockets.core_face_mm + d, abs=1e-3)


def _hits(mesh, origin, direction) -> np.ndarray:
    """Distances along ``direction`` from ``origin`` to every crossing of the surface."""
    tm = mesh.to_trimesh()
    locs, _, _ = tm.ray.intersects_location([origin], [direction])
    return np.sort(np.linalg.norm(locs - np.asarray(origin), axis=1))


def test_the_plastic_round_the_core_pocket_is_at_least_a_printed_wall(pad):
    molds, sup, pockets = pad
    a = pockets.axis
    mid = np.asarray(pockets.centre_mm, dtype=float)
    mid[a] = pockets.core_face_mm + pockets.depth_mm / 2.0
    core = molds.part("core").mesh
    walls = []
    for k in (k for k in range(3) if k != a):
        for sign in (-1.0, 1.0):
            direction = np.zeros(3)
            direction[k] = sign
            hits = _hits(core, mid, direction)
            # The pocket's wall, then the key's outer face: the plastic between them.
            assert hits[0] == pytest.approx(pockets.radius_mm, abs=0.02)
            walls.append(hits[1] - hits[0])
    up = np.zeros(3)
    up[a] = 1.0
    start = np.asarray(pockets.centre_mm, dtype=float)
    start[a] -= 0.05  # just below the key, in the seat's gap
    floor = _hits(core, start, up)
    # Through the open mouth to the pocket's floor, then on to the key's top face.
    assert floor[0] == pytest.approx(0.05 + pockets.depth_mm, abs=0.01)
    walls.append(floor[1] - floor[0])
    measured = min(walls)
    assert measured >= print_wall_mm(molds.recipe) - 0.02
    assert measured == pytest.approx(core_pocket_walls_mm(sup, pockets), abs=0.02)
    assert measured == pytest.approx((6.0 - 1.9) / 2.0, abs=0.02)  # the 6 mm key, 2.05 mm


def test_the_pockets_are_in_the_rigid_parts_and_none_reaches_the_cast(pad):
    molds, _, pockets = pad
    a = pockets.axis
    pts = []
    for w in (pockets.core_face_mm + 0.5, pockets.seat_face_mm - 0.5):
        p = np.asarray(pockets.centre_mm, dtype=float)
        p[a] = w
        pts.append(p)
    for name in ("cast", "core", "shell-lower", "shell-upper"):
        inside = molds.part(name).mesh.to_trimesh().contains(np.array(pts))
        assert not inside.any(), name



def test_the_pocketed_parts_are_closed_and_apart(pad):
    molds, _, pockets = pad
    core, lower = manifold(molds.part("core").mesh), manifold(molds.part("shell-lower").mesh)
    for name, mf in (("core", core), ("shell-lower", lower)):
        assert mf.status() == m3.Error.NoError, name
        tm = molds.part(name).mesh.to_trimesh()
        assert tm.is_watertight and tm.is_volume, name
        # Each lost exactly its pocket: the exact (BRep) volume against manifold3d's.
        assert mf.volume() == pytest.approx(molds.part(name).brep_volume_mm3, rel=0.005)
    # Apart: the faceted round print against its faceted seat overlaps by chord error
    # only (the general bound, 0.05 % of the smaller part), and round the pockets not at
    # all (the key's flat underside sits a fit clearance above the seat's floor).
    both = core ^ lower
    assert both.volume() < 5e-4 * min(core.volume(), lower.volume())
    a, c, r = pockets.axis, np.asarray(pockets.centre_mm), pockets.radius_mm + 0.5
    lo, hi = c - r, c + r
    lo[a], hi[a] = pockets.seat_face_mm - pockets.depth_mm - 0.5, \
        pockets.core_face_mm + pockets.depth_mm + 0.5
    around = m3.Manifold.cube(list(hi - lo)).translate(list(lo))
    assert (both ^ around).volume() < 1e-6
