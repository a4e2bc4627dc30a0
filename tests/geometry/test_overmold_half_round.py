"""The half-round overmold (the co-op's thread-wound bender, built once per session),
checked against sources outside the project: the guides on the curved face only, the
bladder and the skin against closed forms and against manifold3d's own solids, one axis
for both steps from circle fits, the skin over the wound bladder and around the sheet
from trimesh's distances, the thread against a closed form and its path's arc length
summed numerically, and how each part releases along its pull.

Closed forms: a half disc of radius R has area pi R^2 / 2; the part of a disc of radius
r above a chord at height h, r^2 acos(h / r) - h sqrt(r^2 - h^2) (circular segment); a
ridge's volume by Pappus' theorem for a screw motion (a section of area A in a plane
through the axis, screwed through angle T, sweeps A rho_c T, rho_c its centroid's
radius); a thread winding round a prism of perimeter P at pitch p, advancing evenly
along the perimeter, is turns x sqrt(P^2 + p^2) long (the prism's side unrolls flat into
a strip, on which it is a straight line: the helix's closed form with pi d replaced by
P), and a D of radius R has P = pi R + 2 R. Circle fit: the algebraic least squares fit
of y^2 + z^2 + D y + E z + F = 0 (Kasa's method).
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
import trimesh
from conftest import built_steps
from meshes import manifold

from soft_molds.plan.processes.overmold import CROSSING_CLEAR_RAD, GUIDE_MARGIN_MM

NAME = "seedling-bend-wound-finger"
#: Agreement of a mesh volume with its closed form (relative): the meshes are within
#: mesh.chord_mm = 0.02 mm of the surfaces, so the round faces lose about chord / radius
#: x 2/3, under 0.2 % for these radii.
MESH_TOL = 0.002
TOUCH_MM3 = 0.05


@pytest.fixture(scope="module")
def om():
    return built_steps(NAME)



def figures(om):
    """(R, r, wall, L, ridge height, ridge width, pitch) of the recipe (mm)."""
    r = om.recipe
    p = r.process
    big, small = r.body.diameter_mm / 2.0, r.voids[0].diameter_mm / 2.0
    return (big, small, big - small, r.body.length_mm, p.guide_height_mm, p.guide_width_mm,
            p.guide_pitch_mm)


def segment_mm2(r: float, h: float) -> float:
    return r * r * math.acos(h / r) - h * math.sqrt(r * r - h * h)


def ridge_span_rad(om) -> float:
    """Helix angle the ridges cover. The curved face (z >= 0) is where cos t >= 0 for
    either hand, half of each turn: 2 x pi x turns over both helices. The helices cross
    where t = k pi; at even k, on the curved face (top), the right-handed one is gapped
    by g = w pi / p + clearance each side (one side only at the start and the last
    crossing, 2 x turns + 1 crossings with a whole number of turns); at odd k they cross
    on the flat face, which has no ridge anyway (g < pi / 2)."""
    *_, length, _, w, pitch = figures(om)
    turns = (length - 2 * GUIDE_MARGIN_MM) / pitch
    assert abs(turns - round(turns)) < 1e-9
    gap = w * math.pi / pitch + CROSSING_CLEAR_RAD
    assert gap < math.pi / 2
    return 2 * math.pi * turns - 2 * gap * turns


def test_the_guide_pieces_lie_on_the_curved_face_only(om):
    bl = om.steps[0].overmold.bladder
    assert bl.half_round and bl.pieces
    for p in bl.pieces:
        ts = np.linspace(p.t0_rad, p.t1_rad, 50)
        # The ridge at helix angle t points along (0, -+sin t, cos t): z >= 0 throughout.
        assert np.cos(ts).min() >= -1e-9, p
    assert sum(p.span_rad for p in bl.pieces) == pytest.approx(ridge_span_rad(om), rel=1e-9)


def test_the_bladder_is_the_d_less_its_segment_core_plus_the_ridges_by_pappus(om):
    big, small, wall, length, h, w, _ = figures(om)
    tube = (math.pi * big ** 2 / 2 - segment_mm2(small, wall)) * length
    ridges = w * h * (big + h / 2.0) * ridge_span_rad(om)
    cast = om.steps[0].part("cast")
    assert cast.brep_volume_mm3 == pytest.approx(tube + ridges, rel=1e-5)
    assert manifold(cast.mesh).volume() == pytest.approx(tube + ridges, rel=MESH_TOL)
    assert ridges > 0.03 * tube  # the ridges are there, and the comparison can tell
    # Nothing of the bladder lies below its flat face.
    assert cast.mesh.vertices[:, 2].min() == pytest.approx(0.0, abs=1e-9)


def d_on_slab(radius: float, depth: float, length: float) -> m3.Manifold:
    """manifold3d's own solid: the half cylinder above z = 0 along +x on a slab of its
    width down to z = -depth."""
    cyl = m3.Manifold.cylinder(length, radius, radius, 512).rotate((0.0, 90.0, 0.0))
    upper = m3.Manifold.cube((length, 2 * radius, radius)).translate((0.0, -radius, 0.0))
    slab = m3.Manifold.cube((length, 2 * radius, depth)).translate((0.0, -radius, -depth))
    return (cyl ^ upper) + slab


def test_the_skin_is_the_step_2_cavity_less_the_bladder_and_core(om):
    first, second = om.steps
    sk = second.overmold
    cavity = d_on_slab(sk.cavity_radius_mm, sk.flat_depth_mm, sk.cavity_end_x_mm)
    rest = cavity - manifold(first.part("cast").mesh) - manifold(first.part("core").mesh)
    skin = second.part("cast")
    assert manifold(skin.mesh).volume() == pytest.approx(rest.volume(), rel=MESH_TOL)
    big, small, wall, length, h, w, _ = figures(om)
    rs, d = sk.cavity_radius_mm, sk.flat_depth_mm
    closed = ((math.pi * rs ** 2 / 2 + 2 * rs * d) * sk.cavity_end_x_mm
              - math.pi * big ** 2 / 2 * length - w * h * (big + h / 2) * ridge_span_rad(om)
              - segment_mm2(small, wall) * (sk.core.end_x_mm - length))
    assert skin.brep_volume_mm3 == pytest.approx(closed, rel=1e-5)


def circle_centre(points_yz: np.ndarray) -> np.ndarray:
    """Kasa's algebraic circle fit: the centre (y, z)."""
    y, z = points_yz[:, 0], points_yz[:, 1]
    a = np.column_stack([y, z, np.ones_like(y)])
    d, e, _ = np.linalg.lstsq(a, -(y * y + z * z), rcond=None)[0]
    return np.array([-d / 2.0, -e / 2.0])


