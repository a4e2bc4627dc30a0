"""What became of one variant of a sweep."""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from enum import StrEnum

from ..analysis.findings import Verdict
from ..analysis.motion.model import MotionKind
from ..export.manifest import MotionRecord
from ..recipe.model import Recipe
from ..units import mm3_to_cm3
from .plan import Task


class Status(StrEnum):
    """built; up to date (an earlier run wrote it, nothing done); refused (an error-level
    check, nothing written); failed (recipe, kernel or mesh error, or a dead worker)."""

    BUILT = "built"
    UP_TO_DATE = "up to date"
    REFUSED = "refused"
    FAILED = "failed"


@dataclass(frozen=True)
class Outcome:
    """One variant's result. ``verdict`` is None when nothing was built; ``silicone_cm3``
    and ``mix_g`` (grams of every portion weighed out) are None unless it was built or is
    up to date; ``description`` is the recipe's, for the family sheet; the worker figures
    (MB) are the worker's resident memory after the variant and its peak so far."""

    recipe: str
    label: str
    family: str
    status: Status
    reason: str = ""
    verdict: Verdict | None = None
    errors: int = 0
    warnings: int = 0
    seconds: float = 0.0
    silicone_cm3: float | None = None
    mix_g: float | None = None
    bend_deg: float | None = None      # predicted tip angle at the working pressure (bender)
    extension_mm: float | None = None  # predicted extension at the working pressure (extender)
    changed: dict[str, object] = field(default_factory=dict)
    description: str = ""
    out_dir: str = ""
    worker_pid: int = 0
    worker_rss_mb: float = 0.0
    worker_peak_mb: float = 0.0

    @property
    def ok(self) -> bool:
        return self.status in (Status.BUILT, Status.UP_TO_DATE)


Worker = Callable[[Recipe, str, bool], Outcome]
"""Builds, checks and writes one variant: (recipe, absolute output root, force)."""


def failed(t: Task, reason: str) -> Outcome:
    """The outcome of a task whose worker raised or died."""
    return Outcome(t.recipe.name, t.recipe.label, t.spec.family, Status.FAILED, reason=reason)


def exception_reason(exc: BaseException) -> str:
    """The first line of an exception, with its type: what the summary shows."""
    return f"{type(exc).__name__}: {exc}".splitlines()[0]


def report_figures(silicone_volume_mm3: float, portions_g: Iterable[float]
                   ) -> tuple[float, float]:
    """(silicone in cm3, grams weighed out in all) as the summary shows them, from the
    figures the manifest records (so a built and an up-to-date variant agree)."""
    return round(mm3_to_cm3(silicone_volume_mm3), 3), round(sum(portions_g), 3)


def motion_figures(motion: MotionRecord | None) -> tuple[float | None, float | None]:
    """(tip angle in degrees, extension in mm) at the working pressure as the summary shows
    them, from the manifest's motion record: the angle for a bender, the extension for an
    extender; None where there is no prediction at the working pressure."""
    if motion is None or motion.at_working is None:
        return None, None
    w = motion.at_working
    if motion.kind is MotionKind.BENDING:
        return round(w.angle_deg, 1), None
    return None, round(w.extension_mm, 2)
