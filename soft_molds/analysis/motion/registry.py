"""Registry of motion models, one module per actuator family in this package.

Contract of a model (:class:`MotionModel`): ``name`` (lowercase words joined by hyphens,
unique), ``kind`` (what it predicts), ``order`` (models are asked in ascending order; the
first whose ``applies`` is true makes the curve) and ``solve(profile, e_mpa, pressures)``,
returning per pressure the tip angle (degrees), the extension (mm) and the largest fibre
stretch, and the figures of its governing section (:class:`Solved`). Every module of this
package not starting with ``_`` and not one of the shared modules is imported on first use.
"""

from __future__ import annotations

import importlib
import pkgutil
import re
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from .model import MotionKind
from .sections import Section, strip_moments

_NAME = re.compile(r"^[a-z][a-z0-9]*(-[a-z0-9]+)*$")
_SHARED = frozenset({"registry", "model", "sections", "beam"})


@dataclass(frozen=True, eq=False)
class Profile:
    """The cast's sections over its pressurised length, evenly spaced: section i is the
    cut at the middle of the i-th slice of thickness ``dx_mm`` between ``from_mm`` and
    ``to_mm``. ``void_kinds``: the recipe's void kinds (e.g. ``chambers``, ``bore``).
    ``sheet_yz_mm``: a point (y, z), mm, of a bonded strain-limiting sheet lying flat across
    every section (None: no sheet)."""

    sections: tuple[Section, ...]
    dx_mm: float
    from_mm: float
    to_mm: float
    void_kinds: tuple[str, ...]
    sheet_yz_mm: tuple[float, float] | None = None

    def load_direction(self) -> tuple[tuple[float, float], float]:
        """Unit (y, z) direction of the pressure's mean offset from the neutral axis, and
        that offset (mm): |sum A_p (c_void - c_silicone)| / sum A_p over the sections."""
        m = np.zeros(2)
        a = 0.0
        for s in self.sections:
            m += s.void_area_mm2 * (np.asarray(s.void_centroid_mm) - np.asarray(s.centroid_mm))
            a += s.void_area_mm2
        size = float(np.hypot(*m))
        if size <= 0.0 or a <= 0.0:
            return (0.0, 1.0), 0.0
        return (float(m[0] / size), float(m[1] / size)), size / a

    def radius_of_gyration_mm(self, d: tuple[float, float]) -> float:
        """sqrt(mean I / mean A) of the silicone about the axis square to ``d``."""
        i = np.mean([s.second_moment_mm4(d) for s in self.sections])
        a = np.mean([s.silicone_area_mm2 for s in self.sections])
        return float(np.sqrt(i / a)) if a > 0 else 0.0

    def strips(self, d: tuple[float, float], count: int) -> tuple[np.ndarray, np.ndarray]:
        """``count`` equal strips across each section along ``d``: the centroid s of each
        strip's silicone (from the section's centroid, mm) and its area (mm2), both
        exact (:func:`.sections.strip_moments`), as (sections, count) arrays. A one-point
        rule at those centroids integrates any law linear in s exactly over the section
        (so the linear beam's A, the neutral axis and N, M are exact); I is short by the
        strips' own spread, about (depth / count)^2 / 12 per unit area."""
        s_all, w_all = [], []
        for sec in self.sections:
            p = sec.segments.reshape(-1, 2) - np.asarray(sec.centroid_mm)
            proj = p @ np.asarray(d)
            edges = np.linspace(float(proj.min()), float(proj.max()), count + 1)
            area, first = strip_moments(sec.segments, sec.centroid_mm, d, edges)
            mid = 0.5 * (edges[:-1] + edges[1:])
            ok = area > 1e-12 * max(float(area.max()), 1e-300)
            s_all.append(np.where(ok, first / np.where(ok, area, 1.0), mid))
            w_all.append(np.where(ok, area, 0.0))
        return np.array(s_all), np.array(w_all)


@dataclass(frozen=True)
class Solved:
    """A model's answer per pressure: ``angle_deg``, ``extension_mm``, ``max_stretch``
    (arrays like the pressures), and its governing section's index and figures."""

    angle_deg: np.ndarray
    extension_mm: np.ndarray
    max_stretch: np.ndarray
    bend_dir: tuple[float, float]
    governing: int
    lever_arm_mm: float
    second_moment_mm4: float
    linear_deg_per_kpa: float
    linear_mm_per_kpa: float


class MotionModel(Protocol):
    @property
    def name(self) -> str: ...

    @property
    def kind(self) -> MotionKind: ...

    @property
    def order(self) -> int: ...

    def applies(self, profile: Profile) -> bool: ...

    def solve(self, profile: Profile, e_mpa: float, pressures_kpa: np.ndarray) -> Solved: ...


_MODELS: dict[str, MotionModel] = {}


def register(model: MotionModel) -> MotionModel:
    """Add ``model`` under its name; ``ValueError`` for a malformed or taken name."""
    if not _NAME.match(model.name):
        raise ValueError(f"motion model name {model.name!r}: use lowercase words joined by "
                         "hyphens")
    if model.name in _MODELS:
        raise ValueError(f"motion model {model.name!r} is already registered")
    _MODELS[model.name] = model
    return model


def _load() -> None:
    from .. import motion

    for info in sorted(pkgutil.iter_modules(motion.__path__), key=lambda m: m.name):
        if not info.name.startswith("_") and info.name not in _SHARED:
            importlib.import_module(f"{motion.__name__}.{info.name}")


def registered_models() -> tuple[MotionModel, ...]:
    """Every registered model, in the order they are asked."""
    _load()
    return tuple(sorted(_MODELS.values(), key=lambda m: (m.order, m.name)))


def model_for(profile: Profile) -> MotionModel | None:
    """The first registered model that applies to ``profile``."""
    return next((m for m in registered_models() if m.applies(profile)), None)