def test_the_bladder_and_the_skin_mold_share_one_axis(om):
    first, second = om.steps
    _, small, wall, *_ = figures(om)
    v = first.part("cast").mesh.vertices
    on = (np.abs(np.hypot(v[:, 1], v[:, 2]) - small) < 0.05) & (v[:, 2] > wall + 0.1)
    bore = circle_centre(v[on][:, 1:])
    rs = second.overmold.cavity_radius_mm
    u = second.part("shell-upper").mesh.vertices
    on = (np.abs(np.hypot(u[:, 1], u[:, 2]) - rs) < 0.05) & (u[:, 2] > 0.1)
    outer = circle_centre(u[on][:, 1:])
    assert np.hypot(*bore) < 0.05  # on the x axis, as planned
    assert float(np.hypot(*(bore - outer))) <= 0.05
    assert om.axis_offset_mm <= 0.05


def outside_points(om, n: int = 4000) -> np.ndarray:
    """Points of the skin's outer surface: sampled on the skin, kept where a step-2 shell
    lies within 0.05 mm (trimesh proximity)."""
    second = om.steps[1]
    skin = second.part("cast").mesh.to_trimesh()
    shells = trimesh.util.concatenate([second.part(n).mesh.to_trimesh()
                                       for n in ("shell-lower", "shell-upper")])
    pts, _ = trimesh.sample.sample_surface_even(skin, n, seed=11)
    _, dist, _ = trimesh.proximity.closest_point(shells, pts)
    return pts[dist <= 0.05]


