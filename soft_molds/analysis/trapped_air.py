"""Trapped air, checked on the built mold rather than on the plan that placed the vents.

Frame: mm, world, ``up`` the pour direction. The high points of the cavity ceiling come
from the cast part (the cavity with the core in place, see :mod:`.highpoints`). A high
point is vented when air rising from some point of its plateau finds a way out: a ray
from just below the plateau, straight up, that crosses no mold part (it runs up a vent or
the sprue and leaves through the top face). A high point with no such ray keeps a bubble.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from soft_molds.constants import AIR_PERSISTENCE_MM, AIR_PLATEAU_MM
from soft_molds.meshdata import TriMesh

from .highpoints import HighPoint, find_high_points
from .rays import EPS_MM, RayCaster, Vec3

MAX_RAYS_PER_PLATEAU = 400


@dataclass(frozen=True)
class AirReport:
    high_points: tuple[HighPoint, ...]
    trapped: tuple[HighPoint, ...]
    escape_rays: tuple[int, ...]  # per high point: how many plateau rays found a way out


def combine(meshes: Sequence[TriMesh]) -> TriMesh:
    """One mesh holding all of ``meshes`` (for ray queries against every mold part)."""
    verts, faces, base = [], [], 0
    for m in meshes:
        verts.append(m.vertices)
        faces.append(m.faces + base)
        base += len(m.vertices)
    return TriMesh(np.concatenate(verts), np.concatenate(faces))


def trapped_air(cast: TriMesh, up: Vec3, mold: TriMesh | RayCaster,
                persistence_mm: float = AIR_PERSISTENCE_MM,
                plateau_mm: float = AIR_PLATEAU_MM) -> AirReport:
    """High points of ``cast`` and which of them no opening in ``mold`` (every rigid part of
    the closed mold, as one mesh, or a ray caster already built on it) lets air out of.
    The defaults are the ones the opening planner uses (:mod:`soft_molds.constants`), so
    the check looks for exactly the high points the planner vented."""
    u = np.asarray(up, dtype=np.float64)
    u = u / np.linalg.norm(u)
    caster = mold if isinstance(mold, RayCaster) else RayCaster(mold)
    hps = find_high_points(cast, u, persistence_mm, plateau_mm)
    trapped, escapes = [], []
    for hp in hps:
        pts = np.asarray(hp.plateau_mm)
        if len(pts) > MAX_RAYS_PER_PLATEAU:
            # An even, reproducible subset (the plateau is stored in a fixed order) plus
            # the point nearest the centroid, where a planned opening would sit.
            keep = np.linspace(0, len(pts) - 1, MAX_RAYS_PER_PLATEAU).astype(int)
            pts = np.concatenate([pts[keep], [hp.position_mm]])
        else:
            pts = np.concatenate([pts, [hp.position_mm]])
        # Start just inside the silicone, so the ray meets the mold's cavity face unless a
        # hole opens above it.
        t, _ = caster.first_hit(pts - 10 * EPS_MM * u, u)
        n_out = int(np.isinf(t).sum())
        escapes.append(n_out)
        if n_out == 0:
            trapped.append(hp)
    return AirReport(hps, tuple(trapped), tuple(escapes))
