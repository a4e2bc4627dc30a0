"""Disc magnets that hold a core in its seat, as numbers (world mm): one magnet pressed
into a blind pocket in the underside of the core print's square key, one into a pocket in
the lower shell's seat right below it, coaxial along the pour's up, attracting each other
across the seat's fit. Both pockets are in rigid printed parts; none reaches the cast.

The geometry stage cuts them; the checks measure their walls; the card lists the magnets.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import Problem
from ..recipe.model import Recipe
from .lines import LineOf
from .model import CoreSupport, PartingPlane

#: Each pocket is this much deeper than its magnet, room for a burr or a drop of glue
#: behind a magnet pressed flush with the face (mm; from memory).
POCKET_DEPTH_CLEARANCE_MM = 0.2


@dataclass(frozen=True)
class MagnetPockets:
    """The two coaxial pockets of one core's magnet pair. ``axis`` is the world axis index
    of the pour's up (the parting axis); ``centre_mm`` the pockets' common axis at the
    key's underside (world); ``core_face_mm`` / ``seat_face_mm`` the up-coordinates of the
    faces they open on (the key's underside, the seat's floor below it, one fit clearance
    lower); the core's pocket runs up from its face, the seat's down from its own, each
    ``depth_mm`` deep and ``diameter_mm`` across."""

    part: str
    axis: int
    centre_mm: tuple[float, float, float]
    core_face_mm: float
    seat_face_mm: float
    diameter_mm: float
    depth_mm: float

    @property
    def radius_mm(self) -> float:
        return self.diameter_mm / 2.0


def pocket_diameter_mm(r: Recipe) -> float:
    return r.core.magnet_diameter_mm + r.core.press_fit_mm


def pocket_depth_mm(r: Recipe) -> float:
    return r.core.magnet_thickness_mm + POCKET_DEPTH_CLEARANCE_MM


def magnet_pockets(r: Recipe, sup: CoreSupport, parting: PartingPlane) -> MagnetPockets | None:
    """The pocket pair of ``sup``'s core, centred under its key; None without magnets."""
    if not r.core.magnets:
        return None
    wa = parting.w_axis
    lo, hi = sup.key_box
    centre = [(a + b) / 2.0 for a, b in zip(lo, hi)]
    centre[wa] = lo[wa]
    return MagnetPockets(sup.part, wa, (centre[0], centre[1], centre[2]), lo[wa],
                         lo[wa] - r.mold.clearance_mm, pocket_diameter_mm(r),
                         pocket_depth_mm(r))


def print_wall_mm(r: Recipe) -> float:
    """The thinnest wall a printer lays as a solid: its perimeters x nozzle (mm)."""
    return r.printer.perimeters * r.printer.nozzle_mm


def core_pocket_walls_mm(sup: CoreSupport, pockets: MagnetPockets) -> float:
    """The thinnest planned wall round the core's pocket: from its rim to the key's faces
    across the up axis, and from its floor to the key's top (mm)."""
    lo, hi = sup.key_box
    c, rp = pockets.centre_mm, pockets.radius_mm
    side = min(min(c[k] - lo[k], hi[k] - c[k]) - rp for k in range(3) if k != pockets.axis)
    floor = hi[pockets.axis] - (pockets.core_face_mm + pockets.depth_mm)
    return min(side, floor)


def magnet_problems(r: Recipe, supports: tuple[CoreSupport, ...], parting: PartingPlane,
                    line: LineOf) -> list[Problem]:
    """A magnet pocket whose wall in the key would be thinner than a printed wall."""
    out: list[Problem] = []
    if not r.core.magnets:
        return out
    wall = print_wall_mm(r)
    for sup in supports:
        pockets = magnet_pockets(r, sup, parting)
        assert pockets is not None
        got = core_pocket_walls_mm(sup, pockets)
        if got + 1e-9 >= wall:
            continue
        lo, hi = sup.key_box
        room = min(hi[k] - lo[k] for k in range(3) if k != pockets.axis)
        biggest = room - 2.0 * wall - r.core.press_fit_mm
        at = "core.magnet_diameter_mm"
        out.append(Problem(at, f"leaves {got:.2f} mm of plastic round the magnet pocket in "
                           f"{sup.part}'s print key ({room:g} mm across)", line(at),
                           r.core.magnet_diameter_mm,
                           f"a magnet of at most {biggest:.2f} mm (a printed wall of "
                           f"{wall:g} mm each side), or a wider socket"))
    return out


def magnet_kind_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """Magnets on a core without a printed core print to carry them: the layered process
    has no core print, and a melted core's print is cast in wax or alloy, an overmold's
    in the core mold of its own steps (not offered yet)."""
    if not r.core.magnets:
        return []
    at = "core.support"
    if r.process.kind == "layered":
        why = "the layered process has no core print to hold a magnet"
    elif r.process.kind != "one-shot":
        why = f"the {r.process.kind} process's core print takes no magnets yet"
    elif r.core.melted:
        why = "a melted core's print is cast, not printed, and takes no magnet pocket"
    else:
        return []
    return [Problem(at, why, line(at) or line("core"), r.core.support,
                    "prints, or magnets/both on a one-shot recipe whose core is pulled or "
                    "dissolved (a printed core print)")]
