"""Body kind ``revolved``: a profile of (x, radius) points turned about the x axis.

Bellows (accordion extenders), domes and cups. The profile starts on the flat inlet face
(x = 0) and x rises strictly from point to point, so the radius is a function of x: the
body has no overhang, and split through its axis (the parting plane the plan finds for it)
it has no undercut either, so both shell halves release. Profiles that fold back on
themselves are not supported for now.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import MIN_SIZE_MM, Field, integer, number, points, rounds
from ..primitives import Primitive, Revolved, profile_problems
from ..registry import body_kind

#: The fields of the bellows shortcut, all given together instead of ``profile_mm``.
BELLOWS_FIELDS = ("pleats", "pitch_mm", "inner_radius_mm", "outer_radius_mm",
                  "neck_length_mm", "tip_length_mm")


def bellows_profile(pleats: int, pitch_mm: float, inner_radius_mm: float,
                    outer_radius_mm: float, neck_length_mm: float, tip_length_mm: float
                    ) -> tuple[tuple[float, float], ...]:
    """The points of a bellows: a neck at the inner radius from the inlet face, ``pleats``
    V-shaped pleats (root to crest at the outer radius in half a pitch, back to a root in
    the other half), then a tip at the inner radius up to the flat far end (mm)."""
    pts = [(0.0, inner_radius_mm), (neck_length_mm, inner_radius_mm)]
    for k in range(pleats):
        x0 = neck_length_mm + k * pitch_mm
        pts += [(x0 + pitch_mm / 2.0, outer_radius_mm), (x0 + pitch_mm, inner_radius_mm)]
    pts.append((neck_length_mm + pleats * pitch_mm + tip_length_mm, inner_radius_mm))
    return tuple(pts)


@body_kind("revolved")
@dataclass(frozen=True)
class RevolvedBody:
    """Turned about the x axis: at each x in [0, length] the body is a disc of the
    profile's radius. ``profile_mm`` lists (x, radius) points from the flat inlet face
    (x = 0) to the far end, x rising strictly (no overhang, so the mold parts through the
    axis without undercut); a flat face closes the far end unless its radius is 0 (a tip on
    the axis). ``round_mm`` rounds every point's corner (the inlet and far rims included),
    or each by its own radius. Or leave out ``profile_mm`` and give the bellows fields: a
    neck, ``pleats`` V pleats between the inner and outer radius, and a tip. Neighbouring
    points keep one radius or differ by at least 1e-3 x sqrt(their x distance) mm (the
    kernel turns a slighter cone into a cylinder); a rounding that would pass within
    1e-6 mm of its corner, at a point on a straight edge, is left out."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        points("profile_mm", "points [x, radius] from the inlet face (x = 0) to the far end, "
               "x rising; derived from the bellows fields when left out"),
        rounds("round_mm", "rounding of every corner, or a list with one per point (0 = "
               "sharp; 0 at a tip on the axis)"),
        integer("pleats", "bellows: number of pleats", None, lo=1, hi=100),
        number("pitch_mm", "bellows: length of one pleat along x", None),
        number("inner_radius_mm", "bellows: radius of the neck, the tip and the pleat roots",
               None),
        number("outer_radius_mm", "bellows: radius of the pleat crests", None),
        number("neck_length_mm", "bellows: straight length from the inlet face to the first "
               "pleat", None),
        number("tip_length_mm", "bellows: straight length from the last pleat to the far end",
               None),
    )
    profile_mm: tuple[tuple[float, float], ...] | None
    round_mm: float | tuple[float, ...]
    pleats: int | None
    pitch_mm: float | None
    inner_radius_mm: float | None
    outer_radius_mm: float | None
    neck_length_mm: float | None
    tip_length_mm: float | None

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        given = [k for k in BELLOWS_FIELDS if v[k] is not None]
        if v["profile_mm"] is not None:
            return [Problem(f"{path}.{k}", "is given with profile_mm", line, v[k],
                            "either profile_mm or the bellows fields "
                            f"({', '.join(BELLOWS_FIELDS)})") for k in given] or \
                _profile_problems(v["profile_mm"], v["round_mm"], path, line)
        if not given:
            return [Problem(f"{path}.profile_mm", "is required", line, None,
                            "points [x, radius], or the bellows fields "
                            f"({', '.join(BELLOWS_FIELDS)})")]
        out = [Problem(f"{path}.{k}", "is required with the bellows fields", line, None,
                       "a number (see the recipe reference)")
               for k in BELLOWS_FIELDS if v[k] is None]
        if out:
            return out
        if v["outer_radius_mm"] <= v["inner_radius_mm"]:
            return [Problem(f"{path}.outer_radius_mm", "does not stand above the inner radius",
                            line, v["outer_radius_mm"],
                            f"more than inner_radius_mm ({v['inner_radius_mm']:g} mm)")]
        if not isinstance(v["round_mm"], float):
            return [Problem(f"{path}.round_mm", "is a list with the bellows fields", line,
                            list(v["round_mm"]), "one rounding for every corner")]
        pts = bellows_profile(*(v[k] for k in BELLOWS_FIELDS))
        bad = profile_problems(pts, per_point(pts, v["round_mm"]))
        return [Problem(f"{path}.round_mm", f"is too large for the pleats: point {i} {what}",
                        line, v["round_mm"], allowed) for i, what, allowed in bad[:1]]

    def profile(self) -> tuple[tuple[float, float], ...]:
        """The (x, radius) points, mm (as written, or the bellows shortcut's). ValueError
        when the fields give none (only a body that failed its cross-check)."""
        if self.profile_mm is not None:
            return self.profile_mm
        values = [getattr(self, k) for k in BELLOWS_FIELDS]
        if any(x is None for x in values):
            raise ValueError("neither profile_mm nor every bellows field is given")
        return bellows_profile(*values)

    def solid(self) -> Revolved:
        """The body as one primitive. ValueError for a profile that failed its checks."""
        pts = self.profile()
        rr = per_point(pts, self.round_mm)
        if len(rr) != len(pts) or profile_problems(pts, rr):
            raise ValueError("the profile is not valid (see cross_check)")
        return Revolved(pts, rr)

    def primitives(self) -> tuple[Primitive, ...]:
        return (self.solid(),)