def test_the_skin_over_the_wound_bladder_is_at_least_min_wall_everywhere(om):
    # From each point of the skin's outside, the nearest point of the bladder or the core
    # (its tip under the cap): at least the skin thickness, less the chord. Where the
    # thread lies under it, it takes its diameter off that: on the curved face between
    # the ridges (2.3 mm from the tube, against 1.5 mm over a crest) and under the flat
    # face (thread + skin below it, up to the bladder's far end).
    first = om.steps[0]
    r = om.recipe
    p = r.process
    pts = outside_points(om)
    # The inlet face is the bladder's own end, open by design, and the core's key stands
    # in the inlet wall 1.5 mm off it, pulled out with the core: measured from 2 mm on.
    pts = pts[pts[:, 0] > 2.0]
    inner = trimesh.util.concatenate([first.part("cast").mesh.to_trimesh(),
                                      first.part("core").mesh.to_trimesh()])
    _, dist, _ = trimesh.proximity.closest_point(inner, pts)
    between = (pts[:, 2] >= 0.0) & (dist > p.guide_height_mm + p.skin_mm)
    under = ((pts[:, 2] < -(p.skin_mm + p.thread_diameter_mm) + 0.05)
             & (pts[:, 0] < r.body.length_mm))
    thread = np.where(between | under, p.thread_diameter_mm, 0.0)
    skin = dist - thread
    assert len(pts) > 1000
    assert skin.min() >= r.checks.min_wall_mm
    assert skin.min() == pytest.approx(p.skin_mm, abs=2 * r.mesh.chord_mm)
    assert om.skin_over_guides_mm == pytest.approx(p.skin_mm, abs=2 * r.mesh.chord_mm)


def test_the_sheet_is_held_by_the_skin_with_min_wall_on_every_side(om):
    r = om.recipe
    p = r.process
    sheet = om.steps[1].overmold.sheet
    assert sheet is not None and sheet.material == "paper"
    big, *_ = figures(om)
    # On the thread across the flat face, the cover margin in from each edge.
    assert sheet.z_mm == pytest.approx(-p.thread_diameter_mm)
    assert sheet.size_mm == pytest.approx((r.body.length_mm - 2 * p.cover_margin_mm,
                                           2 * (big - p.cover_margin_mm)))
    # Sampled on its rectangle and edges, the nearest point of the skin's outside.
    xs = np.linspace(sheet.x0_mm, sheet.x1_mm, 60)
    ys = np.linspace(-sheet.half_width_mm, sheet.half_width_mm, 20)
    grid = np.array([(x, y, sheet.z_mm) for x in xs for y in ys])
    second = om.steps[1]
    shells = trimesh.util.concatenate([second.part(n).mesh.to_trimesh()
                                       for n in ("shell-lower", "shell-upper")])
    _, dist, _ = trimesh.proximity.closest_point(shells, grid)
    assert dist.min() >= r.checks.min_wall_mm
    # The least is the skin under it, process.skin_mm (margins: 2 mm at the inlet face,
    # 4.3 mm at the sides, 7 mm at the cap).
    assert dist.min() == pytest.approx(p.skin_mm, abs=2 * r.mesh.chord_mm)
    assert om.sheet_cover_mm == pytest.approx(p.skin_mm, abs=2 * r.mesh.chord_mm)


def test_the_thread_matches_the_closed_form_and_its_paths_arc_length(om):
    big, *_, length, _, _, pitch = figures(om)
    t = om.thread
    rc = big + om.recipe.process.thread_diameter_mm / 2.0
    turns = (length - 2 * GUIDE_MARGIN_MM) / pitch
    per_turn = math.hypot(math.pi * rc + 2 * rc, pitch)
    assert t.helices == 2 and t.half_round
    assert t.helix_mm == pytest.approx(turns * per_turn, rel=1e-12)
    # The arc length of a polyline round the D (half circle over the top, the diameter
    # across the bottom, corners on it) advancing evenly along the perimeter, summed
    # numerically.
    per = math.pi * rc + 2 * rc
    arc = np.concatenate([np.linspace(0.0, math.pi * rc, 20001)[:-1],
                          np.linspace(math.pi * rc, per, 5001)[:-1]])
    on_curve = arc < math.pi * rc
    ang = arc / rc
    y = np.where(on_curve, rc * np.cos(ang), -rc + (arc - math.pi * rc))
    z = np.where(on_curve, rc * np.sin(ang), 0.0)
    one = np.column_stack([pitch * arc / per, y, z])
    pts = np.vstack([one + (k * pitch, 0, 0) for k in range(round(turns))]
                    + [[[turns * pitch, rc, 0.0]]])
    walked = float(np.linalg.norm(np.diff(pts, axis=0), axis=1).sum())
    assert t.helix_mm == pytest.approx(walked, rel=1e-6)
    # The guides advance it half a pitch over each face instead: the curved face's half
    # helix plus a straight line across the flat one differ from the even advance by
    # under 1e-3.
    guided = turns * (math.hypot(math.pi * rc, pitch / 2) + math.hypot(2 * rc, pitch / 2))
    assert t.helix_mm == pytest.approx(guided, rel=1e-3)
    assert t.total_mm == pytest.approx(2 * (t.helix_mm + t.ends_mm), rel=1e-12)


