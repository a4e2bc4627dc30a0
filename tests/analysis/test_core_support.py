"""The support check of a lost core: the net force of the liquid silicone, the supports,
and the one print's moment.

References: Archimedes' principle, F = (rho_fluid - rho_body) g V (standard gravity
9.80665 m/s2, CGPM 1901), with V the core's volume inside the body taken from the BRep
(the build's exact void volume: voids and socket plug); the section modulus of a solid
circle, Z = pi r^3 / 4 (elementary beam theory); a box cut by a plane, whose volume and
centroid are closed forms. The bundled lost-core recipes are built once per session.
"""

from __future__ import annotations

import math

import pytest
import trimesh
from conftest import built_steps, built_variant, recipe_path
from recipe_text import edit

from soft_molds.analysis.checks.core_support import _finding
from soft_molds.analysis.findings import Severity
from soft_molds.analysis.support import (
    HOLD_STRESS_MPA,
    CoreSupports,
    core_support,
    immersed,
    net_force_n,
    print_holding_nmm,
)
from soft_molds.meshdata import TriMesh
from soft_molds.recipe import recipe_from_text

G = 9.80665


def box_mesh(lo, hi) -> TriMesh:
    b = trimesh.creation.box(bounds=[lo, hi])
    return TriMesh(b.vertices, b.faces)


def test_the_net_force_is_archimedes_in_newtons():
    # 1 cm3 of wax (0.90) in silicone of 1.07 g/cm3: 0.17 g of lift, 0.17e-3 kg x g.
    assert net_force_n(1.07, 0.90, 1000.0) == pytest.approx(0.17e-3 * G, rel=1e-12)
    # A heavier core sinks: the sign turns.
    assert net_force_n(1.07, 9.5, 1000.0) == pytest.approx(-8.43e-3 * G, rel=1e-12)


def test_a_print_holds_its_stress_times_the_section_modulus():
    assert print_holding_nmm(2.0, 2.5) == pytest.approx(2.0 * math.pi * 2.5 ** 3 / 4.0)


def test_the_part_inside_the_body_is_cut_at_the_socket_face():
    # A 40 x 10 x 6 mm box from x = -10 to 30: 30 x 10 x 6 inside, centroid at x = 15.
    mesh = box_mesh((-10.0, -5.0, -3.0), (30.0, 5.0, 3.0))
    vol, c = immersed(mesh, 0.0, -1.0)
    assert vol == pytest.approx(1800.0, rel=1e-9)
    assert c == pytest.approx((15.0, 0.0, 0.0), abs=1e-9)
    # The same box through an end face at x = 20 (the body at x < 20): 30 x 10 x 6 again,
    # centroid at x = 5.
    vol, c = immersed(mesh, 20.0, 1.0)
    assert vol == pytest.approx(1800.0, rel=1e-9) and c[0] == pytest.approx(5.0)


@pytest.mark.parametrize(("name", "core_g_cm3", "print_r_mm"),
                         [("tray-lift-pad", 1.23, 2.5), ("tray-lift-pad-wax", 0.90, 2.5),
                          ("stem-ring-cuff-wax", 0.90, 2.0)])
def test_the_bundled_lost_cores_feel_archimedes_force(name, core_g_cm3, print_r_mm):
    molds = (built_steps(name).silicone if name.endswith("wax")
             else built_variant(name, "A"))
    (fig,) = molds.review.result(CoreSupports).cores
    rho_s = molds.recipe.material.silicone.density_g_cm3
    assert rho_s == 1.07  # Shore A10, from memory of typical data sheets (casting-facts)
    v = molds.volumes_mm3["void_set"]  # exact (BRep): voids and socket plug
    assert fig.immersed_mm3 == pytest.approx(v, rel=5e-3)
    want = (rho_s - core_g_cm3) * 1e3 * G * v * 1e-9
    assert fig.net_force_n == pytest.approx(want, rel=5e-3)
    assert fig.floats is (core_g_cm3 < rho_s)
    assert fig.moment_nmm == pytest.approx(abs(fig.net_force_n) * fig.lever_mm)
    if molds.recipe.core.magnets:
        # The dissolved pad's core is held by its magnet pair alone (core.support:
        # magnets), counted as its one support and not rated (the supplier's figure).
        assert [s.kind for s in fig.supports] == ["magnets"]
        assert fig.supports[0].radius_mm == pytest.approx(1.0)  # a 2 mm disc
        assert fig.holding_nmm is None
    else:
        assert len(fig.supports) == 1 and fig.supports[0].kind == "print"
        # One print of the socket's radius: it holds sigma pi r^3 / 4 (the section modulus
        # of a round bar, any strength-of-materials text); the moment is |F| times the lever.
        assert fig.holding_nmm == pytest.approx(
            HOLD_STRESS_MPA[fig.material] * math.pi * print_r_mm ** 3 / 4.0)
    (f,) = [f for f in molds.findings if f.check == "core-support"]
    assert f.severity is Severity.INFO and not fig.overloaded


def test_a_heavy_core_on_one_thin_print_is_warned():
    # The wax pad recipe cast in the alloy, with a 40 x 40 x 100 mm core: (1.07 - 9.5) g
    # x 160 cm3 = -13.2 N at 50 mm, 662 N mm, against 10 MPa x pi 2.5^3 / 4 = 123 N mm.
    text = edit(recipe_path("tray-lift-pad-wax").read_text(), "material: wax",
                "material: low-melt-alloy")
    r = recipe_from_text(text, "alloy.yaml", "alloy")
    fig = core_support(r, "core", box_mesh((-20.0, -20.0, -20.0), (100.0, 20.0, 20.0)), 0)
    assert fig.net_force_n == pytest.approx((1.07 - 9.5) * 1e3 * G * 160e-6, rel=1e-9)
    assert fig.lever_mm == pytest.approx(50.0)
    assert fig.overloaded
    f = _finding(fig)
    assert f.severity is Severity.WARNING and f.value > f.limit
    # A wax core of the same size floats with 0.27 N: 13 N mm against 6.1 N mm.
    wax = core_support(recipe_from_text(recipe_path("tray-lift-pad-wax").read_text(),
                                        "wax.yaml", "wax"),
                       "core", box_mesh((-20.0, -20.0, -20.0), (100.0, 20.0, 20.0)), 0)
    assert wax.floats and wax.overloaded


def test_a_pulled_core_gets_no_support_finding(finger):
    # The finger's core is printed in the mold's filament and pulled: nothing to weigh.
    assert not [f for f in finger.findings if f.check == "core-support"]
    assert finger.review.result(CoreSupports) is None


def test_supports_count_the_magnet_pair_beside_the_print():
    # core.support: both counts the print and the magnet pair, two supports spanning the
    # core (the one-print cantilever rating is then not applied).
    from soft_molds.analysis.support import supports_of

    text = edit(recipe_path("tray-lift-pad").read_text(), "support: magnets", "support: both")
    r = recipe_from_text(text, "both.yaml", "both")
    assert [s.kind for s in supports_of(r, 0)] == ["print", "magnets"]
    fig = core_support(r, "core", box_mesh((-20.0, -20.0, -3.0), (50.0, 20.0, 3.0)), 0)
    assert fig.holding_nmm is None and "spanning" in _finding(fig).message
    prints = recipe_from_text(edit(text, "support: both", "support: prints"), "p.yaml", "p")
    assert [s.kind for s in supports_of(prints, 0)] == ["print"]
