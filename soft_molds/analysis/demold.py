"""Draft and undercut: can each mold part be pulled off the cast in its pull direction?

Frame: mm, world. A *contact surface* is a set of facets of a closed, outward-wound mesh
(the cast part, or the core) whose outward normal ``n`` points into the mold part being
pulled; the part moves along the unit vector ``d``.

Draft of a facet is ``asin(n . d)`` in degrees: 0 for a wall parallel to the pull, 90 for a
face the part lifts straight off, negative where the part would have to move into the
surface (an undercut). An undercut facet is *locked* when a ray started just inside the
surface and sent along ``d`` leaves the material somewhere the same mold part is (the part
is blocked by its own wall beyond); it is not locked if the ray leaves through a sprue or
vent opening (the mold part has a hole there).

The *depth* of a locked region is the width of the rectangle with the same area and
perimeter as the region seen along ``d``: the distance the material must flex sideways
for the part to pass (a 20 x 20 mm overhang has depth 20 mm; a thin lip its width).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from soft_molds.plan.model import PlaneScore

from .rays import EPS_MM, Vec3
from .surface import Surface as Surface  # re-exported: callers import it from here

LOCK_TOL_DEG = 0.1
"""A facet leans into the pull only beyond this (smaller tilts are float noise)."""


@dataclass(frozen=True)
class PullReport:
    """Draft and undercut of one contact surface pulled along ``pull`` (mm, mm2, deg)."""

    part: str
    pull: tuple[float, float, float]
    area_mm2: float
    min_draft_deg: float
    min_draft_where_mm: tuple[float, float, float] | None
    low_draft_area_mm2: float     # facets with 0 <= draft < the minimum draft asked for
    min_draft_limit_deg: float
    locked_area_mm2: float
    locked_depth_mm: float        # the deepest locked region (see the module docstring)
    locked_where_mm: tuple[float, float, float] | None
    locked_regions: int


def _unit(d: Vec3) -> np.ndarray:
    v = np.asarray(d, dtype=np.float64)
    return v / np.linalg.norm(v)


def _pt(p: np.ndarray | None) -> tuple[float, float, float] | None:
    return None if p is None else (float(p[0]), float(p[1]), float(p[2]))


def pull_report(
    surface: Surface,
    mask: np.ndarray,
    pull: Vec3,
    part: str,
    min_draft_deg: float = 0.5,
    openings: Sequence = (),
) -> PullReport:
    """Draft and locked undercut of the facets ``mask`` of ``surface`` for a mold part
    moving along ``pull``. ``openings`` (objects with ``center_mm`` and ``radius_mm``) are
    holes in that part through which a ray may leave without locking it."""
    d = _unit(pull)
    idx = np.flatnonzero(mask)
    area = float(surface.areas[idx].sum())
    if len(idx) == 0:
        return PullReport(part, _pt(d), 0.0, 90.0, None, 0.0, min_draft_deg,  # type: ignore[arg-type]
                          0.0, 0.0, None, 0)
    nd = np.clip(surface.normals[idx] @ d, -1.0, 1.0)
    draft = np.degrees(np.arcsin(nd))
    low = (draft >= -LOCK_TOL_DEG) & (draft < min_draft_deg)
    cand = idx[draft < -LOCK_TOL_DEG]
    locked = _confirm_locked(surface, cand, d, openings)
    locked, noise, depth, where, regions = _regions(surface, locked, d)
    if len(noise):
        # Slivers of the tessellation, not geometry: count them as parallel to the pull.
        draft[np.isin(idx, noise)] = 0.0
    worst = int(np.argmin(draft))
    return PullReport(
        part=part, pull=_pt(d), area_mm2=area,  # type: ignore[arg-type]
        min_draft_deg=float(draft[worst]),
        min_draft_where_mm=_pt(surface.centroids[idx[worst]]),
        low_draft_area_mm2=float(surface.areas[idx[low]].sum()),
        min_draft_limit_deg=float(min_draft_deg),
        locked_area_mm2=float(surface.areas[locked].sum()),
        locked_depth_mm=depth, locked_where_mm=where, locked_regions=regions)


def _confirm_locked(surface: Surface, cand: np.ndarray, d: np.ndarray,
                    openings: Sequence) -> np.ndarray:
    """Candidates whose ray along ``d`` leaves the material other than through an opening."""
    if len(cand) == 0:
        return cand
    o = surface.centroids[cand] - EPS_MM * surface.normals[cand]
    t, _ = surface.caster.first_hit(o, d)
    hit = np.isfinite(t)
    if openings:
        p = o + np.where(hit, t, 0.0)[:, None] * d
        free = np.zeros(len(cand), dtype=bool)
        for op in openings:
            rel = p - np.asarray(op.center_mm)
            lateral = rel - np.outer(rel @ d, d)
            free |= np.linalg.norm(lateral, axis=1) <= op.radius_mm
        hit &= ~free
    return cand[hit]


MIN_DEPTH_MM = 0.05
"""A locked region shallower than this is tessellation noise (below the chord error of a
fine mesh and the 0.05 mm report resolution) and is dropped."""


def _regions(surface: Surface, locked: np.ndarray, d: np.ndarray
             ) -> tuple[np.ndarray, np.ndarray, float, tuple[float, float, float] | None, int]:
    """Locked facets of regions at least MIN_DEPTH_MM deep, the dropped ones, the depth of
    the deepest region, a point of it, and the count of regions kept."""
    if len(locked) == 0:
        return locked, locked, 0.0, None, 0
    m = len(surface.areas)
    inside = np.zeros(m, dtype=bool)
    inside[locked] = True
    verts, owners = surface.edges()
    both = inside[owners[:, 0]] & inside[owners[:, 1]]
    one = inside[owners[:, 0]] ^ inside[owners[:, 1]]
    a, b = owners[both, 0], owners[both, 1]
    g = coo_matrix((np.ones(len(a)), (a, b)), shape=(m, m))
    _, comp = connected_components(g, directed=False)
    lab = comp[locked]
    # Projected boundary length per region: edges with exactly one locked facet.
    bnd_owner = np.where(inside[owners[one, 0]], owners[one, 0], owners[one, 1])
    ev = surface.mesh.vertices[verts[one, 1]] - surface.mesh.vertices[verts[one, 0]]
    ev = ev - np.outer(ev @ d, d)
    blen = np.linalg.norm(ev, axis=1)
    proj_area = surface.areas[locked] * np.abs(surface.normals[locked] @ d)
    best, best_where = 0.0, None
    keep, drop, kept = [], [], 0
    for r in np.unique(lab):
        sel = locked[lab == r]
        area = float(proj_area[lab == r].sum())
        length = float(blen[comp[bnd_owner] == r].sum())
        half = length / 2.0
        width = (half - math.sqrt(max(half * half - 4.0 * area, 0.0))) / 2.0
        if width < MIN_DEPTH_MM:
            drop.append(sel)
            continue
        keep.append(sel)
        kept += 1
        if width > best:
            k = sel[int(np.argmax(surface.areas[sel]))]
            best, best_where = width, _pt(surface.centroids[k])
    empty = np.empty(0, dtype=np.int64)
    return (np.concatenate(keep) if keep else empty, np.concatenate(drop) if drop else empty,
            best, best_where, kept)


AXIS_INDEX = {"x": 0, "y": 1, "z": 2}


def side_masks(surface: Surface, contact: np.ndarray, axis: str, offset_mm: float,
               tol_mm: float = 1e-3) -> tuple[np.ndarray, np.ndarray]:
    """Split contact facets between the shell below the plane and the one above it.

    A facet lying in the plane goes to the shell its normal points into.
    """
    w = AXIS_INDEX[axis]
    rel = surface.centroids[:, w] - offset_mm
    on = np.abs(rel) <= tol_mm
    above = np.where(on, surface.normals[:, w] > 0.0, rel > 0.0)
    return contact & ~above, contact & above


def score_plane(cast: Surface, cast_contact: np.ndarray, axis: str, offset_mm: float,
                core: Surface | None = None, core_contact: np.ndarray | None = None,
                min_draft_deg: float = 0.5, openings: Sequence = ()
                ) -> tuple[PlaneScore, list[PullReport]]:
    """Pull both shells of a plane normal to ``axis`` at ``offset_mm`` off the cast (its
    outer-surface facets ``cast_contact``) and off the core print (``core_contact``).
    ``openings`` (sprue and vents) are holes in the upper shell."""
    w = AXIS_INDEX[axis]
    up = np.zeros(3)
    up[w] = 1.0
    reports = []
    lower, upper = side_masks(cast, cast_contact, axis, offset_mm)
    reports.append(pull_report(cast, lower, -up, "shell-lower", min_draft_deg))
    reports.append(pull_report(cast, upper, up, "shell-upper", min_draft_deg, openings))
    rigid = 0.0
    if core is not None and core_contact is not None:
        clo, chi = side_masks(core, core_contact, axis, offset_mm)
        for mask, dvec, name in ((clo, -up, "shell-lower"), (chi, up, "shell-upper")):
            rep = pull_report(core, mask, dvec, f"{name}/core", min_draft_deg)
            rigid += rep.locked_area_mm2
            reports.append(rep)
    score = PlaneScore(axis, float(offset_mm),
                       reports[0].locked_area_mm2 + reports[1].locked_area_mm2, rigid,
                       min(reports[0].min_draft_deg, reports[1].min_draft_deg))
    return score, reports
