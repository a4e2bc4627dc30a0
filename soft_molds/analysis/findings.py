"""One finding of the manufacturability analysis, and the one verdict every report uses.

A finding names the ``check`` that produced it, its :class:`Severity` (``error``: the mold
will fail and nothing is written unless forced; ``warning``: it may fail, look at it;
``info``: a figure worth knowing), the ``part`` it concerns, the measured ``value`` against
its ``limit`` (both in the unit the message states), a representative location ``where_mm``
(world frame, mm; ``None`` when the finding has no single place) and a one-line ``message``.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from enum import StrEnum


class Severity(StrEnum):
    """How much a finding matters; the value is the word written to the manifest."""

    ERROR = "error"
    WARNING = "warning"
    INFO = "info"

    @property
    def rank(self) -> int:
        """0 for the worst: findings are listed errors first."""
        return _RANK[self]


_RANK = {Severity.ERROR: 0, Severity.WARNING: 1, Severity.INFO: 2}


class Verdict(StrEnum):
    """The worst severity among a set of findings, as written to the manifest."""

    OK = "ok"
    WARNING = "warning"
    ERROR = "error"


@dataclass(frozen=True)
class SeverityCounts:
    errors: int
    warnings: int
    infos: int


@dataclass(frozen=True)
class Finding:
    check: str
    severity: Severity
    part: str
    value: float | None
    limit: float | None
    where_mm: tuple[float, float, float] | None
    message: str

    def __post_init__(self) -> None:
        # Accept the manifest's word too (a manifest read back from disk).
        object.__setattr__(self, "severity", Severity(self.severity))


def finding(check: str, severity: Severity | str, part: str, message: str, *,
            value: float | None = None, limit: float | None = None,
            where: Sequence[float] | None = None) -> Finding:
    """Build a :class:`Finding`, turning a numpy point into a plain tuple."""
    w = None if where is None else (float(where[0]), float(where[1]), float(where[2]))
    return Finding(check, Severity(severity), part, None if value is None else float(value),
                   None if limit is None else float(limit), w, message)


def counts(findings: Iterable[Finding]) -> SeverityCounts:
    fs = list(findings)
    return SeverityCounts(sum(f.severity is Severity.ERROR for f in fs),
                          sum(f.severity is Severity.WARNING for f in fs),
                          sum(f.severity is Severity.INFO for f in fs))


def of_severity(findings: Iterable[Finding], severity: Severity) -> tuple[Finding, ...]:
    """The findings of one severity, in their order."""
    return tuple(f for f in findings if f.severity is severity)


def worst_first(findings: Iterable[Finding]) -> tuple[Finding, ...]:
    """Errors first, then warnings, then infos; a stable sort, so findings of one severity
    keep their order (the order the checks ran in)."""
    return tuple(sorted(findings, key=lambda f: f.severity.rank))


def verdict(findings: Iterable[Finding]) -> Verdict:
    """``error`` when any finding is an error, else ``warning`` when any is a warning, else
    ``ok``. The CLI, pipeline, sweep, casting card and family sheet all use this one."""
    c = counts(findings)
    return Verdict.ERROR if c.errors else Verdict.WARNING if c.warnings else Verdict.OK


def refuses_to_write(v: Verdict, force: bool) -> bool:
    """The house rule for ``build`` and ``sweep``: a mold set with an error-level finding is
    not written unless the person forces it (the manifest then records the error)."""
    return v is Verdict.ERROR and not force
