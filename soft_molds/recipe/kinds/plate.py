"""Body kind ``plate``: a flat body drawn in the x-y plane and pushed along z.

Pads, trays and flat grippers cast face down: the outline is either a polygon with rounded
corners (``outline_mm``) or a hub with straight arms (``hub_diameter_mm`` and the arm
fields), exactly one of the two. The strain-limiting side is the bottom face (z low),
where the layered process lays its sheet.

Frame (mm): the outline is moved along x so that its leftmost point touches the inlet
plane x = 0 (the body lies at x >= 0); its y is as written (a polygon) or the hub's centre
lies on y = 0; the thickness is centred on z = 0, as a bar's height is, so z runs from
-thickness/2 to +thickness/2. A tube socket on the start face enters at the leftmost
point along +x: a polygon's left edge, or the tip of the arm pointing along -x (by default
the first arm points that way). A round tip or a rounded corner there is a curved face,
which the inlet check refuses as off the flat face; give the arm a flat tip
(``tip_round_mm`` below half the width, as the default a quarter of it) or the polygon a
straight left edge.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import MIN_SIZE_MM, Field, integer, number, points, rounds
from ..outline import PieceOutline, PlaneOutline, RoundedPolygon, hub_pieces
from ..polygon_fields import per_point, polygon_field_problems
from ..primitives import Primitive, Slab
from ..registry import body_kind

#: Most arms a hub takes: more leave arms too narrow to hold a chamber row (from memory:
#: grippers of this kind have two to six).
MAX_ARMS = 12

HUB_FIELDS = ("hub_diameter_mm", "arm_count", "arm_length_mm", "arm_width_mm",
              "tip_round_mm", "arm_angles_deg")
HUB_REQUIRED = ("arm_count", "arm_length_mm", "arm_width_mm")
#: The arms' tip rounding by default, as a share of their width: the tip keeps a flat
#: middle half as wide as the arm, where a socket can enter (a round tip gives it none).
TIP_ROUND_SHARE = 0.25
#: The angle (deg) of the first arm by default: pointing along -x, at the inlet face.
FIRST_ARM_DEG = 180.0


@body_kind("plate")
@dataclass(frozen=True)
class Plate:
    """A flat body: the outline in the x-y plane, moved so that its leftmost point lies on
    x = 0, pushed from z = -thickness/2 to +thickness/2 (mm). ``outline_mm`` gives a
    polygon [x, y] with ``corner_radius_mm`` roundings; ``hub_diameter_mm`` instead gives a
    hub centred on y = 0 with ``arm_count`` straight arms of ``arm_width_mm``, each tip
    ``arm_length_mm`` from the hub's centre, its tip corners rounded by ``tip_round_mm``
    (half the width: a round tip; default a quarter), pointing along ``arm_angles_deg``
    (counter-clockwise from +x; by default evenly spaced, the first along -x, towards the
    inlet face)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("thickness_mm", "extent along z (the bottom face is the strain-limiting side)"),
        points("outline_mm", "polygon outline: its corners [x, y] in order round it (either "
               "way); or give the hub fields instead", coords=("x", "y"), signed=True),
        rounds("corner_radius_mm", "polygon outline: rounding of every corner, or a list "
               "with one per point (default 0, sharp)", None),
        number("hub_diameter_mm", "hub outline: diameter of the central disc; or give "
               "outline_mm instead", None),
        integer("arm_count", "hub outline: number of arms", None, lo=1, hi=MAX_ARMS),
        number("arm_length_mm", "hub outline: distance from the hub's centre to each arm's "
               "tip", None),
        number("arm_width_mm", "hub outline: width of each arm", None),
        number("tip_round_mm", "hub outline: rounding of each arm's two tip corners (half "
               "the width: a round tip; default a quarter of the width, leaving a flat half "
               "for a socket)", None, lo=0.0,
               lo_open=False),
        Field("arm_angles_deg", "rounds", "hub outline: direction of each arm, counter-"
              "clockwise from +x, one per arm (default evenly spaced, the first along -x)",
              None, "deg", 0.0, 360.0, False, item="arm"),
    )
    thickness_mm: float
    outline_mm: tuple[tuple[float, float], ...] | None
    corner_radius_mm: float | tuple[float, ...] | None
    hub_diameter_mm: float | None
    arm_count: int | None
    arm_length_mm: float | None
    arm_width_mm: float | None
    tip_round_mm: float | None
    arm_angles_deg: float | tuple[float, ...] | None

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        if v["outline_mm"] is not None:
            # One line for every hub field given: the first, naming the others.
            given = [k for k in HUB_FIELDS if v[k] is not None]
            if given:
                more = f" (nor are {', '.join(given[1:])})" if given[1:] else ""
                return [Problem(f"{path}.{given[0]}", f"is not used with outline_mm{more}",
                                line, _plain(v[given[0]]), "only one way of giving the "
                                "outline: outline_mm with corner_radius_mm, or the hub fields")]
            return polygon_field_problems(v["outline_mm"], v["corner_radius_mm"], path, line,
                                          "outline_mm", "corner_radius_mm", "[x, y]")[:1]
        if v["hub_diameter_mm"] is None:
            return [Problem(f"{path}.outline_mm", "is required (or the hub fields)", line,
                            None, "outline_mm: corners [x, y]; or hub_diameter_mm with "
                            "arm_count, arm_length_mm and arm_width_mm")]
        out = [Problem(f"{path}.{k}", "is required with hub_diameter_mm", line, None,
                       _field(k).allowed()) for k in HUB_REQUIRED if v[k] is None]
        if v["corner_radius_mm"] is not None:
            out.append(Problem(f"{path}.corner_radius_mm", "is not used by a hub outline",
                               line, _plain(v["corner_radius_mm"]),
                               "tip_round_mm for the arms' tips"))
        return out or _hub_problems(v, path, line)

    def outline(self) -> PlaneOutline:
        """The outline in the body's frame (x, y, mm): leftmost point on x = 0. ValueError
        for fields that failed the cross-check."""
        if self.cross_check(dataclasses.asdict(self), "body", None):
            raise ValueError("the plate's outline fields are not valid (see cross_check)")
        if self.outline_mm is not None:
            rr = per_point(self.outline_mm, self.corner_radius_mm)
            shape = RoundedPolygon(self.outline_mm, rr)
            (x0, _), _ = shape.bounds()
            return RoundedPolygon(tuple((x - x0 + 0.0, y) for x, y in self.outline_mm), rr)
        hub = self._hub_at_origin()
        (x0, _), _ = hub.bounds()
        return hub.moved(-x0, 0.0)

    def _hub_at_origin(self) -> PieceOutline:
        """The hub outline about a centre at the origin."""
        d, w, length = self.hub_diameter_mm, self.arm_width_mm, self.arm_length_mm
        if d is None or w is None or length is None or not self.arm_count:
            raise ValueError("the plate's outline fields are not valid (see cross_check)")
        return PieceOutline(hub_pieces((0.0, 0.0), d / 2.0,
                                       tuple(math.radians(a) for a in self.angles_deg()),
                                       length, w, self.tip_round()))

    def angles_deg(self) -> tuple[float, ...]:
        """The arms' directions (deg, in [0, 360), ascending)."""
        return arm_angles(self.arm_count or 0, self.arm_angles_deg)

    def tip_round(self) -> float:
        """The arms' tip rounding (mm): as given, or TIP_ROUND_SHARE of the width (the tip
        keeps a flat middle a socket can enter)."""
        if self.tip_round_mm is not None:
            return self.tip_round_mm
        return TIP_ROUND_SHARE * (self.arm_width_mm or 0.0)

    def hub_center_mm(self) -> tuple[float, float] | None:
        """Where the hub's centre lies in the body's frame (x, y), or None for a polygon."""
        if self.outline_mm is not None:
            return None
        (x0, _), _ = self._hub_at_origin().bounds()
        return (-x0 + 0.0, 0.0)

    def solid(self) -> Slab:
        return Slab(self.outline(), -self.thickness_mm / 2.0, self.thickness_mm)

    def primitives(self) -> tuple[Primitive, ...]:
        return (self.solid(),)



