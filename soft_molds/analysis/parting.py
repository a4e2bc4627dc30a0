"""Choosing the parting plane for ``parting: auto``: candidate planes from the recipe and
their scores on the cast and core meshes (mm, mm2, deg; world frame)."""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np

from soft_molds.recipe.model import Recipe

from .demold import PlaneScore, score_plane
from .surface import Surface


def plane_candidates(r: Recipe) -> list[tuple[str, float]]:
    """Planes worth trying for ``parting: auto``: for each cross axis (the body's thinner
    direction first), the plane through the socket axis, the body's mid-plane (body kinds
    are centred on the x axis; the mid-plane is their widest section) and planes a quarter
    and a half of the way from the mid-plane to the surface on either side."""
    cy, cz = r.inlet.center_mm
    _, w, h = r.body.size_mm()
    axes = ("y", "z") if w < h else ("z", "y")
    out: list[tuple[str, float]] = []
    for ax in axes:
        mid = 0.0
        half = (w if ax == "y" else h) / 2.0
        for off in (cy if ax == "y" else cz, mid, mid - 0.25 * half, mid + 0.25 * half,
                    mid - 0.5 * half, mid + 0.5 * half):
            off = round(off, 6) + 0.0
            if (ax, off) not in out:
                out.append((ax, off))
    return out


def rank_planes(cast: Surface, cast_contact: np.ndarray, core: Surface | None,
                core_contact: np.ndarray | None, candidates: Sequence[tuple[str, float]],
                rule: Callable[[str, float], str | None] | None = None,
                min_draft_deg: float = 0.5) -> list[PlaneScore]:
    """Score every candidate plane; usable planes first, best first (least locked area,
    then the greatest minimum draft, then the candidates' own order)."""
    scores = []
    for ax, off in candidates:
        s, _ = score_plane(cast, cast_contact, ax, off, core, core_contact, min_draft_deg)
        why = rule(ax, off) if rule is not None else None
        if why is None and s.rigid_locked_area_mm2 > 0.0:
            why = f"locks the core print in a shell ({s.rigid_locked_area_mm2:.1f} mm2)"
        scores.append(PlaneScore(s.axis, s.offset_mm, s.locked_area_mm2,
                                 s.rigid_locked_area_mm2, s.min_draft_deg, why))
    order = sorted(range(len(scores)), key=lambda i: (not scores[i].usable, scores[i].key(), i))
    return [scores[i] for i in order]
