"""Process ``one-shot``: one pour into a two-part shell around one pull-out core held by a
core print at the inlet."""

from __future__ import annotations

from ...recipe.model import Recipe
from ..layout import block_band_mm, plan_layout
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
    inlet = Inlet(r.inlet.center_mm, r.inlet.socket_diameter_mm, r.inlet.socket_depth_mm)
    parting = None if r.parting.auto else PartingPlane(r.parting.axis,
                                                       float(r.parting.offset_mm or 0.0))
    layout = None if parting is None else plan_layout(r, parting.axis, parting.offset_mm)
    return (CastingStep(STEP, (inlet,), (core_support(r, inlet),), parting, layout),)


def core_support(r: Recipe, inlet: Inlet) -> CoreSupport:
    """The core print through the block's inlet wall (x from -(wall + flange) to 0), standing
    out ``mold.core_handle_mm`` beyond it, with its square key centred in that wall."""
    wall_x = r.body_bounds()[0][0] - block_band_mm(r)
    cy, cz = inlet.center_mm
    key_len = min(6.0, -wall_x - 2 * KEY_LAND_MM)
    x0 = wall_x / 2.0 - key_len / 2.0
    half = inlet.socket_diameter_mm / 2.0 + KEY_SHOULDER_MM
    key = ((x0, cy - half, cz - half), (x0 + key_len, cy + half, cz + half))
    return CoreSupport(inlet, wall_x - r.mold.core_handle_mm, inlet.socket_depth_mm,
                       inlet.socket_diameter_mm / 2.0, key)
