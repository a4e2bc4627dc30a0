"""The choice of a parting plane for ``parting: auto``.

The plan proposes candidate planes from the body's geometry; the analysis stage scores each
on the built cast and core (locked undercut area, core-print lock, least draft); the plan
then takes the best usable one. Mm, world frame.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from ..errors import GeometryError
from ..recipe.model import Parting, Recipe
from .model import PlaneScore
from .sections import widest_offset

#: Fractions of the half extent, either side of the widest section, tried as offsets.
OFFSET_FRACTIONS = (0.25, 0.5)


def candidate_planes(r: Recipe) -> list[tuple[str, float]]:
    """Planes worth trying, for each cross axis (the body's thinner direction first): the
    plane through the socket axis (where the core print seats), the body's widest section
    along that axis, and planes a quarter and a half of the half extent either side of it.
    With several sockets only the planes through every socket's axis are kept (each core
    print must seat in both shells); there may then be none."""
    from .rules import through_sockets

    cy, cz = r.inlet.center_mm
    lo, hi = r.body_bounds()
    prims = r.body_primitives()
    axes = ("y", "z") if hi[1] - lo[1] < hi[2] - lo[2] else ("z", "y")
    out: list[tuple[str, float]] = []
    for ax in axes:
        w = 2 if ax == "z" else 1
        mid, _ = widest_offset(prims, 3 - w, w)
        half = (hi[w] - lo[w]) / 2.0
        offsets = [cy if ax == "y" else cz, mid]
        for f in OFFSET_FRACTIONS:
            offsets += [mid - f * half, mid + f * half]
        for off in offsets:
            key = (ax, round(off, 6) + 0.0)
            if key not in out:
                out.append(key)
    if len(r.inlets) > 1:
        out = [(ax, off) for ax, off in out if through_sockets(r, ax, off)]
    return out


def rank(scores: Sequence[PlaneScore]) -> list[PlaneScore]:
    """Usable planes first, best first (least locked area, then the greatest least draft,
    then the candidates' own order)."""
    order = sorted(range(len(scores)),
                   key=lambda i: (not scores[i].usable, scores[i].key(), i))
    return [scores[i] for i in order]


def choose(r: Recipe, ranked: Sequence[PlaneScore]) -> Recipe:
    """The recipe with the best ranked plane filled in. When every plane locks the core
    print, the best of those that keep the rules of the mold is taken anyway: the review
    then reports the lock as an error finding (a verdict the person can act on), not a
    kernel failure. GeometryError only when no plane keeps the rules, which validation
    (:func:`soft_molds.plan.plan_problems`) has already refused."""
    best = next((s for s in ranked if s.rule is None), ranked[0])
    if best.rule is not None:
        raise GeometryError("choose the parting plane", "no candidate plane releases the "
                            f"cast: best {best.axis} = {best.offset_mm:g} mm {best.rule}")
    return replace(r, parting=Parting(best.axis, best.offset_mm))
