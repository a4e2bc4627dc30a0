"""The ring body and its annulus channel against closed-form solid geometry: Pappus's
centroid theorem (a plane region turned about an axis in its plane sweeps its area times
the path of its centroid). The rounded rectangle's section is the rectangle less four
spandrels (a square corner less a quarter disc: area (1 - pi/4) f^2, centroid
2 f / (3 (4 - pi)) from the rounding's centre along each edge; elementary integration).
The BRep volume is integrated by the kernel's own properties (OCCT); the mesh volume by
trimesh, an independent library. Tolerances: 0.1 % on the BRep, 0.5 % on the mesh. Built
on the primitives alone (no mold), so each costs a fraction of a second."""

from __future__ import annotations

import math

import pytest
import trimesh

PI = math.pi


def pappus_ring_volume(r_in: float, r_out: float, h: float, f: float) -> float:
    """An annulus of section (r_out - r_in) x h, each of its four circular edges rounded
    by f: the full annulus pi (R^2 - r^2) h less each spandrel turned about the axis
    (area (1 - pi/4) f^2 at its centroid's radius, two near the outer face and two near
    the bore)."""
    area = (1.0 - PI / 4.0) * f * f
    c = 2.0 * f / (3.0 * (4.0 - PI))  # centroid, from the rounding's centre
    outer = r_out - f + c
    inner = r_in + f - c
    return PI * (r_out ** 2 - r_in ** 2) * h - 2.0 * (2.0 * PI * outer * area) \
        - 2.0 * (2.0 * PI * inner * area)


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


def test_pappus_ring_with_the_rounding_at_half_the_wall_turns_a_stadium():
    # Rounded by half the radial wall and half the height (a square section), the section
    # is a disc: the ring is a torus, 2 pi^2 R a^2 (elementary geometry).
    a, big = 3.0, 15.0
    assert pappus_ring_volume(big - a, big + a, 2 * a, a) == \
        pytest.approx(2 * PI ** 2 * big * a * a, rel=1e-12)


# The demo cuff's ring and channel (recipes/stem-ring-cuff.yaml), and a sharp-edged gasket.
CASES = [((10.0, 22.0, 14.0, 1.5), "cuff ring"), ((12.0, 15.0, 10.0, 0.5), "cuff channel"),
         ((4.0, 9.0, 3.0, 0.0), "sharp gasket")]


@pytest.mark.parametrize("dims, name", CASES, ids=[n for _, n in CASES])
def test_ring_brep_and_mesh_volumes_match_pappus(dims, name):
    from soft_molds.geometry import kernel
    from soft_molds.geometry.tessellate import tessellate
    from soft_molds.recipe.primitives import RoundedRing

    r_in, r_out, h, f = dims
    prim = RoundedRing((r_out, 0.0), r_in, r_out, -h / 2.0, h, f)
    want = pappus_ring_volume(r_in, r_out, h, f)
    assert close(prim.volume_mm3(), want, 1e-9)
    solid = kernel.build_primitive(prim, name)
    assert close(solid.Volume(), want, 0.001), (solid.Volume(), want)
    mesh = tessellate(solid, 0.02, 10.0, name)
    tri = trimesh.Trimesh(mesh.vertices, mesh.faces, process=False)
    assert tri.is_watertight
    assert close(float(tri.volume), want, 0.005)


def test_ring_frame_touches_the_inlet_plane_on_its_outer_face_with_its_axis_along_z():
    from soft_molds.recipe.contracts import bounds_of
    from soft_molds.recipe.kinds.annulus import Annulus
    from soft_molds.recipe.kinds.ring import Ring

    ring = Ring(20.0, 44.0, 14.0, 1.5)
    assert bounds_of(ring.primitives()) == ((0.0, -22.0, -7.0), (44.0, 22.0, 7.0))
    fitted, problems = Annulus(2.0, 3.0, 10.0, "none", 0.5, 2.0).follow_body(ring, "voids[0]")
    assert problems == [] and fitted is not None
    channel, feed = fitted.primitives(44.0)
    # Bore radius 10 + wall 2 = 12 to 12 + depth 3 = 15, about the ring's axis at x = 22.
    assert (channel.center_mm, channel.inner_radius_mm, channel.outer_radius_mm) == \
        ((22.0, 0.0), 12.0, 15.0)
    # The feed runs from the inlet plane to the channel's middle radius: 22 - 13.5.
    assert (feed.axis, feed.start_mm, feed.length_mm) == ("x", 0.0, 8.5)


def _socket_in_ring_mm3(big: float, r_sock: float, depth: float) -> float:
    """The part of a round socket (radius r_sock, along +x from the plane x = 0 to depth)
    inside a ring whose outer face (radius big) touches that plane: at each (y, z) of the
    mouth the face stands big - sqrt(big^2 - y^2) back from the plane. Integrated by
    scipy's adaptive quadrature (an independent numerical reference)."""
    from scipy.integrate import dblquad

    val, _ = dblquad(lambda z, y: depth - (big - math.sqrt(big * big - y * y)),
                     -r_sock, r_sock, lambda y: -math.sqrt(r_sock ** 2 - y * y),
                     lambda y: math.sqrt(r_sock ** 2 - y * y))
    return val


def _feed_between_mm3(r_channel: float, r_feed: float, x0: float) -> float:
    """The radial feed (radius r_feed along x) between the socket floor x0 and the
    channel's outer face, a cylinder of radius r_channel about the ring's axis at
    x = big: at each (y, z) the face lies at big - sqrt(r_channel^2 - y^2); measured from
    the ring's outer face at x = 0 (scipy quadrature)."""
    from scipy.integrate import dblquad

    big = 22.0
    val, _ = dblquad(lambda z, y: (big - math.sqrt(r_channel ** 2 - y * y)) - x0,
                     -r_feed, r_feed, lambda y: -math.sqrt(r_feed ** 2 - y * y),
                     lambda y: math.sqrt(r_feed ** 2 - y * y))
    return val


def test_demo_cuff_body_voids_and_cast_match_pappus_and_quadrature():
    from conftest import built

    cuff = built("stem-ring-cuff")
    # recipes/stem-ring-cuff.yaml: ring 20/44 x 14 rounded 1.5; channel 12..15 x 10
    # rounded 0.5; socket r 2, 4 deep; feed r 1.
    body = pappus_ring_volume(10.0, 22.0, 14.0, 1.5)
    voids = (pappus_ring_volume(12.0, 15.0, 10.0, 0.5) + _socket_in_ring_mm3(22.0, 2.0, 4.0)
             + _feed_between_mm3(15.0, 1.0, 4.0))
    assert close(cuff.volumes_mm3["body"], body, 0.001)
    assert close(cuff.void_volume_mm3, voids, 0.001)
    cast = cuff.part("cast")
    assert close(cast.brep_volume_mm3, body - voids, 0.001)
    assert close(float(trimesh.Trimesh(cast.mesh.vertices, cast.mesh.faces).volume),
                 body - voids, 0.005)


def test_demo_cuff_gets_no_motion_curve_and_a_note_saying_why():
    from conftest import built

    cuff = built("stem-ring-cuff")
    assert cuff.motion is None
    assert cuff.review is not None
    notes = [f for f in cuff.review.findings if f.check == "motion"]
    assert len(notes) == 1 and "no long axis" in notes[0].message