def arm_angles(count: int, given: float | tuple[float, ...] | None) -> tuple[float, ...]:
    """The arms' directions (deg, brought into [0, 360), ascending): as given, or evenly
    spaced from FIRST_ARM_DEG."""
    if given is None:
        raw: tuple[float, ...] = tuple(FIRST_ARM_DEG + k * 360.0 / count for k in range(count))
    elif isinstance(given, float):
        raw = (given,)
    else:
        raw = given
    return tuple(sorted(a % 360.0 + 0.0 for a in raw))



def _hub_problems(v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
    """What keeps the hub fields from an outline: one problem, the first found."""
    radius, width, length = v["hub_diameter_mm"] / 2.0, v["arm_width_mm"], v["arm_length_mm"]
    count, given = v["arm_count"], v["arm_angles_deg"]
    if width > 2.0 * radius - 2.0 * MIN_SIZE_MM:
        return [Problem(f"{path}.arm_width_mm", "is not narrower than the hub", line, width,
                        f"less than hub_diameter_mm ({2.0 * radius:g} mm)")]
    tip = TIP_ROUND_SHARE * width if v["tip_round_mm"] is None else v["tip_round_mm"]
    if tip > width / 2.0:
        return [Problem(f"{path}.tip_round_mm", "is more than half the arm's width", line, tip,
                        f"at most arm_width_mm / 2 ({width / 2.0:g} mm)")]
    reach = math.sqrt(radius * radius - width * width / 4.0)
    least = reach + tip + MIN_SIZE_MM
    if length < least:
        return [Problem(f"{path}.arm_length_mm", "leaves the arms no straight side beyond "
                        "the hub", line, length, f"at least {least:.3f} mm (where the arm's "
                        "side leaves the hub circle, plus tip_round_mm)")]
    if given is not None:
        n = 1 if isinstance(given, float) else len(given)
        if n != count:
            return [Problem(f"{path}.arm_angles_deg", "does not give one angle per arm", line,
                            _plain(given), f"a list of arm_count ({count}) angles")]
    angles = arm_angles(count, given)
    # Neighbouring arms' sides meet the hub circle half_gap either side of their axes: a
    # hub arc of at least MIN_SIZE_MM must remain between them. Beyond the circle two arms
    # whose sides clear there cannot meet (their strips cross only within the disc).
    half_gap = math.degrees(math.asin(width / 2.0 / radius))
    need = 2.0 * half_gap + math.degrees(MIN_SIZE_MM / radius)
    for i in range(count if count > 1 else 0):
        a, b = angles[i], angles[(i + 1) % count] + (360.0 if i + 1 == count else 0.0)
        if b - a < need:
            field = "arm_angles_deg" if given is not None else "arm_count"
            return [Problem(f"{path}.{field}", f"makes the arms at {a:g} and {b % 360.0:g} "
                            f"deg overlap on the hub ({b - a:.3g} deg apart)", line,
                            _plain(given) if given is not None else count,
                            f"arms at least {need:.3g} deg apart (arm_width_mm "
                            f"{width:g} on a hub of {2.0 * radius:g} mm)")]
    return []


def _field(name: str) -> Field:
    return next(f for f in Plate.FIELDS if f.name == name)


def _plain(value: object) -> object:
    if isinstance(value, tuple):
        return [_plain(x) for x in value]
    return value
