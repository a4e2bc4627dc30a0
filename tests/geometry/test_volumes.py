"""BRep and mesh volumes of body, void set and cast part against closed-form solid
geometry. Sources: the Steiner formula for the Minkowski sum of a box and a ball
(V = abc + 2r(ab+bc+ca) + pi r^2 (a+b+c) + 4/3 pi r^3 for the inner box a x b x c);
Pappus's centroid theorem for the ring a fillet removes from a cylinder end; the cylinder
pi r^2 h and sphere 4/3 pi r^3. Tolerances: 0.1 % on the BRep, 0.5 % on the mesh
(issue acceptance)."""

from __future__ import annotations

import math

import pytest

PI = math.pi


def rounded_box_volume(a: float, b: float, c: float, r: float) -> float:
    """Box of outer size a x b x c with every edge rounded by r (Steiner formula)."""
    a, b, c = a - 2 * r, b - 2 * r, c - 2 * r
    return a * b * c + 2 * r * (a * b + b * c + c * a) + PI * r * r * (a + b + c) \
        + 4.0 / 3.0 * PI * r ** 3


def rounded_rod_volume(radius: float, length: float, f: float) -> float:
    """Cylinder with both end rims rounded by f: pi R^2 L minus two fillet rings. The ring
    is the spandrel (area (1 - pi/4) f^2, centroid f / (6 - 1.5 pi) from the fillet centre)
    revolved about the axis (Pappus)."""
    spandrel = (1.0 - PI / 4.0) * f * f
    centroid = radius - f + f / (6.0 - 1.5 * PI)
    return PI * radius ** 2 * length - 2 * 2 * PI * centroid * spandrel


def close(got: float, want: float, rel: float) -> bool:
    return abs(got - want) <= rel * abs(want)


def test_pappus_ring_reduces_to_hemispheres_when_the_rounding_equals_the_radius():
    # A rod rounded by its full radius is a capsule: cylinder + sphere (elementary geometry).
    r, length = 3.0, 20.0
    capsule = PI * r * r * (length - 2 * r) + 4.0 / 3.0 * PI * r ** 3
    assert rounded_rod_volume(r, length, r) == pytest.approx(capsule, rel=1e-12)


# ---- chamber rows: seedling finger and soil tamper (bars), wrist twister (rod) -----------
FINGER = dict(L=70.0, W=16.0, H=14.0, R=2.0, n=7, pitch=8.0, depth=5.0, cw=12.0, ch=8.0,
              cr=1.0, feed_r=1.0, sock_r=2.0, sock_t=6.0)
TAMPER = dict(L=56.0, W=12.0, H=20.0, R=2.0, n=5, pitch=9.0, depth=5.0, cw=7.0, ch=14.0,
              cr=1.0, feed_r=1.0, sock_r=2.0, sock_t=6.0)
TWISTER = dict(L=64.0, D=20.0, R=3.0, n=6, pitch=8.0, depth=5.0, cw=12.0, ch=10.0,
               cr=1.5, feed_r=1.25, sock_r=2.0, sock_t=6.0)


def chamber_void_volume(f: dict) -> float:
    chambers = f["n"] * rounded_box_volume(f["depth"], f["cw"], f["ch"], f["cr"])
    row = (f["n"] - 1) * f["pitch"] + f["depth"]
    start = (f["L"] - row) / 2.0
    assert start > f["sock_t"]  # the socket ends before the first chamber
    channel_end = start + (f["n"] - 1) * f["pitch"] + f["depth"] / 2.0
    # The channel runs inside every chamber's flat faces for one depth (half in the last)
    # and inside the coaxial, wider socket for the socket's depth.
    outside = channel_end - (f["n"] - 1) * f["depth"] - f["depth"] / 2.0 - f["sock_t"]
    channel = PI * f["feed_r"] ** 2 * outside
    socket = PI * f["sock_r"] ** 2 * f["sock_t"]
    return chambers + channel + socket


