"""Void kind ``annulus``: a bladder channel all round a ``ring`` body, for inflatable cuffs
and gaskets.

The channel is a rounded rectangle in (radius, z) turned about the ring's axis (the ring's
frame: axis along z through (x, y) = (outer radius, 0), height centred on z = 0). It lies
``wall_mm`` out from the bore, the face that inflates: pressed, that wall bulges towards
the axis and squeezes what the bore holds. A radial feed along +x joins the tube socket on
the outer face (x = 0) to the channel.

``opens_to`` says where the channel opens. ``none``: a closed channel, formed by a core that
cannot be drawn out through a socket (it runs all round the ring): it is built only on a
lost core (``core.kind: melted`` or ``dissolved``); the plan refuses it on a pulled core,
naming those ways out. ``outside``: an open groove round the outer face, its walls the
planes z = +-height/2 from the groove bottom (``wall_mm`` out from the bore) through the
outer face, its corners square. After the cure the ring is seated in a rigid collar (or
wrapped in an inextensible band) that closes the groove; air enters through the collar, so
the silicone has no tube socket (a recipe with an ``inlet`` block is refused). It is cut
from the outside (``OUTER``): two flat plates in the parting plane z = 0 form it and slide
out along +-y (:mod:`soft_molds.plan.groove`). ``inside`` (an open groove in the bore)
needs a collapsible core: that mold is not built yet, and it is refused when the recipe is
read, with its reason.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from typing import Any, ClassVar

from ...errors import Problem
from ..contracts import BodyKind, Entry
from ..fields import Field, choice, number
from ..membranes import Membrane
from ..primitives import Primitive, RoundedRing, RoundedRod
from ..registry import void_kind
from .ring import MAX_ROUND_SHARE, Ring

#: Where the channel may open, and why it is not built yet.
NOT_BUILT = {
    "inside": "needs a collapsible core: two core halves drawn straight out of a ribbed "
              "bore collide; that mold is not built yet",
}


@void_kind("annulus")
@dataclass(frozen=True)
class Annulus:
    """A channel all round a ``ring`` body: radius from the bore's plus ``wall_mm`` to that
    plus ``depth_mm``, ``height_mm`` along the ring's axis centred on z = 0, its four
    corners rounded by ``corner_round_mm``; a feed of ``feed_diameter_mm`` along +x on the
    axis y = z = 0 from the inlet plane x = 0 (inside the tube socket on the outer face)
    into the channel (mm). ``opens_to: none`` builds on a melted or dissolved core;
    ``outside`` is an open groove with square corners, reaching through the outer face, fed
    through the collar that closes it (no feed, ``feed_diameter_mm`` is not read)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("wall_mm", "silicone between the bore and the channel: the wall that "
               "inflates"),
        number("depth_mm", "radial depth of the channel"),
        number("height_mm", "extent of the channel along the ring's axis"),
        choice("opens_to", "where the channel opens: none (closed; needs core.kind: "
               "melted or dissolved), outside (an open groove round the outer face, closed "
               "by a rigid collar after the cure; no inlet: air enters through the collar) "
               "or inside (an open groove in the bore; not built yet)",
               ("none", "outside", "inside"), "none"),
        number("corner_round_mm", "rounding of the channel's four circular corners", 0.5,
               lo=0.0, lo_open=False),
        number("feed_diameter_mm", "diameter of the radial feed from the socket", 2.0),
    )
    wall_mm: float
    depth_mm: float
    height_mm: float
    opens_to: str
    corner_round_mm: float
    feed_diameter_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        out = []
        if v["opens_to"] in NOT_BUILT:
            out.append(Problem(f"{path}.opens_to", f"is {v['opens_to']}: that channel "
                               f"{NOT_BUILT[v['opens_to']]}", line, v["opens_to"],
                               "none (a closed channel on core.kind: melted or "
                               "dissolved) or outside (an open groove closed by a collar)"))
        if v["opens_to"] == "outside":
            if v["corner_round_mm"] != 0.0:
                out.append(Problem(f"{path}.corner_round_mm", "rounds the corners of a "
                                   "closed channel; an open groove is formed by flat plates "
                                   "with square edges", line, v["corner_round_mm"],
                                   "0 with opens_to: outside"))
            return out
        limit = MAX_ROUND_SHARE * min(v["depth_mm"], v["height_mm"])
        if v["corner_round_mm"] > limit:
            out.append(Problem(f"{path}.corner_round_mm", "is too large for the channel", line,
                               v["corner_round_mm"], f"at most {limit:g} mm "
                               f"({MAX_ROUND_SHARE:g} x the smaller of depth and height)"))
        if v["feed_diameter_mm"] > v["height_mm"] - 2.0 * v["corner_round_mm"]:
            out.append(Problem(f"{path}.feed_diameter_mm", "is wider than the channel's flat "
                               "outer face", line, v["feed_diameter_mm"],
                               "at most height_mm - 2 x corner_round_mm "
                               f"({v['height_mm'] - 2.0 * v['corner_round_mm']:g} mm)"))
        return out

    def follow_body(self, body: BodyKind, path: str) -> tuple[Annulus | None, list[Problem]]:
        """This void fitted to the ring it runs round (it then knows its channel), or None
        and the problems (line None: the reader locates them by path)."""
        if not isinstance(body, Ring):
            return None, [Problem(f"{path}.kind", "runs round a ring, and the body is not "
                                  f"one (body.kind is {body.KIND})", None, "annulus",
                                  "body.kind: ring, or another void kind")]
        ring = body.solid()
        inner = ring.inner_radius_mm + self.wall_mm
        outer = inner + self.depth_mm
        if self.opens_to == "outside":
            return self._fit_groove(body, ring, inner, path)
        out = []
        if outer >= ring.outer_radius_mm:
            out.append(Problem(f"{path}.depth_mm", "takes the channel through the ring's "
                               f"outer face: the bore's radius ({ring.inner_radius_mm:g} mm) "
                               f"+ wall_mm + depth_mm = {outer:g} mm", None, self.depth_mm,
                               f"wall_mm + depth_mm below the ring's radial wall "
                               f"({ring.outer_radius_mm - ring.inner_radius_mm:g} mm), less "
                               "the outer wall"))
        if self.height_mm >= body.height_mm:
            out.append(Problem(f"{path}.height_mm", "is not below the ring's height", None,
                               self.height_mm, f"less than body.height_mm "
                               f"({body.height_mm:g} mm), less two walls"))
        if out:
            return None, out
        fitted = replace(self)
        channel = RoundedRing(ring.center_mm, inner, outer, -self.height_mm / 2.0,
                              self.height_mm, self.corner_round_mm)
        object.__setattr__(fitted, "_channel", channel)
        return fitted, []

    def _fit_groove(self, body: Ring, ring: RoundedRing, inner: float, path: str
                    ) -> tuple[Annulus | None, list[Problem]]:
        """The open groove fitted to ``ring``: from the groove bottom at ``inner`` through
        the outer face (``depth_mm`` must reach it), its walls on the outer face's straight
        part (clear of the edge roundings, so the cast's volume has its closed form)."""
        big = ring.outer_radius_mm
        out = []
        if inner >= big:
            return None, [Problem(f"{path}.wall_mm", "leaves no groove: the wall reaches the "
                                  "ring's outer face", None, self.wall_mm,
                                  "less than the ring's radial wall "
                                  f"({big - ring.inner_radius_mm:g} mm)")]
        if abs(inner + self.depth_mm - big) > 1e-6:
            out.append(Problem(f"{path}.depth_mm", "must take an open groove from its bottom "
                               "to the ring's outer face", None, self.depth_mm,
                               f"{big - inner:g} mm (outer radius {big:g} - bore radius "
                               f"{ring.inner_radius_mm:g} - wall_mm {self.wall_mm:g})"))
        flat = body.height_mm - 2.0 * body.edge_round_mm
        if self.height_mm >= flat:
            out.append(Problem(f"{path}.height_mm", "reaches the rounded edges of the ring's "
                               "outer face", None, self.height_mm,
                               f"less than body.height_mm - 2 x body.edge_round_mm "
                               f"({flat:g} mm), less two walls"))
        if out:
            return None, out
        fitted = replace(self)
        # The cut reaches GROOVE_THROUGH_MM past the outer face, so it opens cleanly.
        channel = RoundedRing(ring.center_mm, inner, big + GROOVE_THROUGH_MM,
                              -self.height_mm / 2.0, self.height_mm, 0.0)
        object.__setattr__(fitted, "_channel", channel)
        object.__setattr__(fitted, "_outer_radius", big)
        return fitted, []

    @property
    def OUTER(self) -> bool:  # noqa: N802 (the name every outside cut answers to)
        """An open groove is cut from the outside: no core, no socket."""
        return self.opens_to == "outside"

    @property
    def INFLATES(self) -> bool:  # noqa: N802 (read with OUTER by the recipe reader)
        """An open groove is an outside cut that is inflated (its collar closes it): the
        recipe's cavity, though no cavity void is listed."""
        return self.OUTER

    def groove(self) -> Groove:
        """The open groove's figures (``opens_to: outside``, after follow_body)."""
        ch = self.channel()
        return Groove(ch.center_mm, ch.inner_radius_mm,
                      float(self.__dict__["_outer_radius"]), self.height_mm)

    def channel(self) -> RoundedRing:
        found = self.__dict__.get("_channel")
        if not isinstance(found, RoundedRing):
            raise TypeError("an annulus void knows its channel only after follow_body()")
        return found

    def lost_core_reason(self) -> str | None:
        """Why a core drawn out through the socket cannot form this void (None: it can)."""
        return ("is a closed channel all round the ring: its core cannot be drawn out "
                "through the socket" if self.opens_to == "none" else None)

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        ch = self.channel()
        if self.OUTER:
            return (ch,)  # the groove, cut from the body (no feed: the collar feeds it)
        # The feed runs from the inlet plane to the channel's middle radius (on the x axis
        # the outer face is at x = 0 and the channel's outer side at R - outer radius).
        reach = ch.center_mm[0] - (ch.inner_radius_mm + ch.outer_radius_mm) / 2.0
        return (ch, RoundedRod("x", 0.0, reach, (0.0, 0.0), self.feed_diameter_mm / 2.0))

    def entry(self) -> Entry:
        return Entry((0.0, 0.0), self.feed_diameter_mm / 2.0, 0.0)

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """The channel's four walls, probed opposite the socket (the ring is the same all
        round): the bore wall and the outer wall bulge across the channel's height, the
        top and bottom walls across its depth."""
        ch = self.channel()
        cx = ch.center_mm[0]
        if self.OUTER:
            # The collar closes the groove: the bore wall and the two lips inflate.
            g = self.groove()
            mid = cx + (g.bottom_radius_mm + g.outer_radius_mm) / 2.0
            h, d = g.height_mm / 2.0, (g.outer_radius_mm - g.bottom_radius_mm) / 2.0
            return (Membrane("bore wall", "bulge", h, (cx + g.bottom_radius_mm, 0.0, 0.0),
                             (-1.0, 0.0, 0.0)),
                    Membrane("top lip", "bulge", d, (mid, 0.0, h), (0.0, 0.0, 1.0)),
                    Membrane("bottom lip", "bulge", d, (mid, 0.0, -h), (0.0, 0.0, -1.0)))
        mid = cx + (ch.inner_radius_mm + ch.outer_radius_mm) / 2.0
        h, d = ch.height_mm / 2.0, (ch.outer_radius_mm - ch.inner_radius_mm) / 2.0
        return (Membrane("bore wall", "bulge", h, (cx + ch.inner_radius_mm, 0.0, 0.0),
                         (-1.0, 0.0, 0.0)),
                Membrane("outer wall", "bulge", h, (cx + ch.outer_radius_mm, 0.0, 0.0),
                         (1.0, 0.0, 0.0)),
                Membrane("top wall", "bulge", d, (mid, 0.0, h), (0.0, 0.0, 1.0)),
                Membrane("bottom wall", "bulge", d, (mid, 0.0, -h), (0.0, 0.0, -1.0)))


    def cuts(self, body: BodyKind, voids: Sequence[object]) -> tuple[()]:
        """No slit cuts: the open groove is cut as a primitive (:meth:`primitives`)."""
        return ()

    def fit(self, body: BodyKind, voids: Sequence[object], min_wall_mm: float,
            parting: tuple[str, float | None], process_kind: str, vent_mm: float,
            path: str) -> list[Problem]:
        """Problems of an open groove in this recipe: it is the ring's only void, cast in
        one shot, parted on z = 0 (the plates lie in that plane)."""
        out = []
        if voids:
            out.append(Problem(f"{path}.opens_to", "is outside: an open groove is the ring's "
                               "only void (its plates fill the parting plane)", None,
                               self.opens_to, "one annulus void, or opens_to: none"))
        axis, offset = parting
        if axis != "z" or offset is None or abs(offset) > 1e-9:
            out.append(Problem("parting", "must be z = 0 for an open groove: its two plates "
                               "lie in that plane, clamped between the shells", None,
                               [axis, offset], "parting.axis: z, parting.offset_mm: 0"))
        if process_kind != "one-shot":
            out.append(Problem("process.kind", "casts an open groove in steps", None,
                               process_kind, "one-shot"))
        return out


