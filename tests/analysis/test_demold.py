"""Draft, undercut and parting-plane scoring, checked on shapes with known answers.

Shapes come from manifold3d (exact booleans on axis-aligned boxes; frusta with 256 segments,
whose chord error is far below the tolerances used). Expected numbers are closed form
(frustum slant and lateral area pi (r1 + r2) s) or elementary geometry (areas of the T's
rectangles). That a mold part releases from a wall parallel to or leaning away from its pull
and is blocked by a face leaning into it is common practice.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import manifold3d as m3
import numpy as np
import pytest
from meshes import box, from_manifold

from soft_molds.analysis.demold import (
    MIN_DEPTH_MM,
    Surface,
    pull_report,
    score_plane,
    side_masks,
)
from soft_molds.analysis.parting_scores import score_planes
from soft_molds.meshdata import TriMesh
from soft_molds.plan.parting import rank

UP = (0.0, 0.0, 1.0)
SEGMENTS = 256

# A post of height H whose radius shrinks from R_LOW at z = 0 to R_HIGH at z = H, so its
# wall leans 2 deg off the z axis (closed form: r_low - r_high = H tan 2 deg).
H = 20.0
R_LOW = 10.0
DRAFT = 2.0
R_HIGH = R_LOW - H * math.tan(math.radians(DRAFT))
SLANT = math.hypot(H, R_LOW - R_HIGH)
LATERAL_AREA = math.pi * (R_LOW + R_HIGH) * SLANT  # closed form, frustum lateral area


@dataclass(frozen=True)
class _Hole:
    """A hole in the pulled part (the shape pull_report reads: centre and radius, mm)."""

    center_mm: tuple[float, float, float]
    radius_mm: float


def _frustum(r_bottom: float, r_top: float) -> TriMesh:
    return from_manifold(m3.Manifold.cylinder(H, r_bottom, r_top, circular_segments=SEGMENTS))


def _side_wall(s: Surface) -> np.ndarray:
    # Wall facets lean at most a few degrees off vertical; the caps are exactly +-z.
    return np.abs(s.normals[:, 2]) < 0.5


def _tee() -> TriMesh:
    """Crossbar (0,0,20)-(60,20,30) on a stem (20,0,0)-(40,20,20): two 20 x 20 overhangs."""
    return from_manifold(box((0, 0, 20), (60, 20, 30)) + box((20, 0, 0), (40, 20, 20)))


# --- draft of a tapered post -------------------------------------------------------------

def test_post_narrowing_upward_has_its_taper_as_positive_draft_when_pulled_up():
    # Sign, by hand: the post narrows toward +z, so its wall's outward normal is
    # (cos 2 deg radially out, +sin 2 deg along z). That normal points into the mold part
    # wrapped around the post (the pocket the post was cast in). Pulling that part along
    # +z gives n . d = +sin 2 deg, i.e. draft = +2 deg: the pocket widens downward and
    # clears the post as it rises.
    s = Surface(_frustum(R_LOW, R_HIGH))
    rep = pull_report(s, _side_wall(s), UP, "pocket")
    assert rep.min_draft_deg == pytest.approx(DRAFT, abs=0.05)  # closed form: the taper
    assert rep.locked_area_mm2 == 0.0
    assert rep.locked_regions == 0


def test_straight_cylinder_wall_has_zero_draft():
    s = Surface(_frustum(R_LOW, R_LOW))
    rep = pull_report(s, _side_wall(s), UP, "pocket")
    assert rep.min_draft_deg == pytest.approx(0.0, abs=0.05)  # closed form: wall parallel to z
    assert rep.locked_area_mm2 == 0.0


def test_low_draft_area_is_whole_wall_below_a_3_deg_limit_and_none_below_1_deg():
    s = Surface(_frustum(R_LOW, R_HIGH))
    wall = _side_wall(s)
    strict = pull_report(s, wall, UP, "pocket", min_draft_deg=3.0)
    lenient = pull_report(s, wall, UP, "pocket", min_draft_deg=1.0)
    # Closed form: lateral area pi (r1 + r2) s of the frustum; every wall facet has 2 deg.
    assert strict.area_mm2 == pytest.approx(LATERAL_AREA, rel=0.01)
    assert strict.low_draft_area_mm2 == pytest.approx(LATERAL_AREA, rel=0.01)
    assert lenient.low_draft_area_mm2 == pytest.approx(0.0, abs=0.01 * LATERAL_AREA)


def test_post_widening_upward_is_a_locked_undercut_over_its_whole_wall():
    # The mirror case: the post widens toward +z, its wall normal tilts down by 2 deg, so a
    # part pulled +z has draft -2 deg and is held by the post's wider top.
    s = Surface(_frustum(R_HIGH, R_LOW))
    rep = pull_report(s, _side_wall(s), UP, "pocket")
    assert rep.min_draft_deg == pytest.approx(-DRAFT, abs=0.05)  # closed form
    assert rep.locked_area_mm2 == pytest.approx(LATERAL_AREA, rel=0.01)  # closed form
    assert rep.locked_regions == 1
    # Closed form of the module's depth definition: the rectangle with the area and
    # perimeter of the annulus seen along z (area pi (R^2 - r^2), perimeter 2 pi (R + r)).
    area = math.pi * (R_LOW**2 - R_HIGH**2)
    half = math.pi * (R_LOW + R_HIGH)
    width = (half - math.sqrt(half * half - 4.0 * area)) / 2.0
    assert rep.locked_depth_mm == pytest.approx(width, rel=0.01)


# --- a T pulled apart at various planes --------------------------------------------------

def test_tee_parted_at_its_foot_locks_both_overhangs_of_the_crossbar():
    s = Surface(_tee())
    score, reports = score_plane(s, np.ones(len(s.areas), dtype=bool), "z", 0.0)
    upper = reports[1]
    # Elementary geometry: two 20 x 20 mm overhang undersides, 2 x 20 x 20 = 800 mm2.
    assert score.locked_area_mm2 == pytest.approx(800.0, rel=0.02)
    assert upper.locked_area_mm2 == pytest.approx(800.0, rel=0.02)
    # Elementary geometry: a 20 x 20 square is its own equivalent rectangle, depth 20 mm.
    assert upper.locked_depth_mm == pytest.approx(20.0, rel=0.02)
    assert upper.locked_regions == 2
    assert upper.locked_where_mm is not None
    assert upper.locked_where_mm[2] == pytest.approx(20.0)  # on an overhang's underside
    assert score.min_draft_deg == pytest.approx(-90.0)  # faces straight against the pull


@pytest.mark.parametrize(
    ("axis", "offset"),
    [("z", 20.0),   # along the crossbar's underside: the stem drops out, the bar lifts off
     ("y", 10.0),   # through the T's mid-plane: every face is parallel or faces its shell
     ("z", 30.0)],  # at the top: the whole T pulls down out of the lower shell
)
def test_tee_parted_where_every_face_releases_has_no_locked_area(axis: str, offset: float):
    s = Surface(_tee())
    score, reports = score_plane(s, np.ones(len(s.areas), dtype=bool), axis, offset)
    assert score.locked_area_mm2 == 0.0  # elementary geometry: no face leans into its pull
    assert all(r.locked_regions == 0 for r in reports)
    assert score.min_draft_deg == pytest.approx(0.0, abs=0.05)  # the vertical walls


def test_rank_planes_puts_the_releasing_planes_of_the_tee_first():
    s = Surface(_tee())
    contact = np.ones(len(s.areas), dtype=bool)
    cands = [("z", 0.0), ("z", 10.0), ("z", 20.0), ("y", 10.0)]
    ranked = rank(score_planes(s, contact, None, None, cands, rule=None, min_draft_deg=0.5))
    order = [(p.axis, p.offset_mm) for p in ranked]
    assert ranked[0].locked_area_mm2 == 0.0
    assert order[0] in {("z", 20.0), ("y", 10.0)}
    good = max(order.index(("z", 20.0)), order.index(("y", 10.0)))
    # z = 0 and z = 10 both leave the crossbar's 800 mm2 of overhang on the upper shell.
    assert order.index(("z", 0.0)) > good
    assert order.index(("z", 10.0)) > good
    for p in ranked[2:]:
        assert p.locked_area_mm2 == pytest.approx(800.0, rel=0.02)  # elementary geometry


def test_opening_over_one_overhang_frees_that_overhang():
    s = Surface(_tee())
    _, upper = side_masks(s, np.ones(len(s.areas), dtype=bool), "z", 0.0)
    # A hole in the upper shell over the left overhang (x 0..20, y 0..20): its farthest
    # corner is 10 sqrt 2 = 14.1 mm from the centre, inside the 15 mm radius; the right
    # overhang (x 40..60) is at least 30 mm away.
    hole = _Hole(center_mm=(10.0, 10.0, 30.0), radius_mm=15.0)
    rep = pull_report(s, upper, UP, "shell-upper", openings=[hole])
    assert rep.locked_area_mm2 == pytest.approx(400.0, rel=0.02)  # elementary: 20 x 20
    assert rep.locked_regions == 1
    assert rep.locked_where_mm is not None
    assert rep.locked_where_mm[0] > 40.0  # the remaining region is the right overhang


# --- tessellation noise ------------------------------------------------------------------

def _tee_with_lip(lip: float) -> TriMesh:
    """Stem (20,0,0)-(40,20,20) under a bar overhanging it by ``lip`` mm on the -x side."""
    return from_manifold(box((20.0 - lip, 0, 20), (40, 20, 30)) + box((20, 0, 0), (40, 20, 20)))


def test_lip_shallower_than_the_noise_floor_is_dropped():
    lip = 0.02
    assert lip < MIN_DEPTH_MM
    s = Surface(_tee_with_lip(lip))
    _, upper = side_masks(s, np.ones(len(s.areas), dtype=bool), "z", 0.0)
    rep = pull_report(s, upper, UP, "shell-upper")
    assert rep.locked_area_mm2 == 0.0
    assert rep.locked_regions == 0
    # The dropped sliver counts as parallel to the pull: the worst draft left is 0 deg.
    assert rep.min_draft_deg == pytest.approx(0.0, abs=0.05)


def test_lip_deeper_than_the_noise_floor_is_kept_with_its_width_as_depth():
    lip = 0.1
    assert lip > MIN_DEPTH_MM
    s = Surface(_tee_with_lip(lip))
    _, upper = side_masks(s, np.ones(len(s.areas), dtype=bool), "z", 0.0)
    rep = pull_report(s, upper, UP, "shell-upper")
    assert rep.locked_area_mm2 == pytest.approx(lip * 20.0, rel=0.02)  # elementary: 0.1 x 20
    # Elementary geometry: a 0.1 x 20 strip is its own equivalent rectangle.
    assert rep.locked_depth_mm == pytest.approx(lip, rel=0.02)
    assert rep.locked_regions == 1
    assert rep.min_draft_deg == pytest.approx(-90.0)
