"""The mold set as a whole, checked with independent libraries (manifold3d and trimesh
read the same meshes with their own code) and with closed-form geometry."""

from __future__ import annotations

import itertools
import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import BUNDLED, built_variant, bundled_variants
from meshes import manifold

from soft_molds.plan.layout import key_symmetry_clashes
from soft_molds.recipe.model import ISO273_MEDIUM_MM

NAMES = BUNDLED
#: Every variant of every bundled recipe, for the properties every mold set must have.
VARIANTS = bundled_variants()
VARIANT_IDS = [f"{stem}-{label}" for stem, label in VARIANTS]



@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_every_part_is_a_closed_volume_for_trimesh_and_manifold3d(stem, label):
    for part in built_variant(stem, label).parts:
        tm = part.mesh.to_trimesh()
        assert tm.is_watertight and tm.is_winding_consistent and tm.is_volume, part.name
        mf = manifold(part.mesh)
        assert mf.status() == m3.Error.NoError, (part.name, mf.status())
        # manifold3d computes the volume with its own code from the same triangles.
        assert mf.volume() == pytest.approx(part.brep_volume_mm3, rel=0.005), part.name
        assert mf.genus() >= 0


@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_no_two_parts_interpenetrate(stem, label):
    """Shells, core and cast touch but never overlap: any intersection (manifold3d boolean)
    stays below 0.05 % of the smaller part."""
    parts = built_variant(stem, label).parts
    solids = {p.name: manifold(p.mesh) for p in parts}
    for a, b in itertools.combinations(solids, 2):
        inter = (solids[a] ^ solids[b]).volume()
        smaller = min(solids[a].volume(), solids[b].volume())
        assert inter < 5e-4 * smaller, (a, b, inter)


@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_cast_surface_lies_on_mold_or_core_surfaces(stem, label):
    """Sampled points of the silicone part's surface lie within 0.05 mm of a shell or core
    surface (trimesh proximity): at least 99.5 % of those away from the sprue and vent
    mouths (open on purpose), which themselves take at most 2 % of the surface."""
    molds = built_variant(stem, label)
    cast = molds.part("cast").mesh.to_trimesh()
    tools = trimesh.util.concatenate([p.mesh.to_trimesh() for p in molds.parts
                                      if p.role != "cast"])
    pts, _ = trimesh.sample.sample_surface_even(cast, 3000, seed=7)
    _, dist, _ = trimesh.proximity.closest_point(tools, pts)
    on = dist <= 0.05
    w = molds.layout.frame.w_axis
    mouth = np.zeros(len(pts), dtype=bool)
    for o in molds.openings:
        c = np.asarray(o.center_mm)
        d = pts - c
        radial = np.linalg.norm(np.delete(d, w, axis=1), axis=1)
        mouth |= (radial <= o.radius_mm + 0.1) & (d[:, w] > -1.0)
    assert np.mean(on[~mouth]) >= 0.995, np.mean(on[~mouth])
    assert np.mean(mouth) <= 0.02


def _rays_down(mesh, xy: np.ndarray, top: float, w: int) -> np.ndarray:
    """Height of the first surface hit by rays cast along -w at in-plane points ``xy``."""
    tm = mesh.to_trimesh()
    v = 1 if w == 2 else 2
    origins = np.zeros((len(xy), 3))
    origins[:, 0], origins[:, v], origins[:, w] = xy[:, 0], xy[:, 1], top
    direction = np.zeros(3)
    direction[w] = -1.0
    locs, idx, _ = tm.ray.intersects_location(origins, np.tile(direction, (len(xy), 1)),
                                              multiple_hits=False)
    out = np.full(len(xy), np.nan)
    out[idx] = locs[:, w]
    return out


@pytest.mark.parametrize("name", NAMES)
def test_registration_keys_close_one_way_only(name, bundled):
    molds = bundled(name)
    lay = molds.layout
    assert len(lay.keys_uv) >= 3
    # No half turn or mirror of the rectangle maps the key pattern onto itself
    # (elementary geometry of the rectangle's symmetry group).
    assert key_symmetry_clashes(lay.keys_uv, lay.block_center_uv) == []