#: How far the groove's cut reaches past the ring's outer face (mm): the cut then opens
#: cleanly instead of sharing the outer face with the body.
GROOVE_THROUGH_MM = 1.0


@dataclass(frozen=True)
class Groove:
    """An open groove round a ring (ring frame, mm): axis along z through ``center_mm``
    (x, y); bottom at ``bottom_radius_mm``, open at the outer face ``outer_radius_mm``;
    walls at z = +-``height_mm`` / 2."""

    center_mm: tuple[float, float]
    bottom_radius_mm: float
    outer_radius_mm: float
    height_mm: float

    def volume_mm3(self) -> float:
        """The rectangle revolved (Pappus): pi (R^2 - r^2) h."""
        return math.pi * (self.outer_radius_mm ** 2 - self.bottom_radius_mm ** 2) \
            * self.height_mm

    def bottom_area_mm2(self) -> float:
        """The groove bottom, the face the air pushes inward: 2 pi r h."""
        return 2.0 * math.pi * self.bottom_radius_mm * self.height_mm

    def projected_area_mm2(self) -> float:
        """The groove bottom seen across a diameter: 2 r h."""
        return 2.0 * self.bottom_radius_mm * self.height_mm

    def squeeze_n_per_kpa(self) -> float:
        """Force with which each half of the bore wall is pushed towards the other, per kPa
        of gauge pressure (N): p x the projected area, 1 kPa = 1e-3 N/mm2."""
        return 1e-3 * self.projected_area_mm2()
