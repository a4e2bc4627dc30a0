"""Void kind ``chambers``: a row of box chambers along x joined by a round feed channel.

Inflating the chambers pushes their walls apart; a body stiffer on one side than the
other then bends. The feed channel runs along x from the inlet face to the centre of
the last chamber, so one core carries every chamber. Chamber sizes may differ along the
row (a list, or a linear grade), so a tapering body keeps an even wall over its chambers.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any, ClassVar

from ...errors import Problem
from ..contracts import Entry
from ..fields import Field, Grade, graded, integer, number, pair, per_item
from ..membranes import Membrane
from ..primitives import Primitive, RoundedBox, RoundedRod
from ..registry import void_kind

#: The per-chamber sizes, each one number, a list of one per chamber or a grade.
SIZES = ("depth_mm", "width_mm", "height_mm")

Size = float | tuple[float, ...] | Grade


@void_kind("chambers")
@dataclass(frozen=True)
class Chambers:
    """Chamber i spans x in [start + i*pitch, start + i*pitch + depth_i] (mm), is
    ``width_i`` along y and ``height_i`` along z, centred on ``center_mm`` = (y, z). Each
    size is one number for every chamber, a list with one per chamber (``width_mm: [8, 7,
    6, 5]``) or a linear grade from the first chamber to the last (``width_mm: {from: 8,
    to: 5}``). Without ``start_mm`` the row is centred on the body, moved away from the
    inlet when centring would leave less than ``checks.min_wall_mm`` beyond the socket."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        integer("count", "number of chambers", lo=1, hi=200),
        number("pitch_mm", "distance between neighbouring chamber starts along x (required "
               "when count is more than 1)", None),
        graded("depth_mm", "chamber extent along x", item="chamber"),
        graded("width_mm", "chamber extent along y", item="chamber"),
        graded("height_mm", "chamber extent along z", item="chamber"),
        number("corner_radius_mm", "rounding of chamber edges (sharp corners tear)", 0.5,
               lo=0.0, lo_open=False),
        number("start_mm", "x of the first chamber's near face; default centres the row, "
               "but starts it no nearer than socket_depth_mm + checks.min_wall_mm",
               None, lo=0.0, lo_open=False),
        pair("center_mm", "position (y, z) of the row's axis", (0.0, 0.0)),
        number("feed_diameter_mm", "diameter of the feed channel joining the chambers", 2.0),
        number("feed_start_mm", "x where the feed channel starts: 0 at the inlet face, or "
               "inside another void that feeds the row (then start_mm is required)", 0.0,
               lo=0.0, lo_open=False, echo_default=False),
    )
    count: int
    pitch_mm: float | None
    depth_mm: Size
    width_mm: Size
    height_mm: Size
    corner_radius_mm: float
    start_mm: float | None
    center_mm: tuple[float, float]
    feed_diameter_mm: float
    feed_start_mm: float = 0.0

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        n = v["count"]
        out = _size_problems(v, path, line)
        if n > 1 and v["pitch_mm"] is None:
            out.append(Problem(f"{path}.pitch_mm", f"is required for a row of {n} chambers",
                               line, None, "a number, 0.05 <= value <= 1000 mm (the count "
                               "is 1 only without it)"))
        if out:
            return out
        depth, width, height = (per_item(v[k], n) for k in SIZES)
        for i in range(n - 1):
            if depth[i] >= v["pitch_mm"]:
                sub = "depth_mm" if not isinstance(v["depth_mm"], tuple) else f"depth_mm[{i}]"
                out.append(Problem(f"{path}.{sub}", "leaves no wall between chambers" +
                                   (f" {i + 1} and {i + 2}" if sub != "depth_mm" else ""),
                                   line, depth[i],
                                   f"less than pitch_mm ({v['pitch_mm']:g} mm)"))
                break
        smallest = min(min(depth), min(width), min(height))
        if v["corner_radius_mm"] > 0.45 * smallest:
            out.append(Problem(f"{path}.corner_radius_mm", "is too large for the chamber", line,
                               v["corner_radius_mm"], f"at most {0.45 * smallest:g} mm"))
        # The channel must pierce flat chamber faces, or the core's boolean union grazes
        # a fillet and the join becomes a sliver.
        flat = min(min(width), min(height)) / 2.0 - v["corner_radius_mm"]
        if v["feed_diameter_mm"] / 2.0 > 0.9 * flat:
            out.append(Problem(f"{path}.feed_diameter_mm", "does not fit the chamber's flat face",
                               line, v["feed_diameter_mm"], f"at most {2 * 0.9 * flat:g} mm"))
        return out + _feed_problems(v, path, line)

    def sizes_mm(self, name: str) -> tuple[float, ...]:
        """One value per chamber (mm) of ``depth_mm``, ``width_mm`` or ``height_mm``."""
        return per_item(getattr(self, name), self.count)

    @property
    def _pitch(self) -> float:
        return self.pitch_mm if self.pitch_mm is not None and self.count > 1 else 0.0

    def row_length_mm(self) -> float:
        return (self.count - 1) * self._pitch + self.sizes_mm("depth_mm")[-1]

    def first_mm(self, body_length_mm: float) -> float:
        if self.start_mm is not None:
            return self.start_mm
        return (body_length_mm - self.row_length_mm()) / 2.0

    def after_socket(self, clear_from_mm: float, body_length_mm: float) -> Chambers:
        """This row with its default placement settled: centred on the body, or starting
        at ``clear_from_mm`` (the socket floor plus the least wall, mm) when centring
        would start it nearer the inlet. A row placed by ``start_mm`` stays as written."""
        if self.start_mm is not None or self.first_mm(body_length_mm) >= clear_from_mm:
            return self
        return replace(self, start_mm=clear_from_mm)

    def chamber_boxes(self, body_length_mm: float) -> tuple[RoundedBox, ...]:
        x0 = self.first_mm(body_length_mm)
        y, z = self.center_mm
        sizes = zip(*(self.sizes_mm(k) for k in SIZES))
        return tuple(
            RoundedBox((x0 + i * self._pitch + d / 2.0, y, z), (d, w, h), self.corner_radius_mm)
            for i, (d, w, h) in enumerate(sizes))

    def feed_channel(self, body_length_mm: float) -> RoundedRod:
        end = (self.first_mm(body_length_mm) + (self.count - 1) * self._pitch
               + self.sizes_mm("depth_mm")[-1] / 2)
        start = self.feed_start_mm
        return RoundedRod("x", start, end - start, self.center_mm, self.feed_diameter_mm / 2.0,
                          0.0)

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        return (*self.chamber_boxes(body_length_mm), self.feed_channel(body_length_mm))

    def entry(self) -> Entry:
        """(y, z) of the passage at the inlet face, its radius, and the x where it starts."""
        return Entry(self.center_mm, self.feed_diameter_mm / 2.0, self.feed_start_mm)

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


