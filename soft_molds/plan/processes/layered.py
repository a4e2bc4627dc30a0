"""Process ``layered``: a chambered bending finger cast in two pours.

1. ``chambered``: an open tray whose floor forms the actuator's outer top surface, filled to
   its rim; a post bridge laid on the rim hangs drafted posts into the silicone that form
   the chambers and the feed groove, so every void opens onto the poured face (the bond
   face). Pour orientation is the actuator turned over; the bridge pulls straight up.
2. ``base``: a tray whose pocket is the body below the bond face, with a guide above it the
   footprint plus the locating clearance; the base layer is poured, the strain-limiting
   sheet laid on it, and the cured chambered part pressed face down onto the liquid base.

Actuator frame as everywhere (mm): the body from the inlet face x = 0, z up; the bond face
is z = body bottom + ``process.base_mm``. Only a bar or a plate with one row of chambers is
layered: the plan refuses anything else, naming the field (exit 2), before any kernel call.
A plate's footprint is its outline (lines and arcs): the base tray's guide is that outline
moved out by the clearance and the sheet that outline moved in by the cover margin (exact
parallel curves, ``recipe/outline.offset_outline``); the trays and the bridge stay
rectangular blocks round the body's bounds.
"""

from __future__ import annotations

import math

import numpy as np

from ...errors import Problem
from ...recipe.fields import MIN_SIZE_MM
from ...recipe.kinds.channels import Channels
from ...recipe.model import Recipe
from ...recipe.outline import PieceOutline, RoundedPolygon
from ...recipe.primitives import RoundedBox, Slab
from ..lines import LineOf
from ..model import CastingStep, Footprint, Layer, LayerKind, Post
from . import casting_process
from .layered_network import network_posts, network_problems

#: Step names, in pour order (output folders step-1-chambered, step-2-base).
CHAMBERED, BASE = "chambered", "base"
#: A chamber bottom this close to the bond face lies on it (mm): float noise.
ON_FACE_MM = 1e-6
#: How far the feed groove's post runs beyond the inlet face (mm), so the groove opens
#: cleanly there instead of ending in a sliver of silicone.
FEED_OVERRUN_MM = 1.0


def _problems(r: Recipe, line: LineOf) -> list[Problem]:
    return layered_problems(r, line)


@casting_process("layered", problems=_problems)
def steps(r: Recipe) -> tuple[CastingStep, ...]:
    bond = bond_z_mm(r)
    foot = footprint(r)
    posts = all_posts(r)
    hole = (bar_overflow_xy_mm(r, posts) if foot.outline is None
            else overflow_xy_mm(foot, posts, r.mold.vent_diameter_mm))
    chambered = Layer(LayerKind.CHAMBERED, bond, foot, posts, r.mold.clearance_mm,
                      r.mold.wall_mm, overflow_xy_mm=hole)
    inset = None if r.process.sheet == "none" else r.process.cover_margin_mm
    base = Layer(LayerKind.BASE, bond, foot, (), r.mold.clearance_mm, r.mold.wall_mm, inset)
    return (CastingStep(CHAMBERED, (), (), None, None, layer=chambered),
            CastingStep(BASE, (), (), None, None, layer=base))


def all_posts(r: Recipe) -> tuple[Post, ...]:
    """Every post of the chambered step: a channel network's, or a chamber row's and its
    feed groove's."""
    net = network(r)
    if net is not None:
        return network_posts(net, 0, bond_z_mm(r), r.process.draft_deg, FEED_OVERRUN_MM)
    return chamber_posts(r) + (feed_post(r),)


def network(r: Recipe) -> Channels | None:
    """The recipe's channel network, when its one void is one."""
    if len(r.voids) == 1 and isinstance(r.voids[0], Channels):
        return r.voids[0]
    return None


def body_box(r: Recipe) -> RoundedBox | None:
    prims = r.body_primitives()
    if len(prims) == 1 and isinstance(prims[0], RoundedBox):
        return prims[0]
    return None


def bond_z_mm(r: Recipe) -> float:
    lo, _ = r.body_bounds()
    return lo[2] + r.process.base_mm


def body_slab(r: Recipe) -> Slab | None:
    prims = r.body_primitives()
    if len(prims) == 1 and isinstance(prims[0], Slab):
        return prims[0]
    return None


def footprint(r: Recipe) -> Footprint:
    """The body's section at the bond face. A bar's: its full rectangle with the vertical
    edges' rounding (the bond face lies above the bottom rounding; see
    :func:`layered_problems`). A plate's: its outline (its sides are upright)."""
    b = body_box(r)
    if b is not None:
        return Footprint((b.center_mm[0], b.center_mm[1]), (b.size_mm[0], b.size_mm[1]),
                         b.radius_mm)
    slab = body_slab(r)
    assert slab is not None
    return Footprint.of_outline(PieceOutline(slab.outline.pieces()))


