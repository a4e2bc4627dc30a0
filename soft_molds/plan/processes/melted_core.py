"""Process ``melted-core`` (chosen by ``core.kind: melted``, not by ``process.kind``): the
core is cast, in wax or a low-melting alloy (``core.material``), before the silicone.

Two steps, in pour order:

1. ``core-mold``: a void-less two-part shell whose cavity is the silicone step's core
   (the same solid the one-shot mold would print and pull: voids, socket plug, print,
   key and grip tab), parted on the silicone step's plane, with sprue and vents at the
   core's own high points. Its cast is the core. The layout waits for the built core's
   bounds (:func:`soft_molds.plan.layout.plan_layout` with ``bounds``).
2. ``silicone``: the one-shot mold around that core, unchanged.

Rules of its own: one core (one core mold; several inlets are refused) and the one-shot
process (a layered or overmold recipe has no core of this kind).
"""

from __future__ import annotations

from dataclasses import replace

from ...errors import Problem
from ...recipe.contracts import bounds_of
from ...recipe.model import Recipe
from ..layout import Bounds, layout_problems, plan_layout
from ..lines import LineOf
from ..model import CastingStep, CoreMold, PartingPlane
from ..rules import printer_problems
from ..tags import core_tag
from . import casting_process
from .one_shot import steps as one_shot_steps

#: The first step's name (its output folder is ``step-1-core-mold``).
CORE_MOLD_STEP = "core-mold"


@casting_process("melted-core")
def steps(r: Recipe) -> tuple[CastingStep, ...]:
    (pour,) = one_shot_steps(r)
    (support,) = pour.core_supports
    core_mold = CastingStep(CORE_MOLD_STEP, (), (), pour.parting, None,
                            core_mold=CoreMold(support.part, r.core.material))
    return (core_mold, pour)


#: Undrained void volume below which a sampled pocket is grid noise at a void's rounded
#: edge (mm3): a few cells of the drain grid (as the drain check takes it).
NOISE_MM3 = 0.5


def melted_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """What a melted core cannot be: in a layered or overmold process, more than one core
    (each core would need a core mold of its own), or a core whose melt has no way down
    to its socket when the cast stands inlet-down (the drain rule,
    :mod:`soft_molds.plan.drain`: a pocket whose only way out lies above it keeps its
    wax or alloy)."""
    out: list[Problem] = []
    if r.process.kind != "one-shot":
        out.append(Problem("core.kind", f"melted goes with process.kind one-shot, not "
                           f"{r.process.kind}", line("core.kind"), r.core.kind,
                           "core.kind pulled (the process casts its own core), or "
                           "process.kind one-shot"))
    elif len(r.inlets) > 1:
        out.append(Problem("core.kind", f"melted makes one core mold for one core; "
                           f"{len(r.inlets)} inlets make {len(r.inlets)} cores",
                           line("core.kind"), r.core.kind,
                           "one inlet with a melted core, or core.kind pulled or dissolved"))
    else:
        out.extend(_drain_problems(r, line))
        if not out and not r.parting.auto:
            out.extend(_core_mold_problems(r, line))
    return out


def core_bounds(r: Recipe, silicone: CastingStep, parting: PartingPlane) -> Bounds:
    """The box of the core of the silicone step's one support (world mm): its voids and
    socket plug, its print, its square key and the grip tab the labels put at the print's
    outer end (which lies across the parting plane ``parting``)."""
    (sup,) = silicone.core_supports
    prims = tuple(p for group in r.void_primitives() for p in group) + (r.sockets()[0],)
    boxes = [bounds_of(prims), sup.key_box]
    cy, cz = sup.inlet.center_mm
    rad = sup.radius_mm
    x0, x1 = sorted((sup.start_x_mm, sup.end_x_mm))
    boxes.append(((x0, cy - rad, cz - rad), (x1, cy + rad, cz + rad)))
    tab = core_tag(r, sup, parting, silicone.core_supports)
    if tab is not None:
        boxes.append(tab)
    lo = tuple(min(b[0][k] for b in boxes) for k in range(3))
    hi = tuple(max(b[1][k] for b in boxes) for k in range(3))
    return lo, hi  # type: ignore[return-value]


def _core_mold_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """The rules of the mold for the core mold's block (laid around the core), known
    before anything is built when the recipe fixes its parting plane."""
    (silicone,) = one_shot_steps(r)
    parting = silicone.settled_parting
    lay = plan_layout(r, parting.axis, parting.offset_mm, core_bounds(r, silicone, parting))
    found = layout_problems(r, lay, line) + printer_problems(r, lay, line)
    return [replace(p, message=f"{p.message}, in the core mold") for p in found]


def _drain_problems(r: Recipe, line: LineOf) -> list[Problem]:
    from ..drain import drainage

    inlet = r.inlets[0]
    voids = [p for group in r.void_primitives() for p in group]
    d = drainage(voids, r.sockets()[0], inlet.at_end)
    if d.pocket_mm3 <= NOISE_MM3 or d.where_mm is None:
        return []
    x, y, z = d.where_mm
    return [Problem("core.kind", f"melted leaves {d.pocket_mm3:.1f} mm3 of the core with no "
                    f"inlet to drain through: standing inlet-down, the pocket whose lowest "
                    f"point is near ({x:.1f}, {y:.1f}, {z:.1f}) mm drains only upward",
                    line("core.kind"), r.core.kind,
                    "voids with a way down to the socket, or core.kind pulled")]


def process_of(r: Recipe) -> str:
    """The casting process that plans ``r``: ``melted-core`` for a melted core, else the
    recipe's ``process.kind``."""
    return "melted-core" if r.core.melted else r.process.kind
