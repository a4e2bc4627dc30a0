"""The motion model against beam theory and the neo-Hookean law, on meshes built with an
independent library (manifold3d), so every section has a closed form.

Reference: Euler-Bernoulli beam theory, curvature k = M / (E I) with M = P A_p e (the
pressure's resultant on the void's cut, at lever arm e from the neutral axis: the centroid
of the silicone), and the parallel-axis theorem for the section's I (any strength-of-
materials text, e.g. Gere & Timoshenko, Mechanics of Materials); the bar in tension
N = E A (l - 1); the incompressible neo-Hookean uniaxial nominal stress
(E/3)(l - 1/l^2) (Treloar, The Physics of Rubber Elasticity, 1975).
"""

from __future__ import annotations

import math

import manifold3d as m3
import numpy as np
import pytest
from conftest import built_variant

from soft_molds.analysis.motion import MotionKind, StopReason, motion_curve, profile_of
from soft_molds.analysis.motion.beam import nominal_stress, tangent_modulus
from soft_molds.analysis.motion.registry import registered_models
from tests.meshes import box, from_manifold

E_MPA = 0.413          # Shore A10 by Gent's relation (casting-facts.md worked values)
B, H = 16.0, 14.0      # bar width (y) and height (z), mm
LENGTH = 60.0


def _void_mask(mesh):
    """Facets strictly inside the bar's outer box: the void's walls."""
    c = mesh.triangles().mean(axis=1)
    tol = 1e-3
    return ((c[:, 0] > tol) & (c[:, 0] < LENGTH - tol) & (np.abs(c[:, 1]) < B / 2 - tol)
            & (np.abs(c[:, 2]) < H / 2 - tol))


# --- a bar with a row of rectangular chambers ---------------------------------------------

CH_B, CH_H, CH_Z = 12.0, 8.0, 1.0     # chamber width, height, raised centre (mm)
PITCH, DEPTH, COUNT, FIRST = 6.0, 4.0, 6, 12.0


@pytest.fixture(scope="module")
def chambered():
    body = box((0, -B / 2, -H / 2), (LENGTH, B / 2, H / 2))
    for i in range(COUNT):
        xa = FIRST + i * PITCH
        body = body - box((xa, -CH_B / 2, CH_Z - CH_H / 2), (xa + DEPTH, CH_B / 2, CH_Z + CH_H / 2))
    mesh = from_manifold(body)
    return profile_of(mesh, _void_mask(mesh), FIRST, FIRST + (COUNT - 1) * PITCH + DEPTH,
                      ["chambers"])


def _chamber_section():
    """Closed form of the section through a chamber: a B x H rectangle less a b x h one
    raised by c (parallel-axis theorem). Returns (A_silicone, I, A_p, e)."""
    a_s = B * H - CH_B * CH_H
    zc = -CH_Z * CH_B * CH_H / a_s                       # the centroid drops below the middle
    i = (B * H ** 3 / 12 + B * H * zc ** 2
         - (CH_B * CH_H ** 3 / 12 + CH_B * CH_H * (CH_Z - zc) ** 2))
    return a_s, i, CH_B * CH_H, CH_Z - zc


def test_chamber_section_figures_are_the_closed_form(chambered):
    a_s, i, a_p, e = _chamber_section()
    cur = motion_curve(chambered, E_MPA, 1.0, None)
    assert cur is not None and cur.kind is MotionKind.BENDING
    got = cur.inputs
    assert got.silicone_area_mm2 == pytest.approx(a_s, rel=1e-9)
    assert got.second_moment_mm4 == pytest.approx(i, rel=1e-9)
    assert got.pressure_area_mm2 == pytest.approx(a_p, rel=1e-9)
    assert got.lever_arm_mm == pytest.approx(e, rel=1e-9)
    assert got.bend_dir == pytest.approx((0.0, 1.0), abs=1e-9)


def test_row_of_chambers_small_pressure_curvature_is_beam_theory(chambered):
    # Beam theory (Euler-Bernoulli): k = P A_p e / (E I) in each chamber section, zero in
    # the solid walls between (no void there), so theta = k * COUNT * DEPTH.
    _, i, a_p, e = _chamber_section()
    p_kpa = 0.01
    k = p_kpa / 1000.0 * a_p * e / (E_MPA * i)
    cur = motion_curve(chambered, E_MPA, p_kpa, None, steps=1)
    theta = math.radians(cur.points[-1].angle_deg)
    assert theta / (COUNT * DEPTH) == pytest.approx(k, rel=0.02)
    assert math.radians(cur.linear_deg_per_kpa) * p_kpa == pytest.approx(theta, rel=0.02)


