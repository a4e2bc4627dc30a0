"""Void kind ``slits``: gaps cut from the body's outer top face between neighbouring
chambers, so each chamber stands as its own pair of walls.

A chambered finger with slits bends further for the same pressure and strains its
silicone less: the walls between chambers no longer have to stretch the solid top layer
above them, they only tilt apart. The slits are open to the outside (no pressure in them)
and are formed by thin fins of the upper mold shell, which come out with that shell.

Frame (mm, deg): x along the body from the inlet face, y across, z up. ``face: top`` is the
body's +z face, the side opposite the strain-limiting bottom the finger bends towards; the
parting plane must be normal to z and below every slit, so the fins belong to the upper
shell and leave along its pull, +z.

Unlike a cavity void a slit is not part of a core: the recipe reader keeps it out of
``Recipe.voids`` (it must be listed after them) in ``Recipe.outer``, and the geometry stage
removes its :class:`~soft_molds.recipe.cuts.SlitCut` from the body before the cores.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any, ClassVar

import numpy as np

from ...errors import Problem
from ..contracts import BodyKind, Entry
from ..cuts import SlitCut
from ..fields import Field, choice, number
from ..membranes import Membrane
from ..primitives import Primitive, union_sdf
from ..registry import void_kind
from .chambers import Chambers
from .channels import Channels, point_along

#: Body kinds a slit row can be cut into: a flat top face over the whole row.
BODY_KINDS = ("bar",)

#: How far a slit through both side faces runs past each of them (mm), so the cut never
#: ends on the body's own side face.
THROUGH_MM = 1.0


#: Spacing of the samples on a slit's surface when it is measured against other voids (mm).
SAMPLE_SPACING_MM = 0.25

#: Mold kept on either side of a vent's mouth on the top land between two slits (mm): a
#: vent that reaches a slit would cut into the fin beside it.
LAND_MARGIN_MM = 0.5


@void_kind("slits")
@dataclass(frozen=True)
class Slits:
    """One slit centred in each gap between neighbouring chambers of the recipe's chamber
    row (count - 1 slits), cut from the ``face`` down by ``depth_mm``: ``width_mm`` along x
    at the face, narrowing by ``draft_deg`` per side towards the bottom, whose two corners
    are rounded with ``round_mm``; through both side faces of the body, or ``span_mm``
    along y centred on the row's axis."""

    #: Cut from the outside, not a cavity: kept out of the cores and the pressure.
    OUTER: ClassVar[bool] = True

    FIELDS: ClassVar[tuple[Field, ...]] = (
        choice("face", "the face the slits are cut from: top is +z, the side opposite the "
               "strain-limiting bottom the finger bends towards", ("top",), "top"),
        number("depth_mm", "how deep each slit reaches into the body, from the face"),
        number("width_mm", "width of each slit along x, at the face"),
        number("round_mm", "rounding of the slit's two bottom corners", 0.5, lo=0.0,
               lo_open=False),
        number("draft_deg", "draft of the slit's side walls, so the mold's fins leave along "
               "its pull (common practice 0.5-2 deg)", 1.0, unit="deg", lo=0.0, hi=10.0,
               lo_open=False),
        number("span_mm", "extent along y centred on the chamber row's axis; default runs "
               "through both side faces of the body", None),
    )
    face: str
    depth_mm: float
    width_mm: float
    round_mm: float
    draft_deg: float
    span_mm: float | None

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        lean = math.tan(math.radians(v["draft_deg"]))
        bottom = v["width_mm"] - 2.0 * v["depth_mm"] * lean
        if bottom <= 0.0:
            most = math.degrees(math.atan(v["width_mm"] / (2.0 * v["depth_mm"])))
            return [Problem(f"{path}.draft_deg", "closes the slit before its bottom", line,
                            v["draft_deg"], f"less than {most:.3g} deg for this width_mm "
                            "and depth_mm")]
        corner = math.pi / 2.0 + math.radians(v["draft_deg"])
        tangent = v["round_mm"] / math.tan(corner / 2.0)
        limit = 0.45 * min(bottom, v["depth_mm"])
        if tangent > limit:
            most = limit * math.tan(corner / 2.0)
            return [Problem(f"{path}.round_mm", "is too large for the slit", line,
                            v["round_mm"], f"at most {most:.3g} mm (its rounding may take "
                            "0.45 x the slit's bottom width or depth)")]
        return []

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        """No cavity: a slit is cut from the outside (see :meth:`cuts`)."""
        return ()

    def entry(self) -> Entry:
        """A slit has no passage from the tube socket; the reader never asks for one (it
        keeps slits out of ``Recipe.voids``)."""
        raise TypeError("a slit is cut from the outside and has no entry")

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """None of its own: nothing inflates a slit."""
        return ()

    def cuts(self, body: BodyKind, voids: Sequence[object]) -> tuple[SlitCut, ...]:
        """One cut per gap of the chamber row (x order), for a body and row that passed
        :meth:`fit`."""
        net = _network(voids)
        if net is not None:
            return self._network_cuts(body, net)
        row = _row(voids)
        if row is None:
            return ()
        (lo, hi) = _body_bounds(body)
        cy = row.center_mm[0]
        if self.span_mm is None:
            span, cy = hi[1] - lo[1] + 2.0 * THROUGH_MM, (lo[1] + hi[1]) / 2.0
        else:
            span = self.span_mm
        return tuple(SlitCut(x, cy, span, hi[2], self.depth_mm, self.width_mm, self.round_mm,
                             self.draft_deg)
                     for x, _ in gaps(row, hi[0] - lo[0]))

    def fit(self, body: BodyKind, voids: Sequence[object], min_wall_mm: float,
            parting: tuple[str, float | None], process_kind: str, vent_mm: float,
            path: str) -> list[Problem]:
        """Problems of this slit row in this recipe: the body kind, the chamber row it sits
        in, the walls it leaves to the chambers and the feed channel, the top land between
        two slits (it must hold a vent of ``vent_mm``), the span, the parting plane its fins
        need and the process."""
        net = _network(voids)
        if net is not None:
            return self._fit_network(body, net, min_wall_mm, process_kind, path)
        kind = getattr(body, "KIND", "?")
        if kind not in BODY_KINDS:
            return [Problem(f"{path}.kind", f"is cut into a {' or '.join(BODY_KINDS)} body "
                            "only", None, kind, "body.kind: " + ", ".join(BODY_KINDS))]
        rows = [v for v in voids if isinstance(v, Chambers)]
        if len(rows) != 1 or rows[0].count < 2:
            got = (f"{len(rows)} chamber rows" if len(rows) != 1
                   else "a row of 1 chamber")
            return [Problem(f"{path}.kind", "needs one chamber row to sit between", None, got,
                            "exactly one void of kind chambers with count 2 or more")]
        row = rows[0]
        lo, hi = _body_bounds(body)
        out = []
        for i, (_x, gap) in enumerate(gaps(row, hi[0] - lo[0])):
            most = gap - 2.0 * min_wall_mm
            if most < 0.05:
                out.append(Problem(f"{path}.kind", f"finds no room between chambers {i + 1} "
                                   f"and {i + 2}: the gap between them is {gap:g} mm", None,
                                   "slits", "a chamber row whose gaps (pitch_mm less the "
                                   "depth_mm of a chamber) are wider than 2 x "
                                   f"checks.min_wall_mm ({2.0 * min_wall_mm:g} mm)"))
                break
            if self.width_mm > most:
                out.append(Problem(f"{path}.width_mm", f"leaves less than checks.min_wall_mm "
                                   f"({min_wall_mm:g} mm) to chambers {i + 1} and {i + 2} "
                                   f"(the gap between them is {gap:g} mm)", None,
                                   self.width_mm, f"at most {most:.3g} mm"))
                break
        # Each stretch of top face between two slits is a ceiling of its own and gets a
        # vent: its mouth must lie on the land with LAND_MARGIN_MM of mold to either slit.
        pitch = row.pitch_mm or 0.0
        land = pitch - self.width_mm
        if row.count > 2 and land < vent_mm + 2.0 * LAND_MARGIN_MM:
            out.append(Problem(f"{path}.width_mm", f"leaves {land:.3g} mm of top face between "
                               f"two slits, too little for a {vent_mm:g} mm vent", None,
                               self.width_mm, f"at most {pitch - vent_mm - 2 * LAND_MARGIN_MM:.3g}"
                               " mm (pitch_mm less mold.vent_diameter_mm less "
                               f"2 x {LAND_MARGIN_MM:g} mm)"))
        cz = row.center_mm[1]
        floor = cz + row.feed_diameter_mm / 2.0 + min_wall_mm
        deepest = hi[2] - floor
        if self.depth_mm > deepest:
            out.append(Problem(f"{path}.depth_mm", "leaves less than checks.min_wall_mm "
                               f"({min_wall_mm:g} mm) above the feed channel (its top at "
                               f"z = {cz + row.feed_diameter_mm / 2.0:g} mm)", None,
                               self.depth_mm, f"at most {deepest:.3g} mm"))
        out += self._other_voids(row, voids, body, min_wall_mm, path)
        axis, offset = parting
        if axis != "z":
            out.append(Problem("parting.axis", "does not let the slits' fins leave with a "
                               "shell (they pull along z)", None, axis,
                               "z, with parting.offset_mm below every slit"))
        elif offset is not None and offset >= hi[2] - self.depth_mm:
            out.append(Problem(f"{path}.depth_mm", "reaches the parting plane (the fins "
                               "must lie wholly in the upper shell)", None, self.depth_mm,
                               f"less than {hi[2] - offset:.3g} mm (the plane is at z = "
                               f"{offset:g} mm)"))
        # A slit that stops short of the side faces keeps the least wall beyond its ends.
        room = min(hi[1] - row.center_mm[0], row.center_mm[0] - lo[1]) - min_wall_mm
        if self.span_mm is not None and self.span_mm / 2.0 > room:
            out.append(Problem(f"{path}.span_mm", "leaves less than checks.min_wall_mm "
                               f"({min_wall_mm:g} mm) beyond the slits' ends", None,
                               self.span_mm, f"at most {2.0 * room:.3g} mm, or leave it out "
                               "to cut through both side faces"))
        if process_kind != "one-shot":
            out.append(Problem("process.kind", "does not cut slits (only the two-shell mold "
                               "carries their fins)", None, process_kind, "one-shot"))
        return out


    def _network_cuts(self, body: BodyKind, net: Channels) -> tuple[SlitCut, ...]:
        """One cut in the middle of each gap between neighbouring chambers of every row of
        a channel network, turned with the row's path (row order, then along the row); its
        span runs across the path through both side faces of the body there (or
        ``span_mm``)."""
        _, hi = _body_bounds(body)
        prims = body.primitives()
        out = []
        for j in range(len(net.rows)):
            row = net.row(j)
            spans = row.spans_mm()
            for (_, a_end), (b_start, _) in zip(spans, spans[1:]):
                (x, y), ang = point_along(net.paths[row.path], (a_end + b_start) / 2.0)
                if self.span_mm is None:
                    z = hi[2] - self.depth_mm / 2.0
                    span = 2.0 * (_reach_across(prims, (x, y, z), ang) + THROUGH_MM)
                else:
                    span = self.span_mm
                out.append(SlitCut(x, y, span, hi[2], self.depth_mm, self.width_mm,
                                   self.round_mm, self.draft_deg, ang))
        return tuple(out)

    def _fit_network(self, body: BodyKind, net: Channels, min_wall_mm: float,
                     process_kind: str, path: str) -> list[Problem]:
        """Slits between the chambers of a channel network's rows: the layered process (the
        chambered tray's floor is the top face, its fins stand on it), room for the slit
        and the least wall on either side of it in every gap, the least wall above the
        channel under it, and the least wall to every other part of the network."""
        if process_kind != "layered":
            return [Problem("process.kind", "does not cut slits between the chambers of a "
                            "channel network (the layered tray's floor carries their fins)",
                            None, process_kind, "layered")]
        out: list[Problem] = []
        if all(net.row(j).count < 2 for j in range(len(net.rows))):
            return [Problem(f"{path}.kind", "needs a chamber row to sit between", None,
                            "rows of 1 chamber", "a row of the channel network with count "
                            "2 or more")]
        for j in range(len(net.rows)):
            row = net.row(j)
            if row.count < 2:
                continue
            gap = row.pitch_mm - row.length_mm
            most = gap - 2.0 * min_wall_mm
            if self.width_mm > most:
                return [Problem(f"{path}.width_mm", f"leaves less than checks.min_wall_mm "
                                f"({min_wall_mm:g} mm) to the chambers of rows[{j}] (the gap "
                                f"between them is {gap:g} mm)", None, self.width_mm,
                                f"at most {max(most, 0.0):.3g} mm")]
        _, hi = _body_bounds(body)
        floor = net.z_mm + net.height_mm + min_wall_mm
        if self.depth_mm > hi[2] - floor:
            return [Problem(f"{path}.depth_mm", "leaves less than checks.min_wall_mm "
                            f"({min_wall_mm:g} mm) above the channels (their top at z = "
                            f"{net.z_mm + net.height_mm:g} mm)", None, self.depth_mm,
                            f"at most {hi[2] - floor:.3g} mm")]
        prims = net.primitives(0.0)
        for c in self._network_cuts(body, net):
            pts = c.surface_samples(SAMPLE_SPACING_MM, y_range_mm=(
                c.center_y_mm - c.span_mm / 2.0 + THROUGH_MM,
                c.center_y_mm + c.span_mm / 2.0 - THROUGH_MM))
            wall = float(union_sdf(prims, pts).min())
            if wall < min_wall_mm - 1e-6:
                out.append(Problem(f"{path}.depth_mm", f"leaves {max(wall, 0.0):.2f} mm of "
                                   f"silicone to the channel network (the slit at ("
                                   f"{c.center_x_mm:.3g}, {c.center_y_mm:.3g}) mm)", None,
                                   self.depth_mm, f"a slit at least checks.min_wall_mm "
                                   f"({min_wall_mm:g} mm) from every chamber and channel: "
                                   "shallower or narrower"))
                break
        return out

    def _other_voids(self, row: Chambers, voids: Sequence[object], body: BodyKind,
                     min_wall_mm: float, path: str) -> list[Problem]:
        """A slit closer than ``min_wall_mm`` to a cavity void other than its chamber row
        (a bore beside the row, say): sampled on the slit's surface every
        SAMPLE_SPACING_MM, so a wall may be up to half that thinner than measured."""
        lo, hi = _body_bounds(body)
        length = hi[0] - lo[0]
        for j, v in enumerate(voids):
            if v is row or not hasattr(v, "primitives"):
                continue
            prims = v.primitives(length)
            if not prims:
                continue
            for c in self.cuts(body, voids):
                pts = c.surface_samples(SAMPLE_SPACING_MM, y_range_mm=(
                    max(lo[1], c.center_y_mm - c.span_mm / 2.0),
                    min(hi[1], c.center_y_mm + c.span_mm / 2.0)))
                wall = float(union_sdf(prims, pts).min())
                if wall < min_wall_mm:
                    return [Problem(f"{path}.depth_mm", f"leaves {max(wall, 0.0):.2f} mm of "
                                    f"silicone to voids[{j}] (the slit at x = "
                                    f"{c.center_x_mm:.3g} mm)", None, self.depth_mm,
                                    f"a slit at least checks.min_wall_mm ({min_wall_mm:g} mm) "
                                    f"from voids[{j}]: shallower, or move that void")]
        return []


