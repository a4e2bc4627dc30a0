"""Process ``one-shot``: one pour into a two-part shell around pull-out cores, one per group
of joined voids, each held by a core print at its inlet (on the start face x = 0 or the end
face x = the body's length)."""

from __future__ import annotations

from ...errors import Problem
from ...recipe.feeds import core_groups
from ...recipe.model import InletFace, Recipe
from ..groove import groove_plates
from ..layout import MIN_LAND_MM, block_band_mm, plan_layout
from ..lines import LineOf
from ..model import CastingStep, CoreSupport, Inlet, PartingPlane
from . import casting_process

#: The one pour of this process (also the output folder name of multi-step processes).
STEP = "silicone"
#: Wall left on each side of the core key pocket (mm), toward the cavity and outside.
KEY_LAND_MM = 1.5
#: How far the square key stands out beyond the round print on each side (mm).
KEY_SHOULDER_MM = 1.5


@casting_process("one-shot")
def steps(r: Recipe) -> tuple[CastingStep, ...]:
    inlets = tuple(Inlet(i.center_mm, i.socket_diameter_mm, i.socket_depth_mm, i.face)
                   for i in r.inlets)
    groups = core_groups(r)
    # One core keeps the part name it always had; several are numbered in inlet order.
    names = ["core"] if len(groups) == 1 else [f"core-{n}" for n in range(1, len(groups) + 1)]
    supports = tuple(core_support(r, inlets[g.inlet], name, g.voids)
                     for g, name in zip(groups, names))
    parting = None if r.parting.auto else PartingPlane(r.parting.axis,
                                                       float(r.parting.offset_mm or 0.0))
    layout = None if parting is None else plan_layout(r, parting.axis, parting.offset_mm)
    # An open groove (no inlet, no core) is formed by two plates; its parting is fixed.
    plates = () if layout is None else groove_plates(r, layout)
    return (CastingStep(STEP, inlets, supports, parting, layout, plates=plates),)


def core_support(r: Recipe, inlet: Inlet, part: str = "core",
                 voids: tuple[int, ...] = ()) -> CoreSupport:
    """The core print through the block's wall at the inlet's face (on the start face x from
    -(wall + flange) to 0; on the end face mirrored about the body's middle), standing out
    ``mold.core_handle_mm`` beyond it, with its square key centred in that wall."""
    lo, hi = r.body_bounds()
    band = block_band_mm(r)
    cy, cz = inlet.center_mm
    key_len = min(6.0, band - 2 * KEY_LAND_MM)
    half = inlet.socket_diameter_mm / 2.0 + KEY_SHOULDER_MM
    radius = inlet.socket_diameter_mm / 2.0
    if inlet.face is InletFace.END:
        wall_x = hi[0] + band
        x0 = (hi[0] + wall_x) / 2.0 - key_len / 2.0
        key = ((x0, cy - half, cz - half), (x0 + key_len, cy + half, cz + half))
        return CoreSupport(inlet, wall_x + r.mold.core_handle_mm,
                           hi[0] - inlet.socket_depth_mm, radius, key, (1.0, 0.0, 0.0),
                           part, voids)
    wall_x = lo[0] - band
    x0 = wall_x / 2.0 - key_len / 2.0
    key = ((x0, cy - half, cz - half), (x0 + key_len, cy + half, cz + half))
    return CoreSupport(inlet, wall_x - r.mold.core_handle_mm, inlet.socket_depth_mm,
                       radius, key, part=part, voids=voids)


def print_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """Two core prints in one face must keep a land of mold between their key pockets
    (each the key grown by the fit's clearance), or the pockets merge and neither key is
    held."""
    sups = steps(r)[0].core_supports
    c = r.mold.clearance_mm
    out: list[Problem] = []
    for b, sb in enumerate(sups):
        for sa in sups[:b]:
            if sa.inlet.face != sb.inlet.face:
                continue
            (alo, ahi), (blo, bhi) = sa.key_box, sb.key_box
            gap = max(max(blo[k] - ahi[k], alo[k] - bhi[k]) for k in (1, 2)) - 2.0 * c
            if gap >= MIN_LAND_MM:
                continue
            j = r.inlets.index(next(i for i in r.inlets if i.center_mm == sb.inlet.center_mm
                                    and i.face == sb.inlet.face))
            i = r.inlets.index(next(i for i in r.inlets if i.center_mm == sa.inlet.center_mm
                                    and i.face == sa.inlet.face))
            at = f"{r.inlet_path(j)}.center_mm"
            need = (sa.inlet.socket_diameter_mm + sb.inlet.socket_diameter_mm) / 2.0 \
                + 2.0 * KEY_SHOULDER_MM + 2.0 * c + MIN_LAND_MM
            out.append(Problem(at, f"puts its core print's key pocket {gap:.2f} mm from the "
                               f"key pocket of {r.inlet_path(i)}'s print", line(at),
                               list(sb.inlet.center_mm),
                               f"at least {MIN_LAND_MM:g} mm of mold between them: socket "
                               f"centres at least {need:g} mm apart across the face"))
    return out
