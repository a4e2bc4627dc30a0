"""Sprue, vents, core seat and key, pry notches: probed on the meshes with rays
(trimesh ray casting, an independent reader of the same triangles)."""

from __future__ import annotations

import numpy as np
import pytest

from soft_molds.analysis.highpoints import find_high_points, unserved

NAMES = ["seedling-finger", "tray-pusher", "stem-cushion", "wrist-twister", "soil-tamper"]


def _ray(mesh, origin, direction) -> np.ndarray:
    """Hit points of one ray, nearest first."""
    tm = mesh.to_trimesh()
    locs, _, _ = tm.ray.intersects_location(np.array([origin], float),
                                            np.array([direction], float))
    if len(locs) == 0:
        return locs
    return locs[np.argsort(np.linalg.norm(locs - np.asarray(origin), axis=1))]


def _up(molds) -> np.ndarray:
    u = np.zeros(3)
    u[molds.layout.frame.w_axis] = 1.0
    return u


@pytest.mark.parametrize("name", NAMES)
def test_every_high_point_of_the_cavity_is_reached_by_the_sprue_or_a_vent(name, bundled):
    molds = bundled(name)
    cast = molds.part("cast").mesh
    up = _up(molds)
    assert len(find_high_points(cast, up)) >= 1
    assert unserved(cast, up, molds.openings) == ()
    assert [o.kind for o in molds.openings].count("sprue") == 1


@pytest.mark.parametrize("name", NAMES)
def test_sprue_and_vents_open_from_the_top_face_into_the_cavity(name, bundled):
    """A ray down an opening's axis passes through no shell material and first meets the
    cast part at the opening's cavity end (within the 0.3 mm cut overlap)."""
    molds = bundled(name)
    up = _up(molds)
    for o in molds.openings:
        start = np.asarray(o.center_mm) + up * 100.0
        assert len(_ray(molds.part("shell-upper").mesh, start, -up)) == 0, o
        hits = _ray(molds.part("cast").mesh, start, -up)
        assert abs((hits[0] - np.asarray(o.center_mm)) @ up) <= 0.3, o


def test_core_print_is_seated_in_both_halves_with_a_square_key(finger):
    r, lay = finger.recipe, finger.layout
    cy, cz = r.inlet.center_mm
    rs = r.inlet.socket_diameter_mm / 2.0
    up = _up(finger)
    x_wall = lay.block_lo[0]
    # In the block wall, between the key and the cavity, the round print touches the seat
    # line to line: from above, the upper shell's seat surface is at cz + rs.
    x = x_wall * 0.1  # 1.7 mm inside the cavity face for this recipe: past the key land
    hit = _ray(finger.part("core").mesh, (x, cy, 100.0), -up)
    assert hit[0][2] == pytest.approx(cz + rs, abs=0.02)  # chord 0.02 mm
    hit_upper = _ray(finger.part("shell-upper").mesh, (x, cy, cz + 0.5 * rs), up)
    assert hit_upper[0][2] == pytest.approx(cz + rs, abs=0.02)
    hit_lower = _ray(finger.part("shell-lower").mesh, (x, cy, cz - 0.5 * rs), -up)
    assert hit_lower[0][2] == pytest.approx(cz - rs, abs=0.02)
    # At the key, a point beside the round print (radius rs < |y - cy| < key half-width)
    # is core: the key is square, so the core cannot turn in its seat.
    klo, khi = finger.plan.step.core_supports[0].key_box
    kx = (klo[0] + khi[0]) / 2
    half = (khi[1] - klo[1]) / 2
    y = cy + (rs + half) / 2
    top = _ray(finger.part("core").mesh, (kx, y, 100.0), -up)
    assert top[0][2] == pytest.approx(cz + half, abs=1e-3)
    # The shells' key pocket is larger by the fit clearance on every side.
    c = r.mold.clearance_mm
    pocket_roof = _ray(finger.part("shell-upper").mesh, (kx, y, cz + 0.1), up)
    assert pocket_roof[0][2] == pytest.approx(cz + half + c, abs=1e-3)


def test_pry_notches_open_the_parting_line_at_the_far_end_and_side(finger):
    lay, r = finger.layout, finger.recipe
    v_mid = (lay.block_lo[1] + lay.block_hi[1]) / 2
    u_side = lay.notches[1][0]
    for part, dz in (("shell-lower", -0.5), ("shell-upper", 0.5)):
        side = _ray(finger.part(part).mesh, (u_side, lay.block_hi[1] + 10,
                                             r.parting.offset_mm + dz), (0, -1, 0))
        assert side[0][1] == pytest.approx(lay.block_hi[1] - 3.0, abs=1e-3), part
        hit = _ray(finger.part(part).mesh, (lay.block_hi[0] + 10, v_mid,
                                            r.parting.offset_mm + dz), (-1, 0, 0))
        # Notch 3 mm deep, 1.5 mm either side of the parting plane (layout).
        assert hit[0][0] == pytest.approx(lay.block_hi[0] - 3.0, abs=1e-3), part
        solid = _ray(finger.part(part).mesh, (lay.block_hi[0] + 10, v_mid,
                                              r.parting.offset_mm + 4 * dz), (-1, 0, 0))
        assert solid[0][0] == pytest.approx(lay.block_hi[0], abs=1e-3), part
