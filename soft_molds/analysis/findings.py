"""One finding of the manufacturability analysis, as recorded in ``manifest.json``.

A finding names the ``check`` that produced it, its ``severity`` (``error``: the mold will
fail and the build refuses to write unless forced; ``warning``: it may fail, look at it;
``info``: a figure worth knowing), the ``part`` it concerns, the measured ``value`` against
its ``limit`` (both in the unit the message states), a representative location ``where_mm``
(world frame, mm; ``None`` when the finding has no single place) and a one-line ``message``.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Any

SEVERITIES = ("error", "warning", "info")


@dataclass(frozen=True)
class Finding:
    check: str
    severity: str
    part: str
    value: float | None
    limit: float | None
    where_mm: tuple[float, float, float] | None
    message: str

    def __post_init__(self) -> None:
        if self.severity not in SEVERITIES:
            raise ValueError(f"severity must be one of {SEVERITIES}, got {self.severity!r}")

    def to_json(self) -> dict[str, Any]:
        def r(x: float | None, nd: int = 4) -> float | None:
            return None if x is None else round(float(x), nd) + 0.0

        return {
            "check": self.check,
            "severity": self.severity,
            "part": self.part,
            "value": r(self.value),
            "limit": r(self.limit),
            "where_mm": None if self.where_mm is None else [r(c) for c in self.where_mm],
            "message": self.message,
        }


def finding(check: str, severity: str, part: str, message: str, *, value: float | None = None,
            limit: float | None = None, where: Sequence[float] | None = None) -> Finding:
    """Build a :class:`Finding`, turning a numpy point into a plain tuple."""
    w = None if where is None else tuple(float(c) for c in where)
    return Finding(check, severity, part, None if value is None else float(value),
                   None if limit is None else float(limit), w, message)  # type: ignore[arg-type]


def count(findings: Iterable[Finding], severity: str) -> int:
    return sum(1 for f in findings if f.severity == severity)


def worst(findings: Iterable[Finding]) -> str:
    """``error``, ``warning`` or ``info`` (also when there are no findings at all)."""
    sev = {f.severity for f in findings}
    for s in SEVERITIES:
        if s in sev:
            return s
    return "info"
