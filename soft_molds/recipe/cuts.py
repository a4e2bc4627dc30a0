"""Cuts from the body's outer surface, as pure data: what the geometry stage removes from
the body before the cores, so the cast has open gaps and the shell beside them grows fins.

A ``SlitCut`` is a prism along y whose section in the xz plane is a drafted slot opening
upward (+z): ``width_top_mm`` wide along x at the body's top face ``top_z_mm``, its two
side walls leaning in by ``draft_deg`` each towards the bottom at ``top_z_mm - depth_mm``,
its two bottom corners rounded with ``round_mm``. The prism runs ``span_mm`` along y
centred on ``center_y_mm``. ``angle_deg`` turns the whole slit about the vertical line
through (``center_x_mm``, ``center_y_mm``), counter-clockwise seen from +z: a slit across a
row of chambers along a path that does not run along x (its "x" is then along the path,
its span across it). Above the top face the section goes on, with the same draft,
for ``OVERSHOOT_MM``, so the cut opens cleanly through the face (that part lies outside the
body and removes nothing).

Frame: mm, degrees; x along the body from the inlet face, z up (the top face is the side
opposite the strain-limiting bottom).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: How far the cut's section goes on above the body's top face (mm): only so that the
#: boolean never has to cut along a face lying exactly on the body's own face.
OVERSHOOT_MM = 1.0


@dataclass(frozen=True)
class SlitCut:
    """One slit (see the module docstring for the frame and the shape; mm, deg)."""

    center_x_mm: float
    center_y_mm: float
    span_mm: float
    top_z_mm: float
    depth_mm: float
    width_top_mm: float
    round_mm: float
    draft_deg: float
    angle_deg: float = 0.0

    def to_world(self, local: np.ndarray) -> np.ndarray:
        """Points (n, 3) given in the unturned slit's frame, in the world's (mm)."""
        if self.angle_deg == 0.0:
            return local
        t = math.radians(self.angle_deg)
        c, s = math.cos(t), math.sin(t)
        dx, dy = local[:, 0] - self.center_x_mm, local[:, 1] - self.center_y_mm
        return np.stack([self.center_x_mm + c * dx - s * dy, self.center_y_mm + s * dx + c * dy,
                         local[:, 2]], axis=1)

    def to_local(self, world: np.ndarray) -> np.ndarray:
        """Points (n, 3) in the world, in the unturned slit's frame (mm)."""
        if self.angle_deg == 0.0:
            return world
        t = math.radians(self.angle_deg)
        c, s = math.cos(t), math.sin(t)
        dx, dy = world[:, 0] - self.center_x_mm, world[:, 1] - self.center_y_mm
        return np.stack([self.center_x_mm + c * dx + s * dy, self.center_y_mm - s * dx + c * dy,
                         world[:, 2]], axis=1)

    @property
    def bottom_z_mm(self) -> float:
        return self.top_z_mm - self.depth_mm

    @property
    def lean(self) -> float:
        """How far each side wall moves out along x per mm of height (tan of the draft)."""
        return math.tan(math.radians(self.draft_deg))

    @property
    def width_bottom_mm(self) -> float:
        """Width along x at the bottom, before the corners are rounded (mm)."""
        return self.width_top_mm - 2.0 * self.depth_mm * self.lean

    def half_width_at(self, z_mm: float) -> float:
        """Half the width along x at height ``z_mm`` (straight walls, mm)."""
        return self.width_bottom_mm / 2.0 + (z_mm - self.bottom_z_mm) * self.lean

    @property
    def corner_angle_rad(self) -> float:
        """Inner angle of each bottom corner: a right angle opened by the draft."""
        return math.pi / 2.0 + math.radians(self.draft_deg)

    @property
    def tangent_mm(self) -> float:
        """Distance from a bottom corner to where its rounding meets the walls (mm)."""
        return self.round_mm / math.tan(self.corner_angle_rad / 2.0)

    def corner_area_mm2(self) -> float:
        """Area the rounding of one bottom corner takes off the section (mm2): between two
        lines meeting at angle theta and a circle of radius r tangent to both, r^2 (cot
        theta/2 - (pi - theta)/2) (plane geometry: the kite of the two tangent lengths
        less the circular sector)."""
        th = self.corner_angle_rad
        r = self.round_mm
        return r * r * (1.0 / math.tan(th / 2.0) - (math.pi - th) / 2.0)

    def section_area_mm2(self, top_z_mm: float | None = None) -> float:
        """Area of the section below ``top_z_mm`` (default the body's top face), mm2: the
        trapezoid less both corner roundings."""
        top = self.top_z_mm if top_z_mm is None else top_z_mm
        h = top - self.bottom_z_mm
        return (self.width_bottom_mm + h * self.lean) * h - 2.0 * self.corner_area_mm2()

    def removed_mm3(self, span_mm: float | None = None) -> float:
        """Volume the slit removes from a body whose top face is flat at ``top_z_mm`` (mm3):
        section area x the span inside the body (default the whole span)."""
        return self.section_area_mm2() * (self.span_mm if span_mm is None else span_mm)

    def outline_xz(self) -> tuple[tuple[str, tuple[tuple[float, float], ...]], ...]:
        """The closed section in the xz plane as pieces ``("line", (a, b))`` or ``("arc",
        (start, mid, end))`` of (x, z) points: from the top-left corner down the left wall,
        along the bottom, up the right wall and back across the top (mm)."""
        zb, zt = self.bottom_z_mm, self.top_z_mm + OVERSHOOT_MM
        cx = self.center_x_mm
        hb, ht = self.width_bottom_mm / 2.0, self.half_width_at(zt)
        top_l, top_r = (cx - ht, zt), (cx + ht, zt)
        bot_l, bot_r = (cx - hb, zb), (cx + hb, zb)
        if self.round_mm <= 0.0:
            return (("line", (top_l, bot_l)), ("line", (bot_l, bot_r)),
                    ("line", (bot_r, top_r)), ("line", (top_r, top_l)))
        left = self._corner(np.array(bot_l), 1.0)
        right = self._corner(np.array(bot_r), -1.0)
        return (("line", (top_l, left[2])),
                ("arc", (left[2], left[1], left[0])),
                ("line", (left[0], right[0])),
                ("arc", (right[0], right[1], right[2])),
                ("line", (right[2], top_r)),
                ("line", (top_r, top_l)))

    def _corner(self, p: np.ndarray, inward: float
                ) -> tuple[tuple[float, float], tuple[float, float], tuple[float, float]]:
        """The rounding of the bottom corner ``p``: (point on the bottom, arc middle, point
        on the wall); ``inward`` is +1 for the left corner (the bottom runs to +x)."""
        along = np.array([inward, 0.0])
        up = np.array([-inward * math.sin(math.radians(self.draft_deg)),
                       math.cos(math.radians(self.draft_deg))])
        t = self.tangent_mm
        bis = along + up
        bis /= np.linalg.norm(bis)
        centre = p + bis * (self.round_mm / math.sin(self.corner_angle_rad / 2.0))
        mid = centre - bis * self.round_mm

        def pt(v: np.ndarray) -> tuple[float, float]:
            return (float(v[0]), float(v[1]))
        return pt(p + t * along), pt(mid), pt(p + t * up)

    def bounds(self) -> tuple[tuple[float, float, float], tuple[float, float, float]]:
        """Axis-aligned bounds of the whole tool, overshoot included (mm)."""
        ht = self.half_width_at(self.top_z_mm + OVERSHOOT_MM)
        lo = (self.center_x_mm - ht, self.center_y_mm - self.span_mm / 2.0, self.bottom_z_mm)
        hi = (self.center_x_mm + ht, self.center_y_mm + self.span_mm / 2.0,
              self.top_z_mm + OVERSHOOT_MM)
        if self.angle_deg == 0.0:
            return lo, hi
        corners = self.to_world(np.array([[x, y, z] for x in (lo[0], hi[0])
                                          for y in (lo[1], hi[1]) for z in (lo[2], hi[2])]))
        a, b = corners.min(axis=0), corners.max(axis=0)
        return ((float(a[0]), float(a[1]), float(a[2])), (float(b[0]), float(b[1]), float(b[2])))

    def surface_samples(self, spacing_mm: float, top_z_mm: float | None = None,
                        y_range_mm: tuple[float, float] | None = None) -> np.ndarray:
        """(n, 3) points on the slit's two walls and bottom below ``top_z_mm`` (default the
        body's top face), within ``y_range_mm`` (default its span; in the slit's own frame,
        along its span), at most about
        ``spacing_mm`` apart; the rounded corners are sampled on their straight walls'
        extension, which lies outside the slit by at most ``round_mm`` (mm)."""
        top = self.top_z_mm if top_z_mm is None else top_z_mm
        y0, y1 = ((self.center_y_mm - self.span_mm / 2.0, self.center_y_mm + self.span_mm / 2.0)
                  if y_range_mm is None else y_range_mm)
        ys = np.linspace(y0, y1, max(int(np.ceil((y1 - y0) / spacing_mm)), 1) + 1)
        zs = np.linspace(self.bottom_z_mm, top,
                         max(int(np.ceil((top - self.bottom_z_mm) / spacing_mm)), 1) + 1)
        hb = self.width_bottom_mm / 2.0
        xs = np.linspace(-hb, hb, max(int(np.ceil(2 * hb / spacing_mm)), 1) + 1)
        pts = []
        for y in ys:
            for z in zs:
                h = self.half_width_at(float(z))
                pts += [(self.center_x_mm - h, y, z), (self.center_x_mm + h, y, z)]
            pts += [(self.center_x_mm + x, y, self.bottom_z_mm) for x in xs]
        return self.to_world(np.array(pts, dtype=np.float64))