def test_row_of_chambers_curve_rises_and_stops_at_the_balloon_limit(chambered):
    cur = motion_curve(chambered, E_MPA, 45.0, 30.0)
    ang = np.array([p.angle_deg for p in cur.points])
    ext = np.array([p.extension_mm for p in cur.points])
    lam = np.array([p.max_stretch for p in cur.points])
    assert (np.diff(ang) > 0).all() and (np.diff(ext) > 0).all() and (np.diff(lam) > 0).all()
    assert cur.points[-1].pressure_kpa == 45.0 and cur.valid_to_kpa == 45.0
    assert cur.stop is StopReason.BALLOON_LIMIT
    assert cur.at_working is not None and cur.at_working.pressure_kpa == 30.0
    # Working pressure beyond the limit: no figure at it.
    beyond = motion_curve(chambered, E_MPA, 20.0, 30.0)
    assert beyond.at_working is None and beyond.valid_to_kpa == 20.0


def test_row_of_chambers_stops_where_a_fibre_would_break(chambered):
    cur = motion_curve(chambered, E_MPA, 45.0, 30.0, break_stretch=1.05)
    assert cur.stop is StopReason.BREAK_STRETCH
    assert max(p.max_stretch for p in cur.points) <= 1.05
    assert cur.valid_to_kpa < 45.0


def test_large_pressure_departs_from_the_linear_beam(chambered):
    # The neo-Hookean fibres soften in tension (slope (E/3)(1 + 2/l^3) < E for l > 1) and
    # stiffen in compression, so at large stretch the angle leaves the straight line.
    cur = motion_curve(chambered, E_MPA, 80.0, None, steps=8)
    last = cur.points[-1]
    linear = cur.linear_deg_per_kpa * last.pressure_kpa
    assert last.max_stretch > 1.2
    assert abs(last.angle_deg / linear - 1.0) > 0.02


# --- an eccentric round bore --------------------------------------------------------------

R, ZB, X0, X1 = 3.0, 2.0, 8.0, 52.0


@pytest.fixture(scope="module")
def bored():
    bore = (m3.Manifold.cylinder(X1 - X0, R, R, 512).rotate((0.0, 90.0, 0.0))
            .translate((X0, 0.0, ZB)))
    mesh = from_manifold(box((0, -B / 2, -H / 2), (LENGTH, B / 2, H / 2)) - bore)
    return mesh


def _bore_section(r_eff):
    a_p = math.pi * r_eff ** 2
    a_s = B * H - a_p
    zc = -ZB * a_p / a_s
    i = B * H ** 3 / 12 + B * H * zc ** 2 - (a_p * r_eff ** 2 / 4 + a_p * (ZB - zc) ** 2)
    return a_s, i, a_p, ZB - zc


def test_eccentric_bore_small_pressure_curvature_is_beam_theory(bored):
    prof = profile_of(bored, _void_mask(bored), X0 + 0.5, X1 - 0.5, ["bore"])
    # A 512-gon's area is pi r^2 (1 - 2.5e-5): the circle's closed form to far below 2 %.
    _, i, a_p, e = _bore_section(R)
    p_kpa = 0.01
    k = p_kpa / 1000.0 * a_p * e / (E_MPA * i)
    cur = motion_curve(prof, E_MPA, p_kpa, None, steps=1)
    assert cur.kind is MotionKind.BENDING and cur.model == "beam-bending"
    theta = math.radians(cur.points[-1].angle_deg)
    assert theta / (X1 - X0 - 1.0) == pytest.approx(k, rel=0.02)


def test_centred_bore_extends_as_a_bar_in_tension():
    bore = (m3.Manifold.cylinder(X1 - X0, R, R, 512).rotate((0.0, 90.0, 0.0))
            .translate((X0, 0.0, 0.0)))
    mesh = from_manifold(box((0, -B / 2, -H / 2), (LENGTH, B / 2, H / 2)) - bore)
    prof = profile_of(mesh, _void_mask(mesh), X0 + 0.5, X1 - 0.5, ["bore"])
    cur = motion_curve(prof, E_MPA, 0.01, None, steps=1)
    assert cur.kind is MotionKind.EXTENDING and cur.model == "axial-extending"
    # Bar in tension: l - 1 = N / (E A) with N = P A_p.
    a_p = math.pi * R ** 2
    expect = 0.01 / 1000.0 * a_p / (E_MPA * (B * H - a_p)) * (X1 - X0 - 1.0)
    assert cur.points[-1].extension_mm == pytest.approx(expect, rel=0.02)
    assert cur.points[-1].angle_deg == 0.0


