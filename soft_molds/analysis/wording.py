"""How the checks' messages write points and directions (one wording for every check)."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np


def point(p: Sequence[float] | None) -> str:
    """A world point as ``(x, y, z) mm`` to 0.1 mm, or ``-`` when there is none."""
    return "-" if p is None else "(" + ", ".join(f"{c:.1f}" for c in p) + ") mm"


def axis(v: Sequence[float]) -> str:
    """The signed world axis a direction mostly points along, e.g. ``-z``."""
    i = int(np.argmax(np.abs(v)))
    return ("+" if v[i] > 0 else "-") + "xyz"[i]
