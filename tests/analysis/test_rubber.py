"""Rubber elasticity behind the pressure check, held against published relations.

Outside references (values from /work/shared/reference/casting-facts.md):
- A. N. Gent, Rubber Chem. Technol. 31:896 (1958): Shore A -> Young's modulus.
- L. R. G. Treloar, The Physics of Rubber Elasticity (3rd ed., 1975): incompressible
  neo-Hookean solid (mu = E/3) and the inflation of thin and thick spheres; the exact
  thick-sphere solution as in M. F. Beatty, Appl. Mech. Rev. 40:1699 (1987).
- Linear thin-shell theory (elementary) for the small-strain slope and the negative control.
- The closed-end tube limit is "derived here" on the sheet, so it is also recomputed below by
  an independent route (energy of the wall, scipy's brentq and minimize_scalar).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq, minimize_scalar

from soft_molds.analysis import rubber

# Gent (1958), worked values on casting-facts.md ("derived from Gent (1958)"), MPa.
GENT_WORKED = {10: 0.413, 20: 0.732, 30: 1.142, 40: 1.690, 50: 2.456, 60: 3.605}


# ------------------------------------------------------------------------ Gent's relation

@pytest.mark.parametrize("shore, e_mpa", sorted(GENT_WORKED.items()))
def test_gent_modulus_matches_worked_values_to_three_decimals(shore: int, e_mpa: float):
    # Gent (1958), worked values on casting-facts.md, given to 3 decimals.
    assert round(rubber.gent_modulus_mpa(shore), 3) == pytest.approx(e_mpa, abs=1e-9)


@pytest.mark.parametrize("shore", [5.0, 10.0, 22.5, 40.0, 60.0, 90.0])
def test_shore_a_from_modulus_inverts_gent(shore: float):
    # Inverse of Gent (1958): the round trip must give back the hardness.
    e = rubber.gent_modulus_mpa(shore)
    assert rubber.shore_a_from_modulus(e) == pytest.approx(shore, abs=1e-9)


@pytest.mark.parametrize("e_mpa", sorted(GENT_WORKED.values()))
def test_shore_a_from_worked_modulus_lands_on_the_tabulated_hardness(e_mpa: float):
    # Gent (1958) worked values read backwards; 3-decimal rounding of E moves S by < 0.05.
    shore = {v: k for k, v in GENT_WORKED.items()}[e_mpa]
    assert rubber.shore_a_from_modulus(e_mpa) == pytest.approx(shore, abs=0.05)


@pytest.mark.parametrize("shore", [0.0, -5.0, 100.0, 120.0])
def test_gent_modulus_refuses_hardness_outside_open_0_100(shore: float):
    # Gent's relation diverges at S = 100 (casting-facts.md); 0 and below is no reading.
    with pytest.raises(ValueError):
        rubber.gent_modulus_mpa(shore)


def test_shear_modulus_is_a_third_of_youngs_for_incompressible_rubber():
    # Treloar (1975): nu = 1/2, so mu = E / 3.
    assert rubber.shear_modulus_mpa(0.6) == pytest.approx(0.2, rel=1e-12)


# ---------------------------------------------------------------------------- thin sphere

def test_sphere_limit_stretch_is_seventh_root_of_six():
    # Treloar (1975): dP/dl = 0 at l^6 = 7; casting-facts.md gives 1.38309.
    assert rubber.SPHERE_LIMIT_STRETCH == pytest.approx(7.0 ** (1.0 / 6.0), rel=1e-15)
    assert rubber.SPHERE_LIMIT_STRETCH == pytest.approx(1.38309, abs=5e-6)


@pytest.mark.parametrize("mu, h_over_r", [(1.0, 1.0), (0.137, 0.05), (2.5, 0.2)])
def test_thin_sphere_limit_is_1_23946_mu_h_over_r(mu: float, h_over_r: float):
    # Treloar (1975); coefficient 1.23946 from casting-facts.md (5 decimals).
    assert rubber.thin_sphere_limit(mu, h_over_r) / (mu * h_over_r) == pytest.approx(
        1.23946, abs=5e-6)


@pytest.mark.parametrize("e_mpa", [0.413, 1.142])
def test_thin_sphere_limit_is_0_41315_e_h_over_r_with_mu_e_over_3(e_mpa: float):
    # Treloar (1975) with mu = E/3; coefficient 0.41315 from casting-facts.md (5 decimals).
    h_over_r = 0.1
    mu = rubber.shear_modulus_mpa(e_mpa)
    assert rubber.thin_sphere_limit(mu, h_over_r) / (e_mpa * h_over_r) == pytest.approx(
        0.41315, abs=5e-6)


def test_thin_sphere_limit_is_the_maximum_of_the_pressure_curve():
    # Brute force over a fine grid (step 1e-5) of Treloar's P(l): the peak value and place.
    lam = np.linspace(1.0, 5.0, 400_001)
    p = rubber.thin_sphere_pressure(lam, 1.0, 0.1)
    i = int(np.argmax(p))
    assert 0 < i < lam.size - 1  # an interior peak, not the end of the range
    assert p[i] == pytest.approx(rubber.thin_sphere_limit(1.0, 0.1), rel=1e-9)
    assert lam[i] == pytest.approx(rubber.SPHERE_LIMIT_STRETCH, abs=1e-5)


def test_thin_sphere_small_strain_slope_is_4_e_h_over_r():
    # Linear thin-sphere theory: equibiaxial stress s = E/(1 - nu) eps = 2E eps (nu = 1/2),
    # P = 2 s H/R, so dP/dl at l = 1 is 4 E H/R (casting-facts.md). From Treloar's curve:
    # d/dl of 2 mu (H/R)(1/l - l^-7) at 1 is 12 mu H/R = 4 E H/R with mu = E/3.
    e_mpa, h_over_r, d = 0.732, 0.08, 1e-6
    mu = rubber.shear_modulus_mpa(e_mpa)
    slope = (rubber.thin_sphere_pressure(1.0 + d, mu, h_over_r)
             - rubber.thin_sphere_pressure(1.0 - d, mu, h_over_r)) / (2 * d)
    assert float(slope) == pytest.approx(4.0 * e_mpa * h_over_r, rel=1e-6)


def test_thin_sphere_pressure_is_zero_unstretched():
    # No stretch, no pressure (Treloar 1975).
    assert float(rubber.thin_sphere_pressure(1.0, 1.0, 0.1)) == 0.0


def _linear_law_peak() -> tuple[float, float]:
    """Peak of a thin sphere with a linear stress law s = E (l - 1), per E t0 / r0:
    P = 2 s t / r with t = t0 / l^2 and r = r0 l (elementary derivation)."""
    lam = np.linspace(1.0, 4.0, 300_001)
    p = 2.0 * (lam - 1.0) / lam ** 3
    i = int(np.argmax(p))
    return float(p[i]), float(lam[i])


def test_linear_law_control_value_is_8_over_27_at_one_and_a_half():
    # Elementary derivation (casting-facts.md): P_max = 8 E t0 / (27 r0) at r = 1.5 r0;
    # checked here so the negative control below compares against a correct number.
    p_max, lam = _linear_law_peak()
    assert p_max == pytest.approx(8.0 / 27.0, rel=1e-9)
    assert lam == pytest.approx(1.5, abs=1e-5)


def test_neo_hookean_sphere_does_not_reproduce_the_linear_law_peak():
    # Negative control (casting-facts.md): the neo-Hookean code must differ from
    # 8 E t0 / (27 r0) by more than 10 %; it gives 0.41315 E H/R, about 39 % more.
    e_mpa, h_over_r = 1.0, 0.05
    neo = rubber.thin_sphere_limit(rubber.shear_modulus_mpa(e_mpa), h_over_r)
    linear = 8.0 * e_mpa * h_over_r / 27.0
    assert abs(neo - linear) / linear > 0.10
    assert abs(rubber.SPHERE_LIMIT_STRETCH - 1.5) > 0.1  # the peak sits elsewhere too


# --------------------------------------------------------------------------- thick sphere

def test_thick_sphere_limit_for_inner_0_95_outer_1():
    # Exact neo-Hookean solution (Treloar 1975; Beatty 1987): mu = 1, A = 0.95, B = 1 gives
    # P_max ~= 0.0636 MPa (casting-facts.md, derived from the exact solution), within 1 %.
    lim = rubber.thick_sphere_limit(1.0, 0.95, 1.0)
    assert lim.has_peak
    assert lim.pressure == pytest.approx(0.0636, rel=0.01)


def test_thick_sphere_tiny_cavity_has_no_peak_and_approaches_five_halves_mu():
    # Cavity limit A -> 0 (casting-facts.md): lb stays ~1, so P -> mu (5/2 - 2/la - ...),
    # rising toward 5 mu / 2 without a peak in the range searched (la up to 50).
    mu = 0.4
    lim = rubber.thick_sphere_limit(mu, 1e-3, 1.0)
    assert not lim.has_peak
    assert lim.pressure < 2.5 * mu
    assert lim.pressure == pytest.approx(2.5 * mu, rel=0.02)
    # The residual gap is the cavity's own -2/la term, at the end of the range (la = 50).
    assert lim.pressure == pytest.approx(mu * (2.5 - 2.0 / lim.stretch), rel=1e-3)


def test_thick_sphere_tends_to_thin_sphere_as_the_wall_thins():
    # Exact solution vs Treloar's thin-membrane result (casting-facts.md): inner 0.999,
    # outer 1 against H/R = 0.001 / 0.9995 (mid-surface radius), within 1 %.
    thick = rubber.thick_sphere_limit(1.0, 0.999, 1.0)
    thin = rubber.thin_sphere_limit(1.0, 0.001 / 0.9995)
    assert thick.has_peak
    assert thick.pressure == pytest.approx(thin, rel=0.01)
    assert thick.stretch == pytest.approx(rubber.SPHERE_LIMIT_STRETCH, abs=0.01)


# ------------------------------------------------------------------------ plane-strain tube

def test_plane_strain_tube_rises_monotonically_below_mu_h_over_r():
    # Derived (casting-facts.md; Anssari-Benam & Bucchi, J. Elasticity 2021):
    # P = mu (H/R)(1 - l^-4) has no limit point and stays below mu H/R.
    mu, h_over_r = 0.25, 0.1
    lam = np.linspace(1.0, 20.0, 20_001)
    p = rubber.plane_strain_tube_pressure(lam, mu, h_over_r)
    assert np.all(np.diff(p) > 0.0)
    assert np.all(p < mu * h_over_r)
    assert p[-1] == pytest.approx(mu * h_over_r * (1.0 - 20.0 ** -4), rel=1e-12)


# ------------------------------------------------------------------------- closed-end tube

def test_closed_tube_axial_stretch_satisfies_hoop_twice_axial():
    # Thin-walled vessel with end caps (casting-facts.md): s_theta = 2 s_z, with
    # s_theta = mu (l^2 - lr^2), s_z = mu (lz^2 - lr^2), lr = 1 / (l lz).
    mu = 1.0
    lam = np.linspace(1.0, 6.0, 501)
    lz = rubber.closed_tube_axial_stretch(lam)
    lr = 1.0 / (lam * lz)
    residual = mu * (lam ** 2 - lr ** 2) - 2.0 * mu * (lz ** 2 - lr ** 2)
    assert np.max(np.abs(residual)) < 1e-9
    assert np.all(lz >= 1.0)  # end caps pull the tube longer, never shorter


def test_closed_tube_limit_is_0_750_mu_h_over_r_at_hoop_stretch_1_58():
    # casting-facts.md ("derived here"): P_max ~= 0.750 mu H/R at l_theta ~= 1.58,
    # l_z ~= 1.18; within 0.5 %, 0.02 and 0.02.
    lim = rubber.closed_tube_limit(1.0, 1.0)
    assert lim.has_peak
    assert lim.pressure == pytest.approx(0.750, rel=0.005)
    assert lim.stretch == pytest.approx(1.58, abs=0.02)
    assert float(rubber.closed_tube_axial_stretch(lim.stretch)) == pytest.approx(1.18,
                                                                                abs=0.02)


def _brute_closed_tube(lam: float) -> float:
    """P / (mu H/R) of a closed-end tube at hoop stretch ``lam``, computed independently:
    lz by brentq on s_theta = 2 s_z; P by virtual work on the wall energy
    W = mu/2 (l^2 + lz^2 + lr^2 - 3): P dV = dW over the wall volume, so per unit mu H/R,
    P = (dW/dl) / (l lz) with dW/dl = l - 1/(l^3 lz^2) at fixed lz."""

    def residual(lz: float) -> float:
        lr2 = 1.0 / (lam * lz) ** 2
        return (lam ** 2 - lr2) - 2.0 * (lz ** 2 - lr2)

    # residual >= 0 at lz = 1 and < 0 at lz = lam for lam > 1: the root is bracketed.
    lz = brentq(residual, 1.0, lam, xtol=1e-14)
    dw_dl = lam - 1.0 / (lam ** 3 * lz ** 2)
    return dw_dl / (lam * lz)


def test_closed_tube_limit_agrees_with_independent_brute_force():
    # The sheet marks this limit "derived here; check it in your own test": grid search then
    # bounded refinement of the independent curve above.
    grid = np.linspace(1.001, 3.0, 400)
    p = np.array([_brute_closed_tube(x) for x in grid])
    i = int(np.argmax(p))
    assert 0 < i < grid.size - 1
    best = minimize_scalar(lambda x: -_brute_closed_tube(x),
                           bounds=(grid[i - 1], grid[i + 1]), method="bounded",
                           options={"xatol": 1e-8})
    p_star, lam_star = -best.fun, best.x
    assert p_star == pytest.approx(0.750, rel=0.005)      # casting-facts.md
    assert lam_star == pytest.approx(1.58, abs=0.02)      # casting-facts.md
    lim = rubber.closed_tube_limit(1.0, 1.0)
    assert lim.pressure == pytest.approx(p_star, rel=1e-6)
    assert lim.stretch == pytest.approx(lam_star, abs=1e-3)
    # The whole curve matches too, not only its peak.
    assert rubber.closed_tube_pressure(grid, 1.0, 1.0) == pytest.approx(p, rel=1e-9)


def test_closed_tube_peak_sits_below_the_plane_strain_ceiling():
    # Letting the tube lengthen thins the wall, so it peaks (0.750) below the plane-strain
    # ceiling mu H/R (casting-facts.md: both rows).
    assert rubber.closed_tube_limit(1.0, 1.0).pressure < 1.0


@pytest.mark.parametrize("mu, h_over_r", [(0.5, 0.1), (3.0, 0.02)])
def test_closed_tube_limit_scales_with_mu_h_over_r(mu: float, h_over_r: float):
    # Thin-membrane pressure is linear in mu H/R (Treloar 1975 membrane theory).
    lim = rubber.closed_tube_limit(mu, h_over_r)
    unit = rubber.closed_tube_limit(1.0, 1.0)
    assert lim.pressure == pytest.approx(unit.pressure * mu * h_over_r, rel=1e-9)
    assert lim.stretch == pytest.approx(unit.stretch, abs=1e-9)