def finger_void_volume() -> float:
    return chamber_void_volume(FINGER)


@pytest.mark.parametrize("fixture, dims", [("tamper", TAMPER), ("twister", TWISTER)])
def test_chamber_rows_in_bar_and_rod_match_the_closed_form(fixture, dims, request):
    molds = request.getfixturevalue(fixture)
    if "D" in dims:
        body = rounded_rod_volume(dims["D"] / 2.0, dims["L"], dims["R"])
    else:
        body = rounded_box_volume(dims["L"], dims["W"], dims["H"], dims["R"])
    voids = chamber_void_volume(dims)
    assert close(molds.volumes_mm3["body"], body, 0.001)
    assert close(molds.void_volume_mm3, voids, 0.001)
    assert close(molds.part("cast").brep_volume_mm3, body - voids, 0.001)
    assert close(molds.part("cast").mesh.volume_mm3(), body - voids, 0.005)


def test_finger_body_volume_matches_the_steiner_formula(finger):
    f = FINGER
    want = rounded_box_volume(f["L"], f["W"], f["H"], f["R"])
    assert close(finger.volumes_mm3["body"], want, 0.001), (finger.volumes_mm3, want)


def test_finger_void_set_volume_matches_the_closed_form(finger):
    assert close(finger.void_volume_mm3, finger_void_volume(), 0.001)


def test_finger_cast_volume_brep_and_mesh_match_body_minus_voids(finger):
    f = FINGER
    want = rounded_box_volume(f["L"], f["W"], f["H"], f["R"]) - finger_void_volume()
    cast = finger.part("cast")
    assert close(cast.brep_volume_mm3, want, 0.001)
    assert close(cast.mesh.volume_mm3(), want, 0.005)
    assert close(finger.silicone_volume_mm3, want, 0.001)


# ---- tray pusher: rod body, bore ---------------------------------------------------------
def test_pusher_volumes_match_cylinder_and_hemisphere_formulas(pusher):
    body = rounded_rod_volume(7.0, 60.0, 2.0)
    # Socket (r 3, 8 deep) and bore (r 3, 50 long, hemispherical ends) are coaxial and
    # equal in radius: together a cylinder 0..47 mm plus the far hemisphere.
    voids = PI * 9.0 * 47.0 + 2.0 / 3.0 * PI * 27.0
    cast = pusher.part("cast")
    assert close(pusher.void_volume_mm3, voids, 0.001)
    assert close(cast.brep_volume_mm3, body - voids, 0.001)
    assert close(cast.mesh.volume_mm3(), body - voids, 0.005)


# ---- stem cushion: bar body, bore --------------------------------------------------------
def test_cushion_volumes_match_the_closed_form(cushion):
    body = rounded_box_volume(40.0, 24.0, 12.0, 2.0)
    # Bore r 2, 32 long, both ends rounded by 2 (a capsule); socket r 2.5, 6 deep, holding
    # the bore's near hemisphere and 4 mm of its cylinder.
    capsule = PI * 4.0 * 28.0 + 4.0 / 3.0 * PI * 8.0
    inside_socket = 2.0 / 3.0 * PI * 8.0 + PI * 4.0 * 4.0
    voids = capsule - inside_socket + PI * 2.5 ** 2 * 6.0
    cast = cushion.part("cast")
    assert close(cushion.void_volume_mm3, voids, 0.001)
    assert close(cast.brep_volume_mm3, body - voids, 0.001)
    assert close(cast.mesh.volume_mm3(), body - voids, 0.005)


@pytest.mark.parametrize("name", ["seedling-finger", "tray-pusher", "stem-cushion",
                                  "wrist-twister", "soil-tamper"])
def test_every_part_mesh_volume_is_within_half_a_percent_of_its_brep(name, bundled):
    for part in bundled(name).parts:
        assert close(part.mesh.volume_mm3(), part.brep_volume_mm3, 0.005), part.name