def bar_overflow_xy_mm(r: Recipe, posts: tuple[Post, ...]) -> tuple[float, float] | None:
    """Where a bar's overflow hole goes (x, y): midway between the last post and the body's
    far end on y = 0, where the excess silicone rises when the bridge is lowered (None: less
    than the vent diameter + 2 mm between them, no room for it)."""
    _, hi = r.body_bounds()
    far = max(p.x_span_mm()[1] for p in posts)
    if hi[0] - far < r.mold.vent_diameter_mm + 2.0:
        return None
    return ((far + hi[0]) / 2.0, 0.0)


#: Grid step (mm) on which a plate's overflow hole is placed.
HOLE_GRID_MM = 1.0
#: Plastic (mm) the overflow hole keeps from the footprint's edge and from every post.
HOLE_CLEAR_MM = 1.0


def overflow_xy_mm(foot: Footprint, posts: tuple[Post, ...], diameter_mm: float
                   ) -> tuple[float, float] | None:
    """Where a plate's overflow hole goes (x, y), or None: no room. As a bar's, midway
    between the last post and the outline's far end along the footprint's middle line
    (y of its bounds' centre), when that point lies at least radius + HOLE_CLEAR_MM inside
    the edge and from every post (the excess rises into the hole, not round a post).
    Else a point of a grid over the footprint that keeps those distances; among them
    those past every post along x if any, and of those the one farthest from the nearest
    post (when tied, the one nearest the middle line)."""
    assert foot.outline is not None
    keep = diameter_mm / 2.0 + HOLE_CLEAR_MM
    sharp = [RoundedPolygon(p.outline_mm(), (0.0,) * len(p.outline_mm())) for p in posts]
    far = max(p.x_span_mm()[1] for p in posts)
    # As a bar's: midway between the last post and the far end, on the middle line.
    cy = foot.center_mm[1]
    _, x_end = foot.outline.chords(0, np.array([cy]))
    if not np.isnan(x_end[0]):
        mid = np.array([[(far + float(x_end[0])) / 2.0, cy]])
        if foot.outline.sdf(mid)[0] <= -keep and all(q.sdf(mid)[0] >= keep for q in sharp):
            return (float(mid[0, 0]) + 0.0, float(mid[0, 1]) + 0.0)
    (x0, y0), (x1, y1) = foot.outline.bounds()
    gx = np.arange(math.ceil(x0 / HOLE_GRID_MM), math.floor(x1 / HOLE_GRID_MM) + 1)
    gy = np.arange(math.ceil(y0 / HOLE_GRID_MM), math.floor(y1 / HOLE_GRID_MM) + 1)
    grid = HOLE_GRID_MM * np.stack(np.meshgrid(gx, gy, indexing="ij"), axis=-1).reshape(-1, 2)
    grid = grid[foot.outline.sdf(grid) <= -keep]
    if not len(grid):
        return None
    near = np.full(len(grid), np.inf)
    for q in sharp:
        np.minimum(near, q.sdf(grid), out=near)
    ok = near >= keep
    if not ok.any():
        return None
    beyond = ok & (grid[:, 0] >= far + keep)
    pick = beyond if beyond.any() else ok
    # Ties (to 0.01 mm) go to the point nearest the footprint's middle line along x.
    score = np.where(pick, np.round(near, 2), -np.inf)
    best = np.flatnonzero(score == score.max())
    i = int(best[np.argmin(np.abs(grid[best, 1] - foot.center_mm[1]))])
    return (float(grid[i, 0]) + 0.0, float(grid[i, 1]) + 0.0)


def chamber_posts(r: Recipe) -> tuple[Post, ...]:
    """One post per chamber: its footprint at the bond face, standing to the chamber's top."""
    bond, draft = bond_z_mm(r), r.process.draft_deg
    out = []
    for i, v in enumerate(r.voids):
        for k, c in enumerate(v.chamber_boxes(r.body_length_mm)):  # type: ignore[attr-defined]
            top = c.center_mm[2] + c.size_mm[2] / 2.0
            out.append(Post(f"voids[{i}] chamber {k + 1}", (c.center_mm[0], c.center_mm[1]),
                            (c.size_mm[0], c.size_mm[1]), c.radius_mm, bond, top - bond,
                            draft))
    return tuple(out)


def feed_post(r: Recipe) -> Post:
    """The feed groove: square, the feed diameter on a side, on the bond face from beyond
    the inlet face to the middle of the last chamber (where it ends inside that chamber)."""
    v = r.voids[0]
    rod = v.feed_channel(r.body_length_mm)  # type: ignore[attr-defined]
    d = 2.0 * rod.radius_mm
    x0, x1 = -FEED_OVERRUN_MM, rod.start_mm + rod.length_mm
    return Post("voids[0] feed channel", ((x0 + x1) / 2.0, rod.center_mm[0]), (x1 - x0, d),
                0.0, bond_z_mm(r), d, r.process.draft_deg)


