"""Which inlet feeds which voids: a void opens into a socket (exact on the start face, from
the void's entry; by positive-volume overlap on the end face), the voids it is joined to
share its core, and each group of joined voids leaves through the one socket it opens into.

Frame: mm, world (x along the body from the start face x = 0)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import voidgraph
from .model import Recipe

EPS = 1e-6


@dataclass(frozen=True)
class CoreGroup:
    """One core piece: the inlet it leaves through (index into ``recipe.inlets``) and the
    voids it forms (indices into ``recipe.voids``)."""

    inlet: int
    voids: tuple[int, ...]


def opens_into(r: Recipe, j: int, i: int) -> bool:
    """Whether void ``i`` opens straight into socket ``j``. On the start face: one passage
    holds the other at the face, the void's mouth inside the socket or a void wider than
    the socket (a thin tube into a fat bore) round the whole socket section, starting
    within the socket's depth. On the end face, where a void's entry says nothing: the void
    overlaps the socket with positive volume (the void graph's test). Whether its core
    still comes out through the socket is the core-extraction check's to say."""
    inlet = r.inlets[j]
    if inlet.at_end:
        return voidgraph.joined(r.void_primitives()[i], (r.sockets()[j],))
    (ey, ez), er, ex = r.voids[i].entry()
    cy, cz = inlet.center_mm
    sock_r = inlet.socket_diameter_mm / 2.0
    off = np.hypot(ey - cy, ez - cz)
    inside = off + er <= sock_r + EPS or off + sock_r <= er + EPS
    return bool(inside and ex <= inlet.socket_depth_mm)


def fed_groups(r: Recipe) -> tuple[tuple[tuple[int, ...], tuple[int, ...]], ...]:
    """The pieces of the void set, each with the inlets it opens into: (void indices,
    inlet indices). Voids are one piece when they overlap (the void graph) or open into
    the same socket (two rows meeting only in the socket are one core). A piece with no
    inlet is not reached; one with two has two sockets for one core."""
    pieces = [(set(g), set(js)) for g, js in voidgraph.feeds(
        r.void_primitives(), lambda i, j: opens_into(r, j, i), len(r.inlets))]
    merged: list[tuple[set[int], set[int]]] = []
    for voids, inlets in pieces:
        for other in [m for m in merged if m[1] & inlets]:
            merged.remove(other)
            voids |= other[0]
            inlets |= other[1]
        merged.append((voids, inlets))
    out = sorted((tuple(sorted(v)), tuple(sorted(j))) for v, j in merged)
    return tuple(out)


def core_groups(r: Recipe) -> tuple[CoreGroup, ...]:
    """One core per inlet, in the inlets' order, for a recipe that passed validation (every
    piece of the void set fed by exactly one inlet, every inlet feeding a piece)."""
    by_inlet = {js[0]: g for g, js in fed_groups(r) if len(js) == 1}
    return tuple(CoreGroup(j, by_inlet.get(j, ())) for j in range(len(r.inlets)))
