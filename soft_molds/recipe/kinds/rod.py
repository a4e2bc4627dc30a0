"""Body kind ``rod``: a round rod along x with rounded ends (an extending or twisting limb)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import Field, number
from ..primitives import Primitive, RoundedRod
from ..registry import body_kind


@body_kind("rod")
@dataclass(frozen=True)
class Rod:
    """Axis along +x from the inlet face at x = 0 to x = length (mm), centred on y = z = 0.
    ``end_round_mm`` rounds both end rims (0 = flat ends; the inlet face keeps a flat
    centre of radius diameter/2 - end_round_mm)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("diameter_mm", "outer diameter"),
        number("length_mm", "length along x, from the inlet face"),
        number("end_round_mm", "rounding radius of both end rims", 1.0, lo=0.0, lo_open=False),
    )
    diameter_mm: float
    length_mm: float
    end_round_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        limit = min(v["diameter_mm"] / 2.0, v["length_mm"] / 2.0) * 0.9
        if v["end_round_mm"] > limit:
            return [Problem(f"{path}.end_round_mm", "is too large for the rod", line,
                            v["end_round_mm"],
                            f"at most {limit:g} mm (0.9 x the smaller of radius and half length; "
                            "the inlet needs a flat end face)")]
        return []

    def primitives(self) -> tuple[Primitive, ...]:
        return (RoundedRod("x", 0.0, self.length_mm, (0.0, 0.0), self.diameter_mm / 2.0,
                           self.end_round_mm),)
