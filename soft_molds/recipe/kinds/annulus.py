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
naming those ways out. ``outside`` (an open groove round the outer face, closed afterwards
by a bonded band) needs a mold parted through the ring's axis with a separate bore pin,
and ``inside`` (an open groove in the bore) a collapsible core: neither mold is built yet,
and both are refused when the recipe is read, each with its reason.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any, ClassVar

from ...errors import Problem
from ..contracts import BodyKind, Entry
from ..fields import Field, choice, number
from ..membranes import Membrane
from ..primitives import Primitive, RoundedRing, RoundedRod
from ..registry import void_kind
from .ring import MAX_ROUND_SHARE, Ring

#: Where the channel may open, and why the open ones are not built yet.
NOT_BUILT = {
    "outside": "needs a mold parted through the ring's axis, with the bore formed by a "
               "separate pin drawn along the axis; that mold is not built yet",
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
    into the channel (mm). Only ``opens_to: none`` (closed, on a melted or dissolved core)
    builds."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("wall_mm", "silicone between the bore and the channel: the wall that "
               "inflates"),
        number("depth_mm", "radial depth of the channel"),
        number("height_mm", "extent of the channel along the ring's axis"),
        choice("opens_to", "where the channel opens: none (closed; needs core.kind: "
               "melted or dissolved), outside or inside (open grooves; not built yet)",
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
                               "dissolved)"))
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
        mid = cx + (ch.inner_radius_mm + ch.outer_radius_mm) / 2.0
        h, d = ch.height_mm / 2.0, (ch.outer_radius_mm - ch.inner_radius_mm) / 2.0
        return (Membrane("bore wall", "bulge", h, (cx + ch.inner_radius_mm, 0.0, 0.0),
                         (-1.0, 0.0, 0.0)),
                Membrane("outer wall", "bulge", h, (cx + ch.outer_radius_mm, 0.0, 0.0),
                         (1.0, 0.0, 0.0)),
                Membrane("top wall", "bulge", d, (mid, 0.0, h), (0.0, 0.0, 1.0)),
                Membrane("bottom wall", "bulge", d, (mid, 0.0, -h), (0.0, 0.0, -1.0)))
