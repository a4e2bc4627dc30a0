"""Scores of candidate parting planes on the cast and core meshes, for the plan stage's
``parting: auto`` choice (:mod:`soft_molds.plan.parting`). Mm, mm2, deg; world frame."""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np

from soft_molds.plan.model import PlaneScore

from .demold import Surface, score_plane

Rule = Callable[[str, float], "str | None"]


def score_planes(cast: Surface, cast_contact: np.ndarray, core: Surface | None,
                 core_contact: np.ndarray | None, candidates: Sequence[tuple[str, float]],
                 rule: Rule | None = None, min_draft_deg: float = 0.5) -> list[PlaneScore]:
    """Every candidate ``(axis, offset_mm)`` scored, in the candidates' order: silicone locked
    by either shell, core print locked by either shell, least draft, and the first recipe
    rule it breaks (``rule``), or the core-print lock when it breaks none."""
    scores = []
    for ax, off in candidates:
        s, _ = score_plane(cast, cast_contact, ax, off, core, core_contact, min_draft_deg)
        why = rule(ax, off) if rule is not None else None
        if why is None and s.rigid_locked_area_mm2 > 0.0:
            why = f"locks the core print in a shell ({s.rigid_locked_area_mm2:.1f} mm2)"
        scores.append(PlaneScore(s.axis, s.offset_mm, s.locked_area_mm2,
                                 s.rigid_locked_area_mm2, s.min_draft_deg, why))
    return scores
