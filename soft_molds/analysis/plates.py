"""Print plates: the printable parts of one variant or a family, each in its print pose,
packed onto as few printer beds as they fit.

Frames and units. A part's pose comes from its print plan (``down``: the world unit vector
of the face put on the bed; ``turn_deg``: the turn about the vertical after that, see
:mod:`soft_molds.analysis.printability`). The *bed frame* is mm with its origin at a corner
of the bed, x along ``bed_mm[0]``, y along ``bed_mm[1]``, z up from the bed surface. A
placed part lies with its lowest point on z = 0 and its footprint box inside
[0, bed_x] x [0, bed_y].

Packing. Each part is taken as its footprint box in the pose, grown by ``gap_mm`` on one
x side and one y side (so two boxes packed edge to edge keep ``gap_mm`` between the parts),
in a bin the bed's size grown the same way. The maximal-rectangles packer of the
``rectpack`` library places the boxes (a few placement rules and orders are tried, the
first that places every box kept), a box may be turned a quarter turn (the part stays on
the same face); sizes are handed to it in whole hundredths of a millimetre (boxes rounded
up, the bed down), so its arithmetic is exact and no rounding lets a part over the edge.

Groups (a variant's parts) stay together where they fit: groups are taken in the order
given, each is added to the first plate that still holds the whole group (the plate packed
again with it), else to a new plate, and only a group that fills more than one empty bed is
split, over as few beds as the packer manages.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from .printability import print_rotation

PLATE_GAP_MM = 5.0
"""Room between two parts on a plate (mm): a brim and the nozzle's travel fit between them
and a scraper between the prints (from memory)."""

_STEPS_PER_MM = 100  # the packer works in whole hundredths of a millimetre


@dataclass(frozen=True)
class PlateItem:
    """One part to place: ``group`` (the variant label) and ``part`` name, and its vertices
    ``bed_vertices`` (n, 3) mm already posed: rotated into the print frame, lowest point on
    z = 0, footprint box starting at x = y = 0."""

    group: str
    part: str
    bed_vertices: np.ndarray

    @property
    def footprint_mm(self) -> tuple[float, float]:
        """Footprint box size (bed x, bed y), mm."""
        hi = self.bed_vertices.max(axis=0)
        return float(hi[0]), float(hi[1])


@dataclass(frozen=True)
class Placement:
    """Where one part goes: ``plate`` (0-based), the corner of its footprint box on the bed
    ``at_mm`` (x, y; mm, bed frame), whether it is turned a ``quarter_turn`` (90 deg
    counter-clockwise about the vertical) from its print pose, and its footprint box
    ``size_mm`` (x, y) as it lies."""

    group: str
    part: str
    plate: int
    at_mm: tuple[float, float]
    quarter_turn: bool
    size_mm: tuple[float, float]


@dataclass(frozen=True)
class PlateSet:
    """The packed plates: ``placements`` in plate order, then group and part order as
    given; ``left_off`` the (group, part) of parts larger than the bed in their pose."""

    bed_mm: tuple[float, float]
    plate_count: int
    placements: tuple[Placement, ...]
    left_off: tuple[tuple[str, str], ...]

    def on_plate(self, plate: int) -> tuple[Placement, ...]:
        return tuple(p for p in self.placements if p.plate == plate)


def posed_vertices(vertices: np.ndarray, down: Sequence[float], turn_deg: float) -> np.ndarray:
    """World-frame ``vertices`` (n, 3) mm in the print pose, shifted so that the lowest
    point is on z = 0 and the footprint box starts at x = y = 0 (mm, bed frame)."""
    v = np.asarray(vertices, dtype=np.float64) @ print_rotation(down, turn_deg).T
    return v - v.min(axis=0)


def placed_vertices(item: PlateItem, place: Placement) -> np.ndarray:
    """The item's posed vertices moved to ``place`` on its plate (mm, bed frame)."""
    v = item.bed_vertices
    if place.quarter_turn:
        # (x, y) -> (-y, x): a quarter turn counter-clockwise; the box then starts at
        # x = -footprint_y, shifted back to 0 below.
        v = np.column_stack([-v[:, 1], v[:, 0], v[:, 2]])
        v[:, 0] += item.footprint_mm[1]
    return v + np.array([place.at_mm[0], place.at_mm[1], 0.0])


def _steps_up(mm: float) -> int:
    return int(math.ceil(round(mm * _STEPS_PER_MM, 6)))