# ---- twin-row finger: two chamber rows meeting only in one wide socket ------------------
def test_two_rows_on_one_socket_match_the_closed_form(bundled):
    """Each row's feed channel (r 1 at y = -7.5 or 7.5) lies inside the 9 mm socket for
    its 6 mm depth (7.5 + 1 < 9) and inside each chamber's flat faces (one depth each, half
    of the last), so it shows for 43.5 - 6 - (3 x 5 + 2.5) = 20 mm per row."""
    molds = bundled("twin-row-finger")
    body = rounded_box_volume(60.0, 34.0, 26.0, 2.0)
    chamber = rounded_box_volume(5.0, 10.0, 12.0, 0.5)
    voids = PI * 9.0 ** 2 * 6.0 + 2 * (4 * chamber + PI * 1.0 ** 2 * 20.0)
    assert close(molds.volumes_mm3["body"], body, 0.001)
    assert close(molds.void_volume_mm3, voids, 0.001)
    assert close(molds.part("cast").brep_volume_mm3, body - voids, 0.001)
    assert close(molds.part("cast").mesh.volume_mm3(), body - voids, 0.005)


# ---- gap rod: a chamber row 4 mm above a rod's axis, fed from a coaxial socket ----------
def test_chambers_above_a_rod_axis_match_the_closed_form(bundled):
    """The feed channel (r 1 at z = 4) lies inside the 12 mm socket for its 8 mm depth
    (4 + 1 < 6) and inside each chamber's flat faces (one depth each, half of the last), so
    it shows for 18 + 4 x 9 + 2.5 - 8 - (4 x 5 + 2.5) = 26 mm."""
    molds = bundled("gap-rod")
    body = rounded_rod_volume(12.0, 72.0, 1.0)
    chamber = rounded_box_volume(5.0, 12.0, 8.0, 0.5)
    voids = PI * 6.0 ** 2 * 8.0 + 5 * chamber + PI * 1.0 ** 2 * 26.0
    assert close(molds.volumes_mm3["body"], body, 0.001)
    assert close(molds.void_volume_mm3, voids, 0.001)
    assert close(molds.part("cast").brep_volume_mm3, body - voids, 0.001)
    assert close(molds.part("cast").mesh.volume_mm3(), body - voids, 0.005)


# ---- plenum finger: a chamber row fed through a wide bore, not the socket ---------------
def test_row_fed_through_a_bore_is_one_void_of_the_union_volume(bundled):
    """Union = sum of the parts less their pairwise overlaps (inclusion-exclusion; no point
    lies in three parts). Socket r 2, x 0..6; bore r 3, x 3..17, coaxial: they share
    pi 2^2 (6 - 3). Feed r 1 at z = 1, x 10..53.5 (the last chamber's middle, 19 + 4 x 8 +
    2.5): within the bore for 17 - 10 = 7 mm (1 + 1 < 3), within each chamber's flat faces
    for one depth (4 x 5 + 2.5). Five chambers 5 x 12 x 8 rounded by 1 (Steiner)."""
    molds = bundled("plenum-finger")
    body = rounded_box_volume(64.0, 16.0, 14.0, 2.0)
    socket, bore = PI * 2.0 ** 2 * 6.0, PI * 3.0 ** 2 * 14.0
    feed = PI * 1.0 ** 2 * (53.5 - 10.0)
    chambers = 5 * rounded_box_volume(5.0, 12.0, 8.0, 1.0)
    overlaps = PI * 2.0 ** 2 * 3.0 + PI * 1.0 ** 2 * (7.0 + 4 * 5.0 + 2.5)
    voids = socket + bore + feed + chambers - overlaps
    cast = molds.part("cast")
    assert close(molds.volumes_mm3["body"], body, 0.001)
    assert close(molds.void_volume_mm3, voids, 0.001), (molds.void_volume_mm3, voids)
    assert close(cast.brep_volume_mm3, body - voids, 0.001)
    assert close(cast.mesh.volume_mm3(), body - voids, 0.005)