def layered_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """What keeps ``r`` from the layered process: a bar or plate body, one inlet on the
    start face, one row of chambers whose every chamber stands on the bond face, a bond
    face above the bar's bottom rounding (inside the plate's thickness) and corners round
    enough for the draft."""
    out: list[Problem] = []
    box = body_box(r)
    if box is None and body_slab(r) is not None:
        return plate_problems(r, line)
    if box is None:
        return [Problem("body.kind", "cannot be cast layered", line("body.kind"),
                        getattr(r.body, "KIND", "?"), "bar, plate")]
    lo, hi = r.body_bounds()
    bond = bond_z_mm(r)
    if r.process.base_mm < box.radius_mm or bond > hi[2] - box.radius_mm:
        out.append(Problem("process.base_mm", "puts the bond face in the bar's edge rounding",
                           line("process.base_mm"), r.process.base_mm,
                           f"{box.radius_mm:g} to {hi[2] - lo[2] - box.radius_mm:g} mm"))
        return out
    return out + row_problems(r, line)


def plate_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """A plate's own: the bond face inside its thickness, the sheet's margin and the
    mold's clearance both fitting its outline; then the row's (:func:`row_problems`)."""
    lo, hi = r.body_bounds()
    thick = hi[2] - lo[2]
    if r.process.base_mm > thick - MIN_SIZE_MM:
        return [Problem("process.base_mm", "puts the bond face at or above the plate's top",
                        line("process.base_mm"), r.process.base_mm,
                        f"less than body.thickness_mm ({thick:g} mm)")]
    foot = footprint(r)
    if r.process.sheet != "none" and not foot.fits_offset(r.process.cover_margin_mm):
        return [Problem("process.cover_margin_mm", "does not fit the plate's outline: the "
                        "sheet's edge moved in by it leaves no sheet, or breaks it apart",
                        line("process.cover_margin_mm"), r.process.cover_margin_mm,
                        "a margin below half the outline's narrowest width")]
    if not foot.fits_offset(-r.mold.clearance_mm):
        return [Problem("mold.clearance_mm", "does not fit the plate's outline: the base "
                        "tray's guide, the outline moved out by it, closes a notch of it",
                        line("mold.clearance_mm"), r.mold.clearance_mm,
                        "a clearance below half the outline's narrowest notch")]
    return row_problems(r, line)


def row_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """One inlet on the start face and one row of chambers standing on the bond face, with
    corners round enough for the draft and a feed groove lower than the chambers."""
    out: list[Problem] = []
    lo, _ = r.body_bounds()
    bond = bond_z_mm(r)
    net = network(r)
    if net is not None and not r.inlets:  # the groove opens on the outline: no socket
        return out + network_problems(r, net, 0, bond, line)
    if len(r.inlets) != 1 or r.inlet.at_end:
        # The feed groove runs from the x = 0 face to the one row: one socket, there.
        path = "inlets" if "inlets" in r.lines else "inlet.face"
        return [Problem(path, "cannot be cast layered", line(path),
                        [i.face.value for i in r.inlets],
                        "one inlet on the start face (x = 0)")]
    if net is not None:
        return out + network_problems(r, net, 0, bond, line)
    if len(r.voids) != 1 or getattr(r.voids[0], "KIND", None) != "chambers":
        return [Problem("voids", "cannot be cast layered", line("voids"),
                        ", ".join(getattr(v, "KIND", "?") for v in r.voids),
                        "one chambers entry or one channels entry")]
    tan = math.tan(math.radians(r.process.draft_deg))
    for p, c in zip(chamber_posts(r), r.voids[0].chamber_boxes(r.body_length_mm)):  # type: ignore[attr-defined]
        bottom = c.center_mm[2] - c.size_mm[2] / 2.0
        if abs(bottom - bond) > ON_FACE_MM:
            out.append(Problem(
                "voids[0].center_mm", f"{p.name} does not reach the bond face: its bottom "
                f"is at z = {bottom:g} mm, the bond face at z = {bond:g} mm",
                line("voids[0].center_mm"), bottom,
                f"chambers standing on the bond face (process.base_mm = "
                f"{bottom - lo[2]:g}, or move the row)"))
            break
        if 0.0 < p.corner_radius_mm < p.height_mm * tan:
            out.append(Problem("voids[0].corner_radius_mm", f"is too small for the draft "
                               f"on {p.name}", line("voids[0].corner_radius_mm"),
                               p.corner_radius_mm, f"at least {p.height_mm * tan:.3g} mm"))
            break
    feed = feed_post(r)
    if feed.height_mm >= min((p.height_mm for p in chamber_posts(r)), default=0.0):
        out.append(Problem("voids[0].feed_diameter_mm", "makes the feed groove as tall as "
                           "the chambers", line("voids[0].feed_diameter_mm"),
                           feed.size_mm[1], "less than the chamber height"))
    return out
