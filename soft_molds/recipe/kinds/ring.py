"""Body kind ``ring``: an annulus, for cuffs that squeeze a stem, a hose or a stake, and for
gaskets.

A ring has no long axis. Its frame in the actuator frame every stage shares: the ring's axis
runs along z through (x, y) = (outer radius, 0), its height is centred on z = 0, so the body
lies at x in [0, outer diameter] and touches the inlet plane x = 0 along its outer face (the
line y = 0 there). A tube socket on the default inlet face therefore enters the outer face
radially, along +x towards the axis; the plane z = 0 across the axis halves the ring
through the socket's axis and its widest section.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import MIN_SIZE_MM, Field, number
from ..primitives import Primitive, RoundedRing
from ..registry import body_kind

#: Largest edge rounding as a share of the smaller of the radial wall and the height: a
#: rounding of half of it or more leaves no flat face (as ``bar`` keeps 0.45).
MAX_ROUND_SHARE = 0.45


@body_kind("ring")
@dataclass(frozen=True)
class Ring:
    """An annulus about an axis along z through (x, y) = (outer_diameter_mm / 2, 0), z in
    [-height/2, height/2]: x in [0, outer diameter], the outer face touching the inlet plane
    x = 0 along y = 0 (a socket there enters it radially). ``edge_round_mm`` rounds the four
    circular edges (mm)."""

    #: The outer face meets the inlet plane x = 0 along a line, not a flat: a socket's mouth
    #: lies on the curved face, a little inside that plane.
    CURVED_INLET_FACE: ClassVar[bool] = True
    #: No long axis: the motion models (beams along x) do not apply; the ``motion`` check
    #: says so.
    LONG_AXIS: ClassVar[bool] = False

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("inner_diameter_mm", "diameter of the bore"),
        number("outer_diameter_mm", "diameter of the outer face"),
        number("height_mm", "extent along the ring's axis (z)"),
        number("edge_round_mm", "rounding of the four circular edges", 1.0, lo=0.0,
               lo_open=False),
    )
    inner_diameter_mm: float
    outer_diameter_mm: float
    height_mm: float
    edge_round_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        inner, outer = v["inner_diameter_mm"], v["outer_diameter_mm"]
        least = inner + 2.0 * MIN_SIZE_MM
        if outer < least:
            return [Problem(f"{path}.outer_diameter_mm", "leaves no ring round the bore", line,
                            outer, f"more than inner_diameter_mm ({inner:g} mm): at least "
                            f"{least:g} mm")]
        limit = MAX_ROUND_SHARE * min((outer - inner) / 2.0, v["height_mm"])
        if v["edge_round_mm"] > limit:
            return [Problem(f"{path}.edge_round_mm", "is too large for the ring", line,
                            v["edge_round_mm"], f"at most {limit:g} mm ({MAX_ROUND_SHARE:g} x "
                            "the smaller of the radial wall and the height)")]
        return []

    def solid(self) -> RoundedRing:
        """The body as one primitive (mm, the frame of the module docstring)."""
        big = self.outer_diameter_mm / 2.0
        return RoundedRing((big, 0.0), self.inner_diameter_mm / 2.0, big,
                           -self.height_mm / 2.0, self.height_mm, self.edge_round_mm)

    def primitives(self) -> tuple[Primitive, ...]:
        return (self.solid(),)
