"""Pressurised walls of a void, as pure data for the pressure check.

A void kind lists the walls that inflation loads from one side only (walls between two
chambers of one row are pressed from both sides and left out). ``shape`` is ``bulge`` for a
wall that domes outward like a spherical cap (a flat chamber face; ``radius_mm`` is half
its smaller span, the radius of the sphere it approaches) or ``tube`` for a long round bore
with closed ends (``radius_mm`` its inner radius). ``at_mm`` is the wall's middle on the
void's surface and ``normal`` points out of the void into the wall (world frame, mm).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Membrane:
    group: str                          # e.g. "top wall", "bore wall": the report's rows
    shape: str                          # "bulge" or "tube"
    radius_mm: float
    at_mm: tuple[float, float, float]
    normal: tuple[float, float, float]
