"""Unit conversions at the recipe's edges, held against NIST SP 811 (Appendix B.8:
1 psi = 6.894 757 kPa) and the working-pressure range of casting-facts.md."""

from __future__ import annotations

import pytest

from soft_molds.units import KPA_PER_PSI, kpa_to_psi, psi_to_kpa


def test_one_psi_is_6_894757_kpa_exactly():
    # NIST SP 811, Appendix B.8: 1 psi = 6.894 757 kPa (the factor as published).
    assert KPA_PER_PSI == 6.894757
    assert psi_to_kpa(1.0) == 6.894757


@pytest.mark.parametrize("psi", [0.0, 0.5, 1.0, 15.0, 29.0, 60.0, 300.0])
def test_psi_kpa_round_trip_returns_the_input(psi: float):
    # A conversion and its inverse (NIST SP 811 factor) must compose to the identity.
    assert kpa_to_psi(psi_to_kpa(psi)) == pytest.approx(psi, rel=1e-15, abs=1e-15)


@pytest.mark.parametrize("psi, kpa", [(10.0, 68.95), (20.0, 137.90)])
def test_common_working_range_10_to_20_psi_is_68_95_to_137_90_kpa(psi: float, kpa: float):
    # Common practice: cast bending actuators work at about 10-20 psi (casting-facts.md,
    # "69-138 kPa"); hand arithmetic with NIST SP 811: 10 x 6.894757 = 68.94757,
    # 20 x 6.894757 = 137.89514.
    assert round(psi_to_kpa(psi), 2) == pytest.approx(kpa, abs=1e-9)


def test_kpa_to_psi_of_100_kpa_is_14_5038_psi():
    # NIST SP 811 factor inverted by hand: 100 / 6.894757 = 14.50377... psi.
    assert kpa_to_psi(100.0) == pytest.approx(14.50377, abs=5e-6)
