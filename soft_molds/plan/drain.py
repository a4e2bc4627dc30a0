"""Whether a lost core's solution or melt drains: with the part standing inlet-down, every
bit of the void set must reach the tube socket without climbing. A pocket whose only way
out lies above it keeps its liquid (and the dissolved or melted core with it). The plan
refuses a melted core with such a pocket; the drain check reports it for a dissolved one.

Method: the voids are sampled on a grid of cubes (``cell_mm``; a cube is void when the
recipe primitives' exact distance at its centre is negative). The height is the distance
from the socket's face along the body (x for a start-face socket, length - x for an end
face), so the grid's slices along x are level. Liquid moves level within a slice or down to
the slice below; so, walking up from the socket, a cell drains when it is joined within its
slice (faces shared, scipy's connected-component labelling) to a cell that stands on a
draining cell of the slice below, or lies in the socket. Units: mm, mm3; frame: world.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy import ndimage

from ..recipe.contracts import bounds_of
from ..recipe.primitives import Primitive, union_sdf


@dataclass(frozen=True)
class Drainage:
    """``pocket_mm3``: void volume that does not drain (0 when all of it does), its lowest
    point ``where_mm`` (world; None without a pocket) and the void volume sampled."""

    pocket_mm3: float
    where_mm: tuple[float, float, float] | None
    void_mm3: float


def drainage(voids: Sequence[Primitive], socket: Primitive, at_end: bool,
             cell_mm: float = 0.5) -> Drainage:
    """How much of the union of ``voids`` and ``socket`` keeps its liquid when the part
    stands on the socket's face (``at_end``: the socket is in the x = length face, which
    is then the lowest)."""
    prims = (*voids, socket)
    lo, hi = (np.asarray(b, dtype=np.float64) for b in bounds_of(tuple(prims)))
    n = np.maximum(np.ceil((hi - lo) / cell_mm).astype(int), 1)
    axes = [lo[k] + cell_mm * (np.arange(n[k]) + 0.5) for k in range(3)]
    gx, gy, gz = np.meshgrid(*axes, indexing="ij")
    pts = np.stack([gx.ravel(), gy.ravel(), gz.ravel()], axis=1)
    inside = (union_sdf(prims, pts) < 0.0).reshape(n)
    outlet = (union_sdf((socket,), pts) < 0.0).reshape(n) & inside
    if at_end:  # walk up from the x = length face
        inside, outlet = inside[::-1], outlet[::-1]
    drained = np.zeros_like(inside)
    below = np.zeros(inside.shape[1:], dtype=bool)
    for i in range(n[0]):
        seeds = inside[i] & (below | outlet[i])
        labels, _ = ndimage.label(inside[i])
        keep = np.unique(labels[seeds])
        drained[i] = np.isin(labels, keep[keep > 0])
        below = drained[i]
    if at_end:
        inside, drained = inside[::-1], drained[::-1]
    pocket = inside & ~drained
    vol = cell_mm ** 3
    if not pocket.any():
        return Drainage(0.0, None, float(inside.sum()) * vol)
    idx = np.argwhere(pocket)
    low = idx[np.argmax(idx[:, 0])] if at_end else idx[np.argmin(idx[:, 0])]
    where = tuple(float(axes[k][low[k]]) for k in range(3))
    return Drainage(float(pocket.sum()) * vol, where, float(inside.sum()) * vol)  # type: ignore[arg-type]
