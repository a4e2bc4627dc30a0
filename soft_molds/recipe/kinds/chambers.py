"""Void kind ``chambers``: a row of box chambers along x joined by a round feed channel.

Inflating the chambers pushes their walls apart; a body stiffer on one side than the
other then bends. The feed channel runs along x from the inlet face to the centre of
the last chamber, so one core carries every chamber.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..contracts import Entry
from ..fields import Field, integer, number, pair
from ..membranes import Membrane
from ..primitives import Primitive, RoundedBox, RoundedRod
from ..registry import void_kind


@void_kind("chambers")
@dataclass(frozen=True)
class Chambers:
    """Chamber i spans x in [start + i*pitch, start + i*pitch + depth] (mm), is ``width``
    along y and ``height`` along z, centred on ``center_mm`` = (y, z)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        integer("count", "number of chambers", lo=1, hi=200),
        number("pitch_mm", "distance between neighbouring chamber starts along x"),
        number("depth_mm", "chamber extent along x"),
        number("width_mm", "chamber extent along y"),
        number("height_mm", "chamber extent along z"),
        number("corner_radius_mm", "rounding of chamber edges (sharp corners tear)", 0.5,
               lo=0.0, lo_open=False),
        number("start_mm", "x of the first chamber's near face; default centres the row",
               None, lo=0.0, lo_open=False),
        pair("center_mm", "position (y, z) of the row's axis", (0.0, 0.0)),
        number("feed_diameter_mm", "diameter of the feed channel joining the chambers", 2.0),
    )
    count: int
    pitch_mm: float
    depth_mm: float
    width_mm: float
    height_mm: float
    corner_radius_mm: float
    start_mm: float | None
    center_mm: tuple[float, float]
    feed_diameter_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        out = []
        if v["depth_mm"] >= v["pitch_mm"]:
            out.append(Problem(f"{path}.depth_mm", "leaves no wall between chambers", line,
                               v["depth_mm"], f"less than pitch_mm ({v['pitch_mm']:g} mm)"))
        smallest = min(v["depth_mm"], v["width_mm"], v["height_mm"])
        if v["corner_radius_mm"] > 0.45 * smallest:
            out.append(Problem(f"{path}.corner_radius_mm", "is too large for the chamber", line,
                               v["corner_radius_mm"], f"at most {0.45 * smallest:g} mm"))
        # The channel must pierce flat chamber faces, or the core's boolean union grazes
        # a fillet and the join becomes a sliver.
        flat = min(v["width_mm"], v["height_mm"]) / 2.0 - v["corner_radius_mm"]
        if v["feed_diameter_mm"] / 2.0 > 0.9 * flat:
            out.append(Problem(f"{path}.feed_diameter_mm", "does not fit the chamber's flat face",
                               line, v["feed_diameter_mm"], f"at most {2 * 0.9 * flat:g} mm"))
        return out

    def row_length_mm(self) -> float:
        return (self.count - 1) * self.pitch_mm + self.depth_mm

    def first_mm(self, body_length_mm: float) -> float:
        if self.start_mm is not None:
            return self.start_mm
        return (body_length_mm - self.row_length_mm()) / 2.0

    def chamber_boxes(self, body_length_mm: float) -> tuple[RoundedBox, ...]:
        x0 = self.first_mm(body_length_mm)
        y, z = self.center_mm
        return tuple(
            RoundedBox((x0 + i * self.pitch_mm + self.depth_mm / 2.0, y, z),
                       (self.depth_mm, self.width_mm, self.height_mm), self.corner_radius_mm)
            for i in range(self.count))

    def feed_channel(self, body_length_mm: float) -> RoundedRod:
        end = self.first_mm(body_length_mm) + (self.count - 1) * self.pitch_mm + self.depth_mm / 2
        return RoundedRod("x", 0.0, end, self.center_mm, self.feed_diameter_mm / 2.0, 0.0)

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        return (*self.chamber_boxes(body_length_mm), self.feed_channel(body_length_mm))

    def entry(self) -> Entry:
        """(y, z) of the passage at the inlet face, its radius, and the x where it starts."""
        return Entry(self.center_mm, self.feed_diameter_mm / 2.0, 0.0)

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """Top, bottom and side walls of every chamber, and the outer end walls of the
        first and last chamber (the walls between chambers are pressed from both sides)."""
        out = []
        boxes = self.chamber_boxes(body_length_mm)
        for i, b in enumerate(boxes):
            (cx, cy, cz), (dx, dy, dz) = b.center_mm, b.size_mm
            faces = [("top wall", (0, 0, 1), min(dx, dy)), ("bottom wall", (0, 0, -1), min(dx, dy)),
                     ("side wall", (0, 1, 0), min(dx, dz)), ("side wall", (0, -1, 0), min(dx, dz))]
            if i == 0:
                faces.append(("end wall", (-1, 0, 0), min(dy, dz)))
            if i == len(boxes) - 1:
                faces.append(("end wall", (1, 0, 0), min(dy, dz)))
            for group, n, span in faces:
                at = (cx + n[0] * dx / 2, cy + n[1] * dy / 2, cz + n[2] * dz / 2)
                out.append(Membrane(group, "bulge", span / 2.0, at,
                                    (float(n[0]), float(n[1]), float(n[2]))))
        return tuple(out)
