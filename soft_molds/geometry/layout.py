"""Where the mold's features go, as plain numbers (no kernel): block extents, clamp holes,
registration keys and pry notches in the parting plane.

Local frame: ``u`` = x (the body's long axis), ``v`` = the other in-plane axis, ``w`` = the
parting axis (up in pour orientation). ``world()`` maps (u, v, w) to (x, y, z).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..recipe.model import Recipe

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
    core_start_x: float  # outer end of the core print (x < 0)
    core_key_box: tuple[tuple[float, float, float], tuple[float, float, float]]  # (lo, hi)

    @property
    def block_center_uv(self) -> tuple[float, float]:
        f = self.frame
        return ((self.block_lo[0] + self.block_hi[0]) / 2,
                (self.block_lo[f.v_axis] + self.block_hi[f.v_axis]) / 2)


def plan_layout(r: Recipe) -> Layout:
    frame = Frame(2 if r.parting.axis == "z" else 1)
    length, width, height = r.body.size_mm()
    body_lo = (0.0, -width / 2, -height / 2)
    body_hi = (length, width / 2, height / 2)
    m = r.mold
    band = m.wall_mm + m.flange_mm
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
    notch_len = 12.0
    notches = (
        (hi[0], (v0 + v1) / 2, 2 * 3.0, notch_len),   # far end face, centred
        (mid_last, hi[va], notch_len, 2 * 3.0),        # +v face, where no key sits
    )
    return Layout(frame, r.parting.offset_mm, tuple(lo), tuple(hi), body_lo, body_hi,  # type: ignore[arg-type]
                  bolts, keys, notches, lo[0] - m.core_handle_mm, _core_key(r, lo[0]))


#: Wall left on each side of the core key pocket (mm), toward the cavity and outside.
KEY_LAND_MM = 1.5
#: How far the square key stands out beyond the round print on each side (mm).
KEY_SHOULDER_MM = 1.5


def _core_key(r: Recipe, wall_x: float) -> tuple[tuple[float, float, float],
                                                  tuple[float, float, float]]:
    """The square key on the core print, centred in the block's inlet wall (x from
    ``wall_x`` < 0 to 0): its flats stop the core turning, its shoulders stop it sliding."""
    cy, cz = r.inlet.center_mm
    key_len = min(6.0, -wall_x - 2 * KEY_LAND_MM)
    x0 = wall_x / 2.0 - key_len / 2.0
    half = r.inlet.socket_diameter_mm / 2.0 + KEY_SHOULDER_MM
    return (x0, cy - half, cz - half), (x0 + key_len, cy + half, cz + half)


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
