"""A tapered finger whose chambers follow its taper (per-chamber sizes: a list and a linear
grade): BRep and mesh volumes against closed-form solid geometry. Sources: the Steiner
formula for the Minkowski sum of a box and a ball (V = abc + 2r(ab+bc+ca) + pi r^2 (a+b+c)
+ 4/3 pi r^3 for the inner box a x b x c), the frustum V = pi h (R^2 + R r + r^2) / 3 and
the cylinder pi r^2 h (elementary geometry). Tolerances: 0.1 % on the BRep, 0.5 % on the
mesh, as for the bundled recipes."""

from __future__ import annotations

import math

import pytest

from soft_molds import build
from soft_molds.recipe import recipe_from_text

PI = math.pi


def rounded_box_volume(a: float, b: float, c: float, r: float) -> float:
    """Box of outer size a x b x c with every edge rounded by r (Steiner formula)."""
    a, b, c = a - 2 * r, b - 2 * r, c - 2 * r
    return a * b * c + 2 * r * (a * b + b * c + c * a) + PI * r * r * (a + b + c) \
        + 4.0 / 3.0 * PI * r ** 3


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)

# Demo scenario: a longer finger for the co-op's gripper that tapers towards its tip; its
# chambers shrink with it so the wall over them stays about even.
TAPERED = """\
name: tapered-finger
body:
  kind: revolved
  profile_mm:
    - [0, 9]
    - [90, 5.5]
voids:
  - kind: chambers
    count: 5
    pitch_mm: 15
    depth_mm: [9, 8, 8, 7, 7]
    width_mm: {from: 10, to: 7}
    height_mm: [9, 8.5, 8, 7.5, 7]
    corner_radius_mm: 1
inlet: {socket_diameter_mm: 4, socket_depth_mm: 6}
material: {grade: A10}
"""
DEPTHS = [9.0, 8.0, 8.0, 7.0, 7.0]
WIDTHS = [10.0, 9.25, 8.5, 7.75, 7.0]  # 10 to 7 in four equal steps
HEIGHTS = [9.0, 8.5, 8.0, 7.5, 7.0]
PITCH, R_CORNER, FEED_R, SOCK_R, SOCK_T = 15.0, 1.0, 1.0, 2.0, 6.0


def chamber_void_volume() -> float:
    """Sum of the chambers' rounded boxes, the feed channel where it is neither inside a
    chamber (it pierces each chamber's flat faces, so runs inside it for its whole depth,
    half the last) nor inside the coaxial, wider socket, and the socket."""
    row = 4 * PITCH + DEPTHS[-1]
    start = (90.0 - row) / 2.0  # centred: 11.5 mm, beyond the socket floor + 1 mm wall
    assert start >= SOCK_T + 1.0
    chambers = sum(rounded_box_volume(d, w, h, R_CORNER)
                   for d, w, h in zip(DEPTHS, WIDTHS, HEIGHTS))
    channel_end = start + 4 * PITCH + DEPTHS[-1] / 2.0
    outside = channel_end - sum(DEPTHS[:-1]) - DEPTHS[-1] / 2.0 - SOCK_T
    return chambers + PI * FEED_R ** 2 * outside + PI * SOCK_R ** 2 * SOCK_T


@pytest.fixture(scope="module")
def tapered():
    return build(recipe_from_text(TAPERED, "tapered.yaml", "tapered-finger"))


def test_the_grade_gives_evenly_spaced_sizes_from_first_to_last():
    (v,) = recipe_from_text(TAPERED).voids
    assert v.sizes_mm("width_mm") == pytest.approx(WIDTHS, abs=1e-12)
    assert v.sizes_mm("depth_mm") == tuple(DEPTHS)


def test_graded_chamber_void_volume_matches_the_closed_form(tapered):
    assert close(tapered.void_volume_mm3, chamber_void_volume(), 0.001), (
        tapered.void_volume_mm3, chamber_void_volume())


def test_tapered_cast_brep_and_mesh_match_frustum_minus_voids(tapered):
    body = PI * 90.0 * (9.0 ** 2 + 9.0 * 5.5 + 5.5 ** 2) / 3.0
    want = body - chamber_void_volume()
    cast = tapered.part("cast")
    assert close(tapered.volumes_mm3["body"], body, 0.001)
    assert close(cast.brep_volume_mm3, want, 0.001)
    assert close(cast.mesh.volume_mm3(), want, 0.005)
    assert tapered.errors == (), [f.message for f in tapered.errors]
