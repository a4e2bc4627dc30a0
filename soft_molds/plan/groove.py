"""The open groove of a ring cuff (``annulus`` with ``opens_to: outside``): two flat plates
form it, and the layout keeps the block's keys, clamp holes and notches off their path.

Frame (world, mm; the ring's frame): the ring's axis runs along z through (R, 0), R its
outer radius; the parting plane is z = 0. The groove (bottom radius r, height t) is open at
the outer face. A rib of the shells split at z = 0 would lock against the groove's walls,
so the groove is formed by two plates of thickness t lying in the parting plane, split by
the plane y = 0 (through the ring's axis): the plate on the +y side is the box
x in [-m, 2R + m], y in [0, the block's +y face + the grip], |z| <= t/2, less the cylinder
of radius r about the axis; the other is its mirror. Each pulls along its own +-y: a point
of its half of the groove bottom has the cast's outward normal (cos a, sin a, 0) with
sin a >= 0 on its side, so moving along +y it leaves the silicone or slides along it
(never into it), and the walls z = +-t/2 are parallel to the pull. Each plate's box is
swept along its pull already, so the shells' pocket (the plates themselves) lets it slide
out. The plates cover x in [-m, 2R + m] across the whole block: registration keys and
clamp holes go to the block's x ends, the pry notches to its +-x faces.
"""

from __future__ import annotations

from dataclasses import replace

from ..errors import Problem
from ..recipe.model import Recipe
from .layout import MIN_LAND_MM, NOTCH_DEPTH_MM, NOTCH_LENGTH_MM, Layout
from .lines import LineOf
from .model import GroovePlate

#: How far each plate reaches past the ring's outer face along x (mm): its side faces then
#: stand clear of the ring instead of touching its outer face on a line.
PLATE_MARGIN_MM = 2.0
#: Part names of the plates: +y first.
PLATE_PARTS = ("plate-1", "plate-2")


def groove_plates(r: Recipe, lay: Layout) -> tuple[GroovePlate, ...]:
    """The two plates of the recipe's open groove in the block of ``lay`` (empty when the
    recipe has none)."""
    g = r.groove()
    if g is None:
        return ()
    cx, cy = g.center_mm
    big = g.outer_radius_mm
    half = g.height_mm / 2.0
    x0, x1 = cx - big - PLATE_MARGIN_MM, cx + big + PLATE_MARGIN_MM
    grip = r.mold.core_handle_mm
    out = []
    for part, sign in zip(PLATE_PARTS, (1.0, -1.0)):
        far = (lay.block_hi[1] if sign > 0 else lay.block_lo[1]) + sign * grip
        y0, y1 = sorted((cy, far))
        out.append(GroovePlate(part, ((x0, y0, -half), (x1, y1, half)), (cx, cy),
                               g.bottom_radius_mm, (0.0, sign, 0.0)))
    return tuple(out)


def key_offset_mm(r: Recipe) -> float:
    """How far the keys sit from the block's middle along y (mm): clear of the pry notch
    centred on each x face by a land."""
    m = r.mold
    return NOTCH_LENGTH_MM / 2.0 + m.key_diameter_mm / 2.0 + m.clearance_mm + MIN_LAND_MM


def groove_layout(r: Recipe, lay: Layout) -> Layout:
    """``lay`` with its keys, clamp holes and notches on the block's x ends, off the plates'
    strip: a clamp hole in each corner, three keys on the band's centre lines across the
    x ends (two at +a from the middle, one at -a: no half turn or mirror maps them onto
    themselves), a pry notch in the middle of each x face."""
    m = r.mold
    va = lay.frame.v_axis
    inset = m.flange_mm / 2.0
    u0, u1 = lay.block_lo[0] + inset, lay.block_hi[0] - inset
    v0, v1 = lay.block_lo[va] + inset, lay.block_hi[va] - inset
    vc = (lay.block_lo[va] + lay.block_hi[va]) / 2.0
    a = key_offset_mm(r)
    bolts = (((u0, v0), (u1, v0), (u0, v1), (u1, v1)) if m.clamp_hole_mm is not None
             else ())
    keys = ((u0, vc + a), (u1, vc + a), (u0, vc - a))
    notches = ((lay.block_hi[0], vc, 2 * NOTCH_DEPTH_MM, NOTCH_LENGTH_MM),
               (lay.block_lo[0], vc, 2 * NOTCH_DEPTH_MM, NOTCH_LENGTH_MM))
    return replace(lay, bolts_uv=bolts, keys_uv=keys, notches=notches)


def groove_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """What keeps the plates' mold from being built: a lost core or magnets (there is no
    core). The keys and clamp holes always clear the plates' strip: the layout's own rule
    keeps each within flange_mm / 2 - MIN_LAND_MM of the band's centre line, which lies
    mold.wall_mm (>= 4 mm) beyond the ring, and the strip PLATE_MARGIN_MM beyond it; the
    keys against the clamp holes are the layout's rules too (``layout_problems``)."""
    if r.groove() is not None and (r.core.lost or r.core.magnets):
        return [Problem("core", "is set, but an open groove has no core: two plates form "
                        "it and slide out", line("core"),
                        r.core.kind if r.core.lost else r.core.support,
                        "leave out the core block (core.kind: pulled, support: prints)")]
    return []
