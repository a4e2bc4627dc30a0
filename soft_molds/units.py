"""Unit conversions used at the edges (recipe input, printed reports). Internally pressures
are kPa, lengths mm, masses g, volumes mm3."""

from __future__ import annotations

KPA_PER_PSI = 6.894757
"""1 psi (lbf/in2) = 6.894 757 kPa (NIST SP 811, Appendix B.8)."""

KPA_PER_INHG = 3.386389
"""1 inHg (conventional, 0 deg C) = 3.386 389 kPa (NIST SP 811, Appendix B.8)."""

MM3_PER_CM3 = 1000.0
"""1 cm3 = 1000 mm3 (by definition of the units)."""


def mm3_to_cm3(mm3: float) -> float:
    return mm3 / MM3_PER_CM3


def psi_to_kpa(psi: float) -> float:
    return psi * KPA_PER_PSI


def kpa_to_psi(kpa: float) -> float:
    return kpa / KPA_PER_PSI


def inhg_to_kpa(inhg: float) -> float:
    return inhg * KPA_PER_INHG