def _network(voids: Sequence[object]) -> Channels | None:
    nets = [v for v in voids if isinstance(v, Channels)]
    return nets[0] if len(nets) == 1 else None


def _reach_across(prims: Sequence[Primitive], at: tuple[float, float, float],
                  angle_deg: float) -> float:
    """How far the body reaches from ``at`` across the direction ``angle_deg`` (mm): the
    larger of the two distances, left and right, to where the body's exact distance first
    turns positive, found on a 0.1 mm grid over the body's bounds and refined twice on
    grids a hundred times finer (to 1e-5 mm)."""
    t = math.radians(angle_deg)
    perp = np.array([-math.sin(t), math.cos(t), 0.0])
    base = np.asarray(at, dtype=float)
    body = tuple(prims)
    lo = np.min([p.bounds()[0] for p in body], axis=0)
    hi = np.max([p.bounds()[1] for p in body], axis=0)
    far = float(np.linalg.norm(hi - lo)) + 1.0
    most = 0.0
    for sign in (1.0, -1.0):
        start, step, n = 0.0, 0.1, int(far / 0.1) + 2
        for _ in range(3):
            ds = start + step * np.arange(n)
            outside = np.flatnonzero(union_sdf(body, base + sign * ds[:, None] * perp) > 0.0)
            if len(outside) == 0:
                break
            k = int(outside[0])
            start, step, n = float(ds[max(k - 1, 0)]), step / 100.0, 101
        else:
            most = max(most, start + 100.0 * step)
    return most


def _row(voids: Sequence[object]) -> Chambers | None:
    rows = [v for v in voids if isinstance(v, Chambers)]
    return rows[0] if len(rows) == 1 else None


def _body_bounds(body: BodyKind) -> tuple[tuple[float, float, float],
                                          tuple[float, float, float]]:
    from ..contracts import bounds_of
    return bounds_of(body.primitives())


def gaps(row: Chambers, body_length_mm: float) -> tuple[tuple[float, float], ...]:
    """(centre x, width along x) of each gap between neighbouring chambers of ``row`` (a
    ``chambers`` void), mm."""
    boxes = row.chamber_boxes(body_length_mm)
    out = []
    for a, b in zip(boxes, boxes[1:]):
        end = a.center_mm[0] + a.size_mm[0] / 2.0
        start = b.center_mm[0] - b.size_mm[0] / 2.0
        out.append(((end + start) / 2.0, start - end))
    return tuple(out)
