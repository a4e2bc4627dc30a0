"""The ``sheet-bending`` motion model (a chambered finger with a bonded strain-limiting
sheet) against beam theory on meshes built with an independent library (manifold3d).

Reference: Euler-Bernoulli beam theory with the neutral axis held on the inextensible
sheet: curvature k = P A_p (z_p - z_s) / (E I_s), I_s the silicone's second moment about
the sheet line by the parallel-axis theorem (any strength-of-materials text, e.g. Gere &
Timoshenko, Mechanics of Materials); the incompressible neo-Hookean uniaxial nominal stress
(E/3)(l - 1/l^2) (Treloar, The Physics of Rubber Elasticity, 1975).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from soft_molds.analysis.motion import MotionKind, motion_curve, profile_of
from soft_molds.analysis.motion.beam import nominal_stress
from tests.meshes import box, from_manifold

E_MPA = 0.413                          # Shore A10 by Gent's relation (casting-facts.md)
B, H, LENGTH = 16.0, 14.0, 60.0        # bar width (y), height (z), length (x), mm; z from 0
CH_B, CH_H, CH_Z0 = 12.0, 8.0, 4.0     # chamber width, height, floor (on the bond face)
PITCH, DEPTH, COUNT, FIRST = 6.0, 4.0, 6, 12.0
SHEET_Z = 4.0                          # the sheet lies on the bond face, under the chambers


def _void_mask(mesh):
    c = mesh.triangles().mean(axis=1)
    tol = 1e-3
    return ((c[:, 0] > tol) & (c[:, 0] < LENGTH - tol) & (np.abs(c[:, 1]) < B / 2 - tol)
            & (c[:, 2] > tol) & (c[:, 2] < H - tol))


def _profile(sheet):
    body = box((0, -B / 2, 0), (LENGTH, B / 2, H))
    for i in range(COUNT):
        xa = FIRST + i * PITCH
        body = body - box((xa, -CH_B / 2, CH_Z0), (xa + DEPTH, CH_B / 2, CH_Z0 + CH_H))
    mesh = from_manifold(body)
    return profile_of(mesh, _void_mask(mesh), FIRST, FIRST + (COUNT - 1) * PITCH + DEPTH,
                      ["chambers"], sheet_yz_mm=sheet)


@pytest.fixture(scope="module")
def sheeted():
    return _profile((0.0, SHEET_Z))


def _about_sheet(z_s: float):
    """Closed form of the chamber section about the line z = z_s: (I_s, A_p, arm)."""
    def i_rect(w, z0, z1):  # integral of (z - z_s)^2 over a w wide strip z0..z1
        return w * ((z1 - z_s) ** 3 - (z0 - z_s) ** 3) / 3.0
    i_s = i_rect(B, 0.0, H) - i_rect(CH_B, CH_Z0, CH_Z0 + CH_H)
    return i_s, CH_B * CH_H, CH_Z0 + CH_H / 2 - z_s


def test_the_sheet_model_takes_a_finger_with_a_sheet_and_only_then(sheeted):
    cur = motion_curve(sheeted, E_MPA, 1.0, None)
    assert cur is not None and cur.model == "sheet-bending" and cur.kind is MotionKind.BENDING
    assert motion_curve(_profile(None), E_MPA, 1.0, None).model == "beam-bending"
    # A "sheet" above the chambers is not one this model knows: the plain beam takes it.
    assert motion_curve(_profile((0.0, H - 0.5)), E_MPA, 1.0, None).model == "beam-bending"


def test_small_pressure_curvature_is_beam_theory_about_the_sheet(sheeted):
    i_s, a_p, arm = _about_sheet(SHEET_Z)
    p_kpa = 0.01
    k = p_kpa / 1000.0 * a_p * arm / (E_MPA * i_s)
    cur = motion_curve(sheeted, E_MPA, p_kpa, None, steps=1)
    g = cur.inputs
    assert g.second_moment_mm4 == pytest.approx(i_s, rel=1e-9)
    assert g.lever_arm_mm == pytest.approx(arm, rel=1e-9)
    theta = math.radians(cur.points[-1].angle_deg)
    # Strips: I short by about (depth / 240)^2 / 12 per unit area (module docstring), so 1 %.
    assert theta / (COUNT * DEPTH) == pytest.approx(k, rel=0.01)
    assert math.radians(cur.linear_deg_per_kpa) * p_kpa == pytest.approx(k * COUNT * DEPTH,
                                                                          rel=1e-9)
    assert all(p.extension_mm == 0.0 for p in cur.points)


def test_the_sheet_bends_the_finger_more_than_no_sheet_at_small_pressure(sheeted):
    # Hand check of the direction: without the sheet the neutral axis is the centroid
    # (z_c below the chambers' centre by e); holding it at the sheet gives the ratio
    # (arm_s / I_s) / (e / I_c), which these closed forms make greater than one.
    i_s, a_p, arm = _about_sheet(SHEET_Z)
    a_sil = B * H - CH_B * CH_H
    z_c = (B * H * H / 2 - CH_B * CH_H * (CH_Z0 + CH_H / 2)) / a_sil
    i_c = i_s - a_sil * (z_c - SHEET_Z) ** 2
    e = CH_Z0 + CH_H / 2 - z_c
    ratio = (arm / i_s) / (e / i_c)
    with_sheet = motion_curve(sheeted, E_MPA, 0.01, None, steps=1).linear_deg_per_kpa
    without = motion_curve(_profile(None), E_MPA, 0.01, None, steps=1).linear_deg_per_kpa
    assert with_sheet / without == pytest.approx(ratio, rel=1e-6)
    assert ratio > 1.0


def test_at_large_pressure_each_section_is_in_neo_hookean_moment_balance(sheeted):
    # Independent of the solver: rebuild the moment about the sheet from the curve's
    # curvature with the neo-Hookean law on a fine grid of the closed-form section, and
    # compare with P A_p arm (equilibrium to the grid's accuracy).
    p_kpa = 40.0
    cur = motion_curve(sheeted, E_MPA, p_kpa, None, steps=8)
    theta = math.radians(cur.points[-1].angle_deg)
    k = theta / (COUNT * DEPTH)            # uniform across the chambers (same sections)
    i_s, a_p, arm = _about_sheet(SHEET_Z)
    z = np.linspace(0.0, H, 200001)
    width = np.where((z > CH_Z0) & (z < CH_Z0 + CH_H), B - CH_B, B)
    lam = 1.0 + k * (z - SHEET_Z)
    moment = np.trapezoid(nominal_stress(lam, E_MPA) * (z - SHEET_Z) * width, z)
    assert moment == pytest.approx(p_kpa / 1000.0 * a_p * arm, rel=2e-3)
    # Above the sheet every fibre stretches, where the neo-Hookean tangent (E/3)(1 + 2/l^3)
    # is below E: the finger bends more than the linear beam says.
    assert cur.points[-1].angle_deg > cur.linear_deg_per_kpa * p_kpa
