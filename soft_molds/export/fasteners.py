"""The clamp screws a mold needs: size, count and a length to buy.

A clamp screw passes through both shells (the stack, measured along the parting axis
from the lower shell's bench face to the upper shell's top face), a washer under its head
and one under the nut, the nut, and sticks out at least two thread pitches past it so the
whole nut is engaged (common practice). The length needed is rounded up to the next length
of the socket head cap screw series (ISO 4762; lengths from memory). All lengths in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .manifest import Manifest

#: Coarse thread pitch, ISO 261 (M3 0.5, M4 0.7, M5 0.8 mm).
PITCH_MM = {"M3": 0.5, "M4": 0.7, "M5": 0.8}
#: Hex nut height m (max), ISO 4032 (M3 2.4, M4 3.2 mm: casting-facts; M5 4.7 mm: from
#: memory).
NUT_MM = {"M3": 2.4, "M4": 3.2, "M5": 4.7}
#: Plain washer thickness, ISO 7089 (M3 0.5, M4 0.8, M5 1 mm; from memory).
WASHER_MM = {"M3": 0.5, "M4": 0.8, "M5": 1.0}
#: Nominal lengths of the ISO 4762 series up to 100 mm (from memory).
ISO_4762_LENGTHS_MM = (3, 4, 5, 6, 8, 10, 12, 16, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65,
                       70, 80, 90, 100)
#: Whole thread pitches the screw must stand out past the nut (common practice).
PROTRUDING_PITCHES = 2


@dataclass(frozen=True)
class ClampScrews:
    """``count`` screws of size ``bolt`` (e.g. "M4"), ``length_mm`` long under the head
    (ISO 4762 series; None when the series ends below ``needed_mm``), for a shell
    stack ``stack_mm`` high; ``needed_mm`` = stack + two washers + nut + two pitches,
    rounded up to 0.1 mm."""

    bolt: str
    count: int
    stack_mm: float
    needed_mm: float
    length_mm: int | None


def stack_height_mm(man: Manifest) -> float:
    """Height of the two shells clamped together (mm): along the pour ``up`` axis, from
    the lowest point of any shell to the highest."""
    axis = max(range(3), key=lambda i: abs(man.pour.up[i]))
    shells = [p for p in man.parts if p.role == "shell"]
    lo = min(p.bbox_mm[0][axis] for p in shells)
    hi = max(p.bbox_mm[1][axis] for p in shells)
    return hi - lo


def screw_length_needed_mm(bolt: str, stack_mm: float) -> float:
    """Shortest screw (mm under the head) that clamps ``stack_mm`` with two washers and a
    nut and stands out two pitches past the nut."""
    return (stack_mm + 2 * WASHER_MM[bolt] + NUT_MM[bolt]
            + PROTRUDING_PITCHES * PITCH_MM[bolt])


def series_length_mm(needed_mm: float) -> int | None:
    """The shortest length of the series at least ``needed_mm``; None beyond it (100 mm).
    M3 to M5 screws are stocked across these lengths (common practice)."""
    for n in ISO_4762_LENGTHS_MM:
        if n >= needed_mm - 1e-9:
            return n
    return None


def clamp_screws(man: Manifest) -> ClampScrews | None:
    """The screws ``man``'s mold is clamped with; None for ``clamp_bolt: none``."""
    bolt = man.clamp.bolt
    if bolt not in PITCH_MM or not man.clamp.holes_uv_mm:
        return None
    stack = stack_height_mm(man)
    needed = screw_length_needed_mm(bolt, stack)
    return ClampScrews(bolt, len(man.clamp.holes_uv_mm), round(stack, 1),
                       math.ceil(needed * 10 - 1e-9) / 10, series_length_mm(needed))