def _size_problems(v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
    """A size list whose length is not the count, or a grade over a single chamber."""
    n = v["count"]
    out = []
    for k in SIZES:
        s = v[k]
        if isinstance(s, tuple) and len(s) != n:
            out.append(Problem(f"{path}.{k}", f"gives {len(s)} sizes for {n} chambers", line,
                               list(s), f"one number, a list of {n} (one per chamber), or "
                               "{from: first, to: last}"))
        elif isinstance(s, Grade) and n == 1 and s.from_mm != s.to_mm:
            out.append(Problem(f"{path}.{k}", "grades the size of a single chamber", line,
                               {"from": s.from_mm, "to": s.to_mm},
                               "one number when count is 1"))
    return out


def _feed_problems(v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
    """A feed channel starting past the inlet face needs the row placed, and must reach the
    first chamber from the inlet side."""
    start = v["feed_start_mm"]
    if start == 0.0:
        return []
    if v["start_mm"] is None:
        return [Problem(f"{path}.start_mm", "is required when the feed channel starts past "
                        "the inlet face", line, None, f"a number, the x of the first "
                        f"chamber's near face, at least feed_start_mm ({start:g} mm)")]
    if start > v["start_mm"]:
        return [Problem(f"{path}.feed_start_mm", "starts the feed channel past the first "
                        "chamber", line, start, f"at most start_mm ({v['start_mm']:g} mm)")]
    return []