# --- the fibre law --------------------------------------------------------------------------

def test_neo_hookean_fibre_is_hookes_law_near_unit_stretch():
    # Treloar: sigma = (E/3)(l - l^-2); sigma(1) = 0, slope E at l = 1.
    assert float(nominal_stress(1.0, E_MPA)) == 0.0
    assert float(tangent_modulus(1.0, E_MPA)) == pytest.approx(E_MPA, rel=1e-12)
    for d in (1e-3, -1e-3):
        assert float(nominal_stress(1.0 + d, E_MPA)) / (E_MPA * d) == pytest.approx(1.0, abs=2e-3)
    # ... and not at large stretch: sigma(2) = (E/3)(2 - 1/4) = 0.5833 E.
    assert float(nominal_stress(2.0, E_MPA)) == pytest.approx(E_MPA * 1.75 / 3.0, rel=1e-12)


def test_models_are_registered_bender_first():
    names = [m.name for m in registered_models()]
    assert names == ["sheet-bending", "beam-bending", "axial-extending"]


# --- on a built cast ----------------------------------------------------------------------

def _rounded_rect(w: float, h: float, r: float) -> tuple[float, float]:
    """Area and second moment about the horizontal centre line of a w x h rectangle with
    corners rounded at r: the rectangle less four r x r corner squares plus four quarter
    discs (quarter disc: area pi r^2/4, centroid 4r/(3 pi) from its corner's centre,
    own second moment (pi/16 - 4/(9 pi)) r^4; parallel-axis theorem)."""
    area = w * h - (4.0 - math.pi) * r * r
    square = r ** 4 / 12.0 + r * r * (h / 2 - r / 2) ** 2
    quarter = ((math.pi / 16 - 4 / (9 * math.pi)) * r ** 4
               + math.pi * r * r / 4 * (h / 2 - r + 4 * r / (3 * math.pi)) ** 2)
    return area, w * h ** 3 / 12.0 - 4 * square + 4 * quarter


def test_the_finger_cast_section_through_a_chamber_is_the_closed_form(finger):
    from soft_molds.analysis.motion import void_facet_mask

    r = finger.recipe
    cast = finger.part("cast").mesh
    # Chamber 4 of 7 (pitch 8, depth 5, row centred on the 70 mm bar) spans x 32.5..37.5.
    prof = profile_of(cast, void_facet_mask(r, cast), 34.9, 35.1, ["chambers"])
    (sec,) = prof.sections
    a_out, i_out = _rounded_rect(16.0, 14.0, 2.0)   # the bar: 16 x 14, edges r 2
    a_in, i_in = _rounded_rect(12.0, 8.0, 1.0)      # the chamber: 12 x 8, corners r 1, z 1
    a_s = a_out - a_in
    zc = -1.0 * a_in / a_s
    i = i_out + a_out * zc ** 2 - (i_in + a_in * (1.0 - zc) ** 2)
    # The mesh's chords cut the arcs short (chord tolerance of the recipe's mesh): 0.5 %.
    assert sec.void_area_mm2 == pytest.approx(a_in, rel=5e-3)
    assert sec.silicone_area_mm2 == pytest.approx(a_s, rel=5e-3)
    assert sec.centroid_mm[1] == pytest.approx(zc, abs=0.01)
    assert sec.void_centroid_mm[1] == pytest.approx(1.0, abs=0.01)
    assert sec.second_moment_mm4((0.0, 1.0)) == pytest.approx(i, rel=5e-3)


def test_the_built_finger_bends_away_from_its_chambers(finger):
    mo = finger.motion
    assert mo is not None and mo.model == "beam-bending"
    assert mo.inputs.bend_dir == pytest.approx((0.0, 1.0), abs=1e-4)
    assert mo.stop is StopReason.BALLOON_LIMIT
    assert mo.valid_to_kpa == pytest.approx(min(w.limit_kpa for w in finger.pressures
                                                 if w.limit_kpa is not None))
    assert mo.at_working is not None and mo.at_working.angle_deg > 0.0
    assert mo.inputs.active_from_mm == finger.recipe.inlet.socket_depth_mm


def test_a_section_with_no_equilibrium_ends_the_curve_there(chambered, monkeypatch):
    from soft_molds.analysis.motion import bending

    real = bending.solve_sections

    def gives_up_above_20_kpa(s, w, n, m, e_mpa, **kw):
        if n.max() > 21.0 / 1000.0 * CH_B * CH_H:
            raise ArithmeticError("no equilibrium")
        return real(s, w, n, m, e_mpa, **kw)

    monkeypatch.setattr(bending, "solve_sections", gives_up_above_20_kpa)
    cur = motion_curve(chambered, E_MPA, 40.0, 30.0, steps=8)
    assert cur.stop is StopReason.NO_EQUILIBRIUM
    assert [p.pressure_kpa for p in cur.points] == [0.0, 5.0, 10.0, 15.0, 20.0]
    assert cur.valid_to_kpa == 20.0 and cur.at_working is None