def test_each_part_pulled_along_its_pull_clears_all_but_the_ridge_flanks(om):
    first, second = om.steps
    big, small, wall, length, h, *_ = figures(om)
    d_tube = d_on_slab(big, 1e-3, length)
    for s in (first, second):
        cast = manifold(s.part("cast").mesh)
        for p in s.parts:
            if p.pull_dir is None:
                continue
            moved = manifold(p.mesh).translate(tuple(c * 1.0 for c in p.pull_dir))
            shared = (cast ^ moved).volume()
            rel = next(r for r in s.releases if r.part == p.name)
            if s is second or p.name != "shell-upper":
                # Smooth cavities, the flat plate under the flat face and a straight core:
                # nothing is dragged.
                assert shared < TOUCH_MM3, (s.name, p.name, shared)
                assert rel.locked_mm3 < TOUCH_MM3
                continue
            # The upper half holds every groove: the helical ridges meet the parting plane
            # at a slant, and it drags slivers of them only; the D itself lifts clear, and
            # so does everything once the half is well off.
            assert (d_tube ^ moved).volume() < TOUCH_MM3
            assert 0.0 < shared <= rel.locked_mm3 + TOUCH_MM3
            ridges = first.part("cast").brep_volume_mm3 - (
                math.pi * big ** 2 / 2 - segment_mm2(small, wall)) * length
            assert rel.locked_mm3 < 0.05 * ridges
            away = manifold(p.mesh).translate(tuple(c * 2 * big for c in p.pull_dir))
            assert (cast ^ away).volume() < TOUCH_MM3


def test_no_motion_is_predicted_for_a_wound_bladder(om):
    # No registered motion model covers a bladder held by wound thread (see the
    # OvermoldMoldSet.motion docstring); the manifest and card say nothing of motion.
    assert om.motion is None


@pytest.mark.parametrize("guides", ["single", "none"])
def test_single_and_no_guides_on_a_d_build_to_their_closed_forms(guides):
    # A shorter rod (3 turns of guide) keeps this quick; a single helix keeps half of
    # each turn, the curved face's: 3 pi of ridge in all, or none.
    from pathlib import Path

    from recipe_text import edit, planned_from_text

    from soft_molds.geometry.overmold import build_casts
    from soft_molds.plan import plan_mold

    text = (Path(__file__).resolve().parents[2] / "recipes" / f"{NAME}.yaml").read_text()
    text = edit(text, "guides: double", f"guides: {guides}")
    text = edit(text, "  length_mm: 48\n", "  length_mm: 24\n")
    text = edit(text, "length_mm: 44 ", "length_mm: 20 ")
    r = planned_from_text(text, "short.yaml", "short")
    first, second = plan_mold(r).steps
    casts = build_casts(first.overmold, second.overmold)
    big, small, length = r.body.diameter_mm / 2, r.voids[0].diameter_mm / 2, 24.0
    wall = big - small
    p = r.process
    span = 3 * math.pi if guides == "single" else 0.0
    ridges = p.guide_width_mm * p.guide_height_mm * (big + p.guide_height_mm / 2) * span
    tube = (math.pi * big ** 2 / 2 - segment_mm2(small, wall)) * length
    # Split at the flat face, a single guide is half-turn sweeps like a double guide's
    # pieces, which fuse to about 1e-7 (RIDGE_VOLUME_TOL in the geometry module).
    assert casts.bladder.Volume() == pytest.approx(tube + ridges, rel=1e-5)
    sk = second.overmold
    rs, d = sk.cavity_radius_mm, sk.flat_depth_mm
    skin = ((math.pi * rs ** 2 / 2 + 2 * rs * d) * sk.cavity_end_x_mm
            - math.pi * big ** 2 / 2 * length - ridges
            - segment_mm2(small, wall) * (sk.core.end_x_mm - length))
    assert casts.skin.Volume() == pytest.approx(skin, rel=1e-5)
