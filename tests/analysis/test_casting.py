"""Casting quantities, print estimates and the pressure check on built mold sets (demo
scenario recipes). Sources beside each number."""

from __future__ import annotations

import math

import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds import build
from soft_molds.analysis.casting import (
    hollow_cylinder_mm3,
    print_estimate,
    round_up,
    silicone_quantities,
)
from soft_molds.analysis.rubber import gent_modulus_mpa, thick_sphere_limit
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.materials import grades


def test_hollow_cylinder_volume_mass_and_an_even_split():
    # OD 20, ID 14, L 100 mm: pi/4 (20^2 - 14^2) 100 = 16 022.1 mm3 = 16.022 cm3 (closed form)
    v = hollow_cylinder_mm3(20.0, 14.0, 100.0)
    assert v / 1000.0 == pytest.approx(16.022, abs=5e-4)
    # at A20's 1.08 g/cm3 (from memory, typical data sheets), no waste: 17.304 g, split 1:1
    q = silicone_quantities(v, 0.0, grades()["A20"], 0.0, 0.1)
    assert q.mixed_g == pytest.approx(16.0221 * 1.08, rel=1e-4)
    a, b = q.portions
    assert (a.what, b.what) == ("A20 part A", "A20 part B")
    # each half 8.652 g, rounded up to the scale's 0.1 g (hand arithmetic)
    assert a.grams == b.grams == pytest.approx(8.7)
    assert a.ml == pytest.approx(16.0221 / 2, rel=1e-4)


def test_weights_round_up_to_the_scale_and_never_short():
    assert round_up(7.5825, 0.1) == pytest.approx(7.6)
    assert round_up(7.6, 0.1) == pytest.approx(7.6)  # exact multiple: no extra step
    assert round_up(7.6001, 1.0) == pytest.approx(8.0)


def test_waste_allowance_scales_the_mix():
    g = grades()["A10"]
    q0 = silicone_quantities(10000.0, 500.0, g, 0.0, 0.01)
    q15 = silicone_quantities(10000.0, 500.0, g, 15.0, 0.01)
    assert q15.mixed_mm3 == pytest.approx(10500.0 * 1.15)
    assert q15.mixed_g == pytest.approx(q0.mixed_g * 1.15)


def test_quantities_of_a_bundled_recipe_are_its_volumes_times_density_plus_waste(finger):
    man = finger.manifest().to_json()
    cast = man["silicone_volume_mm3"]
    c = man["casting"]
    assert c["cast_volume_mm3"] == pytest.approx(cast)
    # fill above the cavity, closed form from the manifest's openings: the sprue rises
    # from its mouth to the top face with a funnel 0.6 of that rise deep (a frustum), each
    # vent is a cylinder up to the top face
    top = max(p["bbox_mm"][1][2] for p in man["parts"] if p["role"] == "shell")
    fill = 0.0
    for op in man["pour"]["openings"]:
        r, rise = op["diameter_mm"] / 2.0, top - op["at_mm"][2]
        if op["kind"] == "sprue":
            rf, depth = man["pour"]["funnel_diameter_mm"] / 2.0, 0.6 * rise
            frustum = math.pi * depth / 3 * (rf * rf + rf * r + r * r)
            fill += math.pi * r * r * (rise - depth) + frustum
        else:
            fill += math.pi * r * r * rise
    assert c["fill_volume_mm3"] == pytest.approx(fill, abs=2e-3)  # manifest rounds to 1e-3
    # mass = (cast + fill) x 1.07 g/cm3 (A10) x 1.15 (15 % waste), split 1:1, rounded up
    mass = (cast + fill) / 1000.0 * 1.07 * 1.15
    assert c["mixed_mass_g"] == pytest.approx(mass, abs=2e-3)
    half = math.ceil(round(mass / 2 / 0.1, 6)) * 0.1
    assert [p["g"] for p in c["portions"]] == pytest.approx([half, half])


def test_print_estimate_is_walls_plus_infill_at_filament_density():
    import trimesh
    from meshes import from_trimesh

    # 40 mm cube: 64 000 mm3, surface 9600 mm2; 1.6 mm walls -> 15 360 mm3 solid, the rest
    # 48 640 mm3 at 20 % -> 25 088 mm3 of PLA at 1.24 g/cm3 = 31.11 g (hand arithmetic)
    cube = from_trimesh(trimesh.creation.box(extents=(40.0, 40.0, 40.0)))
    pe = print_estimate("block", cube, 64000.0, 1.6, 20.0, 1.24)
    assert pe.mass_g == pytest.approx(25088.0 / 1000 * 1.24, rel=1e-9)


def test_finger_top_wall_limit_pressure_is_the_thick_sphere_of_its_numbers(finger):
    # The finger's chambers (5 mm deep along x, 8 mm high, centre 1 mm up) leave a top wall
    # of 7 - (1 + 4) = 2 mm (closed form); the wall bulges over half its 5 mm span, R = 2.5.
    # Shore A10 -> E by Gent (1958), mu = E / 3 (Treloar): thick sphere 2.5 -> 4.5 mm.
    walls = {w["group"]: w for w in finger.manifest().to_json()["pressure"]["walls"]}
    top = walls["top wall"]
    assert top["thickness_mm"] == pytest.approx(2.0, abs=1e-6)
    assert top["span_mm"] == pytest.approx(5.0)
    mu = gent_modulus_mpa(10.0) / 3.0
    expected = thick_sphere_limit(mu, 2.5, 4.5).pressure * 1000.0
    assert top["limit_kpa"] == pytest.approx(expected, abs=0.05)
    # the recipe's 60 kPa: margin = limit / 60
    assert top["margin"] == pytest.approx(expected / 60.0, abs=1e-3)


@pytest.fixture(scope="module")
def overinflated():
    """The test finger at 25 psi (172 kPa): past the estimated limit of its 2 mm walls."""
    text = edit(FINGER_TEXT, "checks:\n", "inflate:\n  working_pressure_psi: 25\nchecks:\n")
    return build(recipe_from_text(text, "hot.yaml", "hot"))


def test_a_working_pressure_past_the_limit_warns_that_walls_balloon(overinflated):
    warn = [f for f in overinflated.warnings if f.check == "pressure"]
    assert warn and all("balloons below the working pressure" in f.message for f in warn)
    # 25 psi x 6.894757 kPa/psi (NIST SP 811) = 172.4 kPa, every wall group below it
    assert all(f.limit == pytest.approx(172.369, abs=1e-3) for f in warn)
    assert all(f.value < f.limit for f in warn)
    assert "not a rating" in warn[0].message
