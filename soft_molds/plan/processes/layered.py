"""Process ``layered``: a chambered bending finger cast in two pours.

1. ``chambered``: an open tray whose floor forms the actuator's outer top surface, filled to
   its rim; a post bridge laid on the rim hangs drafted posts into the silicone that form
   the chambers and the feed groove, so every void opens onto the poured face (the bond
   face). Pour orientation is the actuator turned over; the bridge pulls straight up.
2. ``base``: a tray whose pocket is the body below the bond face, with a guide above it the
   footprint plus the locating clearance; the base layer is poured, the strain-limiting
   sheet laid on it, and the cured chambered part pressed face down onto the liquid base.

Actuator frame as everywhere (mm): the body from the inlet face x = 0, z up; the bond face
is z = body bottom + ``process.base_mm``. Only a bar with one row of chambers is layered:
the plan refuses anything else, naming the field (exit 2), before any kernel call.
"""

from __future__ import annotations

import math

from ...errors import Problem
from ...recipe.kinds.channels import Channels
from ...recipe.model import Recipe
from ...recipe.primitives import RoundedBox
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
    chambered = Layer(LayerKind.CHAMBERED, bond, foot, posts, r.mold.clearance_mm,
                      r.mold.wall_mm)
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


def footprint(r: Recipe) -> Footprint:
    """The bar's section at the bond face: its full rectangle with the vertical edges'
    rounding (the bond face lies above the bottom rounding; see :func:`layered_problems`)."""
    b = body_box(r)
    assert b is not None
    return Footprint((b.center_mm[0], b.center_mm[1]), (b.size_mm[0], b.size_mm[1]),
                     b.radius_mm)


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
    """What keeps ``r`` from the layered process: a bar body, one inlet on the start face,
    one row of chambers whose
    every chamber stands on the bond face, a bond face above the bar's bottom rounding and
    corners round enough for the draft."""
    out: list[Problem] = []
    box = body_box(r)
    if box is None:
        return [Problem("body.kind", "cannot be cast layered", line("body.kind"),
                        getattr(r.body, "KIND", "?"), "bar")]
    lo, hi = r.body_bounds()
    bond = bond_z_mm(r)
    if r.process.base_mm < box.radius_mm or bond > hi[2] - box.radius_mm:
        out.append(Problem("process.base_mm", "puts the bond face in the bar's edge rounding",
                           line("process.base_mm"), r.process.base_mm,
                           f"{box.radius_mm:g} to {hi[2] - lo[2] - box.radius_mm:g} mm"))
        return out
    if len(r.inlets) != 1 or r.inlet.at_end:
        # The feed groove runs from the x = 0 face to the one row: one socket, there.
        path = "inlets" if "inlets" in r.lines else "inlet.face"
        return [Problem(path, "cannot be cast layered", line(path),
                        [i.face.value for i in r.inlets],
                        "one inlet on the start face (x = 0)")]
    net = network(r)
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