def per_point(pts: tuple[tuple[float, float], ...], round_mm: float | tuple[float, ...]
              ) -> tuple[float, ...]:
    """One rounding per point: a single ``round_mm`` applies to every corner but a tip on
    the axis, which has none."""
    if not isinstance(round_mm, float):
        return round_mm
    return tuple(0.0 if r == 0.0 else round_mm for _, r in pts)


def _profile_problems(pts: tuple[tuple[float, float], ...], round_mm: float | tuple[float, ...],
                      path: str, line: int | None) -> list[Problem]:
    if not isinstance(round_mm, float) and len(round_mm) != len(pts):
        return [Problem(f"{path}.round_mm", "does not give one rounding per point", line,
                        len(round_mm), f"one number, or a list of {len(pts)} (one per point "
                        "of profile_mm)")]
    rr = per_point(pts, round_mm)
    out = []
    if pts[0][0] != 0.0:
        out.append(Problem(f"{path}.profile_mm[0]", "does not start on the inlet face", line,
                           list(pts[0]), "x = 0 for the first point (the flat inlet face)"))
    out += [Problem(f"{path}.profile_mm[{i}]", what, line, list(pts[i]), allowed)
            for i, what, allowed in profile_problems(pts, rr)]
    if out:
        return out
    for i in range(1, len(pts)):
        if pts[i][0] - pts[i - 1][0] < MIN_SIZE_MM:
            out.append(Problem(f"{path}.profile_mm[{i}]", f"lies within {MIN_SIZE_MM:g} mm of "
                               f"point {i - 1} along x", line, list(pts[i]),
                               f"x at least {pts[i - 1][0] + MIN_SIZE_MM:g} mm"))
    return out