# --- large stretch: the section's equilibrium in closed form ------------------------------

def _rect_resultants(a: float, k: float, w: float, s1: float, s2: float) -> tuple[float, float]:
    """Force and moment (about s = 0) of neo-Hookean fibres (E/3)(l - 1/l^2) with
    l = 1 + a + k s over a rectangle of width w from s1 to s2, integrated exactly:
    with q = 1 + a and ds = dl/k, the integrals of (l - l^-2) and (l - l^-2)(l - q)/k are
    l^2/2 + 1/l and l^3/3 - q l^2/2 - ln l - q/l (elementary antiderivatives)."""
    q = 1.0 + a
    l1, l2 = q + k * s1, q + k * s2

    def f(lam):
        return lam * lam / 2 + 1 / lam

    def g(lam):
        return lam ** 3 / 3 - q * lam * lam / 2 - math.log(lam) - q / lam

    c = E_MPA / 3.0 * w
    return c * (f(l2) - f(l1)) / k, c * (g(l2) - g(l1)) / k ** 2


def test_large_pressure_solves_the_exact_neo_hookean_section(chambered_long):
    # A prismatic stretch of one long chamber: every section is the same, so the angle is
    # k * length and the extension a * length. The exact section equilibrium (closed-form
    # integrals above, solved by scipy's fsolve, independent of the model's strips and
    # Newton steps) must give the same a and k; the strips' midpoint rule is good to
    # about (1/240)^2 of the depth, so 0.1 %.
    from scipy.optimize import fsolve

    prof, span = chambered_long
    p_kpa = 60.0
    cur = motion_curve(prof, E_MPA, p_kpa, None, steps=6)
    last = cur.points[-1]
    assert last.max_stretch > 1.2                     # well past the linear range
    a_s, _, a_p, e = _chamber_section()
    zc = -CH_Z * CH_B * CH_H / a_s                    # s measured up from the centroid
    n = p_kpa / 1000.0 * a_p

    def residual(x):
        a, k = x
        fo, mo = _rect_resultants(a, k, B, -H / 2 - zc, H / 2 - zc)
        fi, mi = _rect_resultants(a, k, CH_B, CH_Z - CH_H / 2 - zc, CH_Z + CH_H / 2 - zc)
        return [fo - fi - n, mo - mi - n * e]

    k_lin = n * e / (E_MPA * _chamber_section()[1])
    a, k = fsolve(residual, [n / (E_MPA * a_s), k_lin], xtol=1e-13)
    assert math.radians(last.angle_deg) / span == pytest.approx(k, rel=1e-3)
    assert last.extension_mm / span == pytest.approx(a, rel=1e-3)
    assert abs(k / k_lin - 1.0) > 0.02                # and it is not the linear answer


@pytest.fixture(scope="module")
def chambered_long():
    body = box((0, -B / 2, -H / 2), (LENGTH, B / 2, H / 2)) - box(
        (5.0, -CH_B / 2, CH_Z - CH_H / 2), (55.0, CH_B / 2, CH_Z + CH_H / 2))
    mesh = from_manifold(body)
    return profile_of(mesh, _void_mask(mesh), 15.0, 45.0, ["chambers"]), 30.0


def test_a_two_way_finger_is_predicted_with_the_first_sockets_row_inflated_alone():
    # The two rows are inflated one at a time: the curve is for the row fed through
    # inlets[0] (z = +5.5 mm), the other row open to the air. Closed forms: the pressure
    # area is one chamber's section, a 12 x 7 mm rectangle with 1 mm corner rounding,
    # 84 - (4 - pi) = 83.142 mm2 (not two); the section with both rows as holes is
    # symmetric about z = 0, so the silicone's centroid is there and the lever arm is the
    # row's 5.5 mm offset, toward +z.
    mo = built_variant("seedling-two-way-finger", "A").motion
    assert mo is not None and mo.model == "beam-bending"
    assert mo.inputs.pressure_area_mm2 == pytest.approx(84.0 - (4.0 - math.pi), rel=2e-3)
    assert mo.inputs.lever_arm_mm == pytest.approx(5.5, abs=1e-3)
    assert mo.inputs.bend_dir == pytest.approx((0.0, 1.0), abs=1e-6)
