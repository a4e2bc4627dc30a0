"""Where the mold's features go, as plain numbers (no kernel): block extents, clamp holes,
registration keys and pry notches; and the rules that keep them clear of each other, of the
cavity and of the block's faces (checked before any kernel call). The block is laid around
the body's bounds as its primitives give them, wherever the body lies.

Local frame: ``u`` = x (the body's long axis), ``v`` = the other in-plane axis, ``w`` = the
parting axis (up in pour orientation). ``world()`` maps (u, v, w) to (x, y, z).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import Problem
from ..recipe.model import Recipe
from .lines import LineOf

#: Pry notch: how deep it cuts into a face, its length along the face and its half height
#: either side of the parting plane (mm): room for a flat screwdriver tip.
NOTCH_DEPTH_MM = 3.0
NOTCH_LENGTH_MM = 12.0
NOTCH_HALF_HEIGHT_MM = 1.5
#: Least printed material between two features, or a feature and a face (mm): about four
#: 0.4 mm perimeters (common practice for watertight FDM walls).
MIN_LAND_MM = 1.5

#: Longest unsupported run of parting line between two clamp bolts (mm). Printed plastic
#: flexes under bolt load; about 70 mm keeps the seam closed on soft silicone (from memory).
MAX_BOLT_SPAN_MM = 70.0


@dataclass(frozen=True)
class Frame:
    """Axis indices of u, v, w in world x-y-z."""

    w_axis: int

    @property
    def v_axis(self) -> int:
        return 1 if self.w_axis == 2 else 2

    def world(self, u: float, v: float, w: float) -> tuple[float, float, float]:
        out = [0.0, 0.0, 0.0]
        out[0], out[self.v_axis], out[self.w_axis] = u, v, w
        return (out[0], out[1], out[2])


@dataclass(frozen=True)
class Layout:
    frame: Frame
    parting_w: float
    block_lo: tuple[float, float, float]   # world mm
    block_hi: tuple[float, float, float]
    body_lo: tuple[float, float, float]
    body_hi: tuple[float, float, float]
    bolts_uv: tuple[tuple[float, float], ...]
    keys_uv: tuple[tuple[float, float], ...]
    notches: tuple[tuple[float, float, float, float], ...]  # (u, v, along-u size, along-v size)

    @property
    def block_center_uv(self) -> tuple[float, float]:
        f = self.frame
        return ((self.block_lo[0] + self.block_hi[0]) / 2,
                (self.block_lo[f.v_axis] + self.block_hi[f.v_axis]) / 2)


def block_band_mm(r: Recipe) -> float:
    """How far the block reaches beyond the body in the parting plane (mm): wall + flange."""
    return r.mold.wall_mm + r.mold.flange_mm


Bounds = tuple[tuple[float, float, float], tuple[float, float, float]]


def plan_layout(r: Recipe, axis: str, offset_mm: float, bounds: Bounds | None = None
                ) -> Layout:
    """The block and its features for a parting plane normal to ``axis`` ("y" or "z") at
    ``offset_mm``, laid around the recipe's body or around ``bounds`` (world lo, hi, mm:
    a solid that is the cast in its stead, as a melted core in its core mold; no socket
    enters that block's faces)."""
    frame = Frame(2 if axis == "z" else 1)
    body_lo, body_hi = r.body_bounds() if bounds is None else bounds
    m = r.mold
    band = block_band_mm(r)
    lo = [body_lo[0] - band, 0.0, 0.0]
    hi = [body_hi[0] + band, 0.0, 0.0]
    va, wa = frame.v_axis, frame.w_axis
    lo[va], hi[va] = body_lo[va] - band, body_hi[va] + band
    lo[wa], hi[wa] = body_lo[wa] - m.wall_mm, body_hi[wa] + m.wall_mm

    # The band's centre line: keys and bolts sit on it, clear of cavity and outer edge.
    inset = m.flange_mm / 2.0
    u0, u1 = lo[0] + inset, hi[0] - inset
    v0, v1 = lo[va] + inset, hi[va] - inset
    spans = max(2, math.ceil((u1 - u0) / MAX_BOLT_SPAN_MM))
    us = [u0 + (u1 - u0) * k / spans for k in range(spans + 1)]
    bolts: tuple[tuple[float, float], ...] = ()
    if m.clamp_hole_mm is not None:
        bolts = tuple((u, v) for v in (v0, v1) for u in us)
    mid_first = (us[0] + us[1]) / 2
    mid_last = (us[-2] + us[-1]) / 2
    # Three keys, no two related by the rectangle's symmetries (half turn about w, mirror
    # in u, mirror in v), so the halves close one way only.
    keys = ((mid_first, v0), (mid_last, v0), (mid_first, v1))
    side = (mid_last, hi[va], NOTCH_LENGTH_MM, 2 * NOTCH_DEPTH_MM)  # +v face, no key there
    # The far end face's notch sits where an end-face core print passes: that face keeps
    # none when a socket enters it.
    far = (hi[0], (v0 + v1) / 2, 2 * NOTCH_DEPTH_MM, NOTCH_LENGTH_MM)  # centred
    end_socket = bounds is None and any(i.at_end for i in r.inlets)
    notches = (side,) if end_socket else (far, side)
    lay = Layout(frame, offset_mm, (lo[0], lo[1], lo[2]), (hi[0], hi[1], hi[2]), body_lo,
                 body_hi, bolts, keys, notches)
    if bounds is None and r.groove() is not None:
        from .groove import groove_layout

        # An open groove's plates cross the block along y: keys, bolts and notches go to
        # its x ends.
        return groove_layout(r, lay)
    return lay


