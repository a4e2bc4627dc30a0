"""Void kind ``bore``: one straight round bore along x (an extending or bulging tube)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..contracts import Entry
from ..fields import Field, number, pair
from ..membranes import Membrane
from ..primitives import Primitive, RoundedRod
from ..registry import void_kind


@void_kind("bore")
@dataclass(frozen=True)
class Bore:
    """Spans x in [start, start + length] (mm) with its axis at ``center_mm`` = (y, z);
    both ends are rounded with ``end_round_mm`` (the near end lies inside the inlet
    socket, so only the far end's rounding shows in the cast). A bore may be wider than
    the socket (a thin tube into a fat bore) when it holds the socket's whole section and
    starts past the inlet face, inside the socket; whether its core still comes out
    through the socket is the core-extraction check's to say."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("diameter_mm", "bore diameter"),
        number("length_mm", "bore length along x"),
        number("start_mm", "x where the bore starts (inside the inlet socket)", 0.0,
               lo=0.0, lo_open=False),
        pair("center_mm", "position (y, z) of the bore axis", (0.0, 0.0)),
        number("end_round_mm", "rounding of the far end (a hemisphere at diameter/2)", 0.0,
               lo=0.0, lo_open=False),
    )
    diameter_mm: float
    length_mm: float
    start_mm: float
    center_mm: tuple[float, float]
    end_round_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        limit = min(v["diameter_mm"] / 2.0, v["length_mm"] / 2.0)
        if v["end_round_mm"] > limit:
            return [Problem(f"{path}.end_round_mm", "is too large for the bore", line,
                            v["end_round_mm"], f"at most {limit:g} mm")]
        return []

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        return (RoundedRod("x", self.start_mm, self.length_mm, self.center_mm,
                           self.diameter_mm / 2.0, self.end_round_mm),)

    def entry(self) -> Entry:
        return Entry(self.center_mm, self.diameter_mm / 2.0, self.start_mm)

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """The tube wall at mid-length, probed at 8 points round the bore (the check takes
        the thinnest), and the far end cap."""
        r = self.diameter_mm / 2.0
        y, z = self.center_mm
        xm = self.start_mm + self.length_mm / 2.0
        out = []
        for k in range(8):
            a = k * math.pi / 4.0
            n = (0.0, round(math.cos(a), 12) + 0.0, round(math.sin(a), 12) + 0.0)
            out.append(Membrane("bore wall", "tube", r, (xm, y + r * n[1], z + r * n[2]), n))
        out.append(Membrane("end cap", "bulge", r, (self.start_mm + self.length_mm, y, z),
                            (1.0, 0.0, 0.0)))
        return tuple(out)