def _steps_down(mm: float) -> int:
    return int(math.floor(round(mm * _STEPS_PER_MM, 6)))


def _strategies() -> list[tuple[object, object]]:
    """(placement rule, order) pairs the packer tries, in this order: maximal rectangles
    (best short side, bottom-left, best area) over largest-area-first and longest-side-first
    orders, then skyline bottom-left. No rule is best for every set (a plate of two shells
    and a long thin core packs fuller by one order than the other), so the first that
    places everything is kept."""
    import rectpack

    return [(rule, order)
            for rule in (rectpack.MaxRectsBssf, rectpack.MaxRectsBl, rectpack.MaxRectsBaf,
                         rectpack.SkylineBl)
            for order in (rectpack.SORT_AREA, rectpack.SORT_LSIDE, rectpack.SORT_SSIDE)]


def _pack(items: Sequence[tuple[int, int, int]], bin_wh: tuple[int, int],
          bins: int) -> list[tuple[int, int, int, int, int, int]] | None:
    """(bin, x, y, w, h, id) of every item (id, w, h) packed into as few of at most
    ``bins`` bins as the strategies manage (the first strategy on a tie), or None when
    every strategy leaves an item out."""
    import rectpack

    best: list[tuple[int, int, int, int, int, int]] | None = None
    for rule, order in _strategies():
        packer = rectpack.newPacker(mode=rectpack.PackingMode.Offline,
                                    bin_algo=rectpack.PackingBin.BFF, pack_algo=rule,
                                    sort_algo=order, rotation=True)
        for rid, w, h in items:
            packer.add_rect(w, h, rid)
        packer.add_bin(bin_wh[0], bin_wh[1], count=bins)
        packer.pack()
        got: list[tuple[int, int, int, int, int, int]] = [
            (int(b), int(x), int(y), int(w), int(h), int(rid))
            for b, x, y, w, h, rid in packer.rect_list()]
        if len(got) != len(items):
            continue
        used = len({r[0] for r in got})
        if best is None or used < len({r[0] for r in best}):
            best = got
        if used == 1:
            break
    return best


def pack_plates(groups: Sequence[Sequence[PlateItem]], bed_mm: tuple[float, float],
                gap_mm: float = PLATE_GAP_MM) -> PlateSet:
    """Pack every group's items onto as few beds of ``bed_mm`` (x, y; mm) as fit, each
    group on one plate where it fits (see the module docstring). Deterministic: the same
    groups in the same order give the same plates."""
    bed = (float(bed_mm[0]), float(bed_mm[1]))
    bin_wh = (_steps_down(bed[0] + gap_mm), _steps_down(bed[1] + gap_mm))
    flat: list[PlateItem] = [it for g in groups for it in g]
    box = {i: (_steps_up(it.footprint_mm[0] + gap_mm), _steps_up(it.footprint_mm[1] + gap_mm))
           for i, it in enumerate(flat)}
    fits_alone = {i for i, (w, h) in box.items()
                  if _pack([(i, w, h)], bin_wh, 1) is not None}
    plates: list[list[int]] = []
    layout: list[list[tuple[int, int, int, int, int, int]]] = []
    start = 0
    for g in groups:
        ids = [i for i in range(start, start + len(g)) if i in fits_alone]
        start += len(g)
        if not ids:
            continue
        for k, members in enumerate(plates):
            got = _pack([(i, *box[i]) for i in members + ids], bin_wh, 1)
            if got is not None:
                plates[k], layout[k] = members + ids, got
                break
        else:
            got = _pack([(i, *box[i]) for i in ids], bin_wh, len(ids))
            assert got is not None, "every item fits an empty bed alone"
            for b in sorted({r[0] for r in got}):
                rows = [r for r in got if r[0] == b]
                plates.append([r[5] for r in rows])
                layout.append(rows)
    places = []
    for k, rows in enumerate(layout):
        for _, x, y, w, h, i in rows:
            it = flat[i]
            turned = (w, h) != box[i]
            fx, fy = it.footprint_mm
            places.append((k, i, Placement(it.group, it.part, k,
                                           (x / _STEPS_PER_MM, y / _STEPS_PER_MM), turned,
                                           (fy, fx) if turned else (fx, fy))))
    places.sort(key=lambda t: (t[0], t[1]))
    left = tuple((it.group, it.part) for i, it in enumerate(flat) if i not in fits_alone)
    return PlateSet(bed, len(layout), tuple(p for _, _, p in places), left)
