"""Reading a rounded polygon given as recipe fields: a list of corner points and one
rounding for every corner or one per corner. Shared by the body kinds drawn by a polygon
(``section`` in the y-z plane, ``plate`` in the x-y plane)."""

from __future__ import annotations

from ..errors import Problem
from .fields import MIN_SIZE_MM
from .outline import polygon_problems

Points = tuple[tuple[float, float], ...]


def per_point(pts: Points, round_mm: float | tuple[float, ...] | None) -> tuple[float, ...]:
    """One rounding per point: none given is 0 for every corner, one number applies to all."""
    if round_mm is None:
        return (0.0,) * len(pts)
    if isinstance(round_mm, float):
        return (round_mm,) * len(pts)
    return round_mm


def polygon_field_problems(pts: Points, round_mm: float | tuple[float, ...] | None, path: str,
                           line: int | None, points_key: str, round_key: str,
                           coords: str) -> list[Problem]:
    """What keeps ``pts`` (field ``path.points_key``) with ``round_mm`` (``path.round_key``)
    from a simple rounded polygon: too few points, a rounding list of the wrong length, or
    the polygon's own problems (a crossing, a rounding that does not fit), each naming the
    point. ``coords`` names the plane's coordinates in the messages ("[y, z]", "[x, y]")."""
    if len(pts) < 3:
        return [Problem(f"{path}.{points_key}", "has fewer than three points", line, len(pts),
                        f"at least three points {coords}")]
    if isinstance(round_mm, tuple) and len(round_mm) != len(pts):
        return [Problem(f"{path}.{round_key}", "does not give one rounding per point", line,
                        len(round_mm), f"one number, or a list of {len(pts)} (one per point "
                        f"of {points_key})")]
    found = polygon_problems(pts, per_point(pts, round_mm), MIN_SIZE_MM)
    return [Problem(f"{path}.{points_key}[{i}]", what.replace("[y, z]", coords), line,
                    list(pts[i]), allowed.replace("[y, z]", coords))
            for i, what, allowed in found]