def test_keys_are_pegs_on_the_lower_half_and_sockets_with_clearance_above(finger):
    r = finger.recipe
    lay = finger.layout
    w, h, c = lay.frame.w_axis, r.mold.key_height_mm, r.mold.clearance_mm
    keys = np.array(lay.keys_uv)
    top_lower = _rays_down(finger.part("shell-lower").mesh, keys, 100.0, w)
    assert top_lower == pytest.approx(r.parting.offset_mm + h, abs=1e-3)
    # From below, a ray into the upper half meets the socket's floor at h + c above the
    # parting plane.
    up = keys.copy()
    tm = finger.part("shell-upper").mesh.to_trimesh()
    origins = np.zeros((len(up), 3))
    origins[:, 0], origins[:, lay.frame.v_axis], origins[:, w] = up[:, 0], up[:, 1], -100
    d = np.zeros(3)
    d[w] = 1.0
    locs, idx, _ = tm.ray.intersects_location(origins, np.tile(d, (len(up), 1)),
                                              multiple_hits=False)
    assert np.sort(locs[:, w]) == pytest.approx(r.parting.offset_mm + h + c, abs=1e-3)
    # Socket radius exceeds the peg radius by the clearance: probe just outside the peg
    # base radius, where the upper half must still be open at the parting plane.
    rk = r.mold.key_diameter_mm / 2.0
    probe = keys + np.array([rk + c / 2.0, 0.0])
    o = np.zeros((len(probe), 3))
    o[:, 0], o[:, lay.frame.v_axis], o[:, w] = probe[:, 0], probe[:, 1], -100
    locs, idx, _ = tm.ray.intersects_location(o, np.tile(d, (len(probe), 1)),
                                              multiple_hits=False)
    assert np.all(locs[:, w] > r.parting.offset_mm + 0.5)


def test_iso_273_medium_clearance_holes():
    # ISO 273, medium series: M3 3.4, M4 4.5, M5 5.5 mm.
    assert ISO273_MEDIUM_MM == {"M3": 3.4, "M4": 4.5, "M5": 5.5}


@pytest.mark.parametrize("name", NAMES)
def test_clamp_holes_pass_through_both_halves_at_the_iso_273_size(name, bundled):
    """Rays along the parting axis pass clean through both halves at every bolt position
    anywhere inside radius d/2 - 0.05 mm (d = ISO 273 medium clearance; 0.05 mm covers the
    0.02 mm chord of the inscribed tessellation) and hit material at d/2 + 0.1 mm."""
    molds = bundled(name)
    r, lay = molds.recipe, molds.layout
    d = r.mold.clamp_hole_mm
    assert d == ISO273_MEDIUM_MM[r.mold.clamp_bolt]
    w, v = lay.frame.w_axis, lay.frame.v_axis
    angles = np.linspace(0.0, 2 * np.pi, 8, endpoint=False)
    ring = np.stack([np.cos(angles), np.sin(angles)], axis=1)
    for part in ("shell-lower", "shell-upper"):
        tm = molds.part(part).mesh.to_trimesh()
        for radius, hits_expected in ((d / 2 - 0.05, False), (0.0, False), (d / 2 + 0.1, True)):
            pts = np.concatenate([np.asarray(b) + radius * ring for b in lay.bolts_uv])
            o = np.zeros((len(pts), 3))
            o[:, 0], o[:, v], o[:, w] = pts[:, 0], pts[:, 1], 1000.0
            dirs = np.zeros_like(o)
            dirs[:, w] = -1.0
            hit = tm.ray.intersects_any(o, dirs)
            assert bool(hit.all() if hits_expected else not hit.any()), (part, radius)


def test_pull_directions_are_opposite_unit_vectors_for_the_shells(finger):
    lo = np.array(finger.part("shell-lower").pull_dir)
    hi = np.array(finger.part("shell-upper").pull_dir)
    assert np.linalg.norm(lo) == pytest.approx(1.0) and np.dot(lo, hi) == pytest.approx(-1.0)
    assert finger.part("core").pull_dir == (-1.0, 0.0, 0.0)


@pytest.mark.parametrize("name", ["seedling-finger", "soil-tamper"])
def test_upper_half_turned_round_collides_with_the_keys(name, bundled):
    """Independent of the layout code: put the upper half on the lower one as designed and
    the two meet without overlap; turn it half round about the parting axis (through the
    block centre) and manifold3d finds the key pegs buried in solid shell."""
    molds = bundled(name)
    lay = molds.layout
    lower = manifold(molds.part("shell-lower").mesh)
    upper = manifold(molds.part("shell-upper").mesh)
    assert (lower ^ upper).volume() < 1e-3
    axis = [0.0, 0.0, 0.0]
    axis[lay.frame.w_axis] = 1.0
    cu, cv = lay.block_center_uv
    centre = lay.frame.world(cu, cv, 0.0)
    turned = (upper.translate([-c for c in centre]).rotate([180.0 * a for a in axis])
              .translate(list(centre)))
    r = molds.recipe.mold
    peg = math.pi * r.key_height_mm / 3 * (1 + 0.7 + 0.49) * r.key_diameter_mm ** 2 / 4
    # At least one whole peg (Euclid's frustum volume, radii 1 and 0.7 of the base) buried.
    assert (lower ^ turned).volume() > 0.9 * peg
