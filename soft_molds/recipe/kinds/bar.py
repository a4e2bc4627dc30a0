"""Body kind ``bar``: a rectangular bar with rounded edges, the usual bending finger."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import Field, number
from ..primitives import Primitive, RoundedBox
from ..registry import body_kind


@body_kind("bar")
@dataclass(frozen=True)
class Bar:
    """Occupies x in [0, length], y in [-width/2, width/2], z in [-height/2, height/2] (mm);
    the inlet face is the end at x = 0."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("length_mm", "length along x, from the inlet face"),
        number("width_mm", "extent along y"),
        number("height_mm", "extent along z"),
        number("edge_radius_mm", "rounding of every edge and corner", 2.0, lo=0.0, lo_open=False),
    )
    length_mm: float
    width_mm: float
    height_mm: float
    edge_radius_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        smallest = min(v["length_mm"], v["width_mm"], v["height_mm"])
        # A fillet of half the smallest side or more leaves no flat face and fails in the kernel.
        limit = 0.45 * smallest
        if v["edge_radius_mm"] > limit:
            return [Problem(f"{path}.edge_radius_mm", "is too large for the bar", line,
                            v["edge_radius_mm"], f"at most {limit:g} mm (0.45 x smallest side)")]
        return []

    def primitives(self) -> tuple[Primitive, ...]:
        return (RoundedBox((self.length_mm / 2.0, 0.0, 0.0),
                           (self.length_mm, self.width_mm, self.height_mm), self.edge_radius_mm),)