def key_symmetry_clashes(keys_uv: tuple[tuple[float, float], ...],
                         center_uv: tuple[float, float], tol_mm: float = 0.5) -> list[str]:
    """Names of the rectangle symmetries that map the key pattern onto itself (empty when
    the halves can only be closed one way)."""
    cu, cv = center_uv
    maps = {
        "half turn": lambda u, v: (2 * cu - u, 2 * cv - v),
        "mirror u": lambda u, v: (2 * cu - u, v),
        "mirror v": lambda u, v: (u, 2 * cv - v),
    }
    clashes = []
    for name, fn in maps.items():
        moved = [fn(u, v) for u, v in keys_uv]
        if all(any(math.dist(p, q) <= tol_mm for q in keys_uv) for p in moved):
            clashes.append(name)
    return clashes


def layout_problems(r: Recipe, lay: Layout, line: LineOf) -> list[Problem]:
    """Keys, clamp holes and notches that would collide with each other, break into the
    cavity or out of the block. ``line(path)`` gives a field's source line."""
    m = r.mold
    out: list[Problem] = []
    rk = m.key_diameter_mm / 2.0 + m.clearance_mm  # the socket, the larger of the pair
    rb = (m.clamp_hole_mm or 0.0) / 2.0
    inset = m.flange_mm / 2.0  # key and bolt centres sit this far in from the block edge

    def add(path: str, what: str, value: object, allowed: str) -> None:
        out.append(Problem(path, what, line(path), value, allowed))

    if rk + MIN_LAND_MM > inset:
        add("mold.key_diameter_mm", "leaves too little wall between the key sockets and the "
            "block's outer faces", m.key_diameter_mm,
            f"at most {2 * (inset - MIN_LAND_MM - m.clearance_mm):g} mm with flange_mm = "
            f"{m.flange_mm:g} (or a wider flange)")
    if rk + MIN_LAND_MM > m.wall_mm + inset:
        add("mold.key_diameter_mm", "puts the key sockets into the cavity", m.key_diameter_mm,
            f"at most {2 * (m.wall_mm + inset - MIN_LAND_MM - m.clearance_mm):g} mm")
    w = lay.frame.w_axis
    upper = lay.block_hi[w] - lay.parting_w
    if m.key_height_mm + m.clearance_mm + MIN_LAND_MM > upper:
        add("mold.key_height_mm", "makes the key sockets break through the upper shell's top",
            m.key_height_mm,
            f"at most {upper - MIN_LAND_MM - m.clearance_mm:g} mm (upper shell {upper:g} mm "
            "thick above the parting plane)")
    if rb and rb + MIN_LAND_MM > inset:
        add("mold.clamp_bolt", "leaves too little wall around the clamp holes", m.clamp_bolt,
            f"a flange_mm of at least {2 * (rb + MIN_LAND_MM):g} mm for this bolt, or a "
            "smaller bolt")
    for ku, kv in lay.keys_uv:
        for bu, bv in lay.bolts_uv:
            gap = math.dist((ku, kv), (bu, bv)) - rk - rb
            if gap < MIN_LAND_MM:
                add("mold.key_diameter_mm", f"puts a key socket {gap:.2f} mm from a clamp hole",
                    m.key_diameter_mm, f"at least {MIN_LAND_MM:g} mm of wall between them "
                    "(a smaller key or bolt, or a longer body)")
                break
        else:
            continue
        break
    v_extent = lay.body_hi[lay.frame.v_axis] - lay.body_lo[lay.frame.v_axis]
    if m.sprue_diameter_mm > 0.8 * v_extent:
        add("mold.sprue_diameter_mm", "is wider than the top of the cavity it pours into",
            m.sprue_diameter_mm, f"at most {0.8 * v_extent:g} mm (0.8 x the body's width "
            "across the pour)")
    for nu, nv, du, dv in lay.notches:
        for bu, bv in lay.bolts_uv:
            # Distance from the hole's centre to the notch's rectangle in the plane.
            dx = max(abs(bu - nu) - du / 2.0, 0.0)
            dy = max(abs(bv - nv) - dv / 2.0, 0.0)
            if math.hypot(dx, dy) - rb < MIN_LAND_MM:
                add("mold.flange_mm", "puts a pry notch into a clamp hole", m.flange_mm,
                    f"enough flange for {MIN_LAND_MM:g} mm of wall between them (a wider "
                    "flange or a smaller bolt)")
                return out
    return out
