"""Registry of the manufacturability checks the review runs.

A check is one module under ``soft_molds/analysis/checks/``: a function of the shared
:class:`~soft_molds.analysis.context.CheckContext` decorated with :func:`check`, which
names every ``Finding.check`` it may emit (the first name is its key in the registry) and
the order it runs in. Every module of that package is imported on first use (names
starting with ``_`` are skipped), so adding a check is adding one file and its test.

Contract of a check (:class:`Check`):

- ``names``: the ``Finding.check`` values it emits, lowercase words joined by hyphens; no
  two checks share a name;
- ``order``: the review runs checks by ascending ``order`` (then by key); findings keep that
  order within a severity. The built-in checks use steps of 100 so a new one can go between;
- ``run(ctx)``: reads the context only (it is shared and frozen) and returns a
  :class:`CheckOutput`: its findings and, when the review should keep a measurement
  (pull reports, extraction, wall map, ...), one typed ``result`` object, found again with
  :meth:`soft_molds.analysis.review.Review.result`.
"""

from __future__ import annotations

import importlib
import pkgutil
import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Protocol

from .findings import Finding

if TYPE_CHECKING:
    from .context import CheckContext

_NAME = re.compile(r"^[a-z][a-z0-9]*(-[a-z0-9]+)*$")


@dataclass(frozen=True)
class CheckOutput:
    """What one check returns: its findings in the order it wants them listed, and the
    measurement the review keeps (``None`` when there is nothing to keep)."""

    findings: tuple[Finding, ...]
    result: object | None = None


class Check(Protocol):
    """A manufacturability check (see the module docstring for the contract)."""

    @property
    def names(self) -> tuple[str, ...]: ...

    @property
    def order(self) -> int: ...

    def run(self, ctx: CheckContext) -> CheckOutput: ...


@dataclass(frozen=True)
class FunctionCheck:
    """A :class:`Check` made from a plain function by :func:`check`."""

    names: tuple[str, ...]
    order: int
    fn: Callable[[CheckContext], CheckOutput]

    def run(self, ctx: CheckContext) -> CheckOutput:
        return self.fn(ctx)


_CHECKS: dict[str, Check] = {}


def register(c: Check) -> Check:
    """Add ``c`` under its first name. Raises ``ValueError`` for a malformed or empty
    name list or a name another registered check already emits."""
    if not c.names:
        raise ValueError("a check needs at least one name")
    for name in c.names:
        if not _NAME.match(name):
            raise ValueError(f"check name {name!r}: use lowercase words joined by hyphens")
    claimed = {n: key for key, other in _CHECKS.items() for n in other.names}
    taken = sorted(n for n in c.names if n in claimed)
    if taken:
        raise ValueError(f"check name(s) {', '.join(taken)} already registered by "
                         f"{claimed[taken[0]]!r}")
    _CHECKS[c.names[0]] = c
    return c


def unregister(name: str) -> Check:
    """Remove the check whose key (first name) is ``name`` and return it."""
    return _CHECKS.pop(name)


def check(name: str, *more: str, order: int
          ) -> Callable[[Callable[[CheckContext], CheckOutput]],
                        Callable[[CheckContext], CheckOutput]]:
    """Register the decorated function as a check emitting ``name`` and ``more``, run at
    ``order``. The function itself is returned unchanged (callable directly in tests)."""
    def deco(fn: Callable[[CheckContext], CheckOutput]) -> Callable[[CheckContext], CheckOutput]:
        register(FunctionCheck((name, *more), order, fn))
        return fn
    return deco


def _load() -> None:
    from . import checks

    for info in sorted(pkgutil.iter_modules(checks.__path__), key=lambda m: m.name):
        if not info.name.startswith("_"):
            importlib.import_module(f"{checks.__name__}.{info.name}")


def registered_checks() -> tuple[Check, ...]:
    """Every registered check, in the order the review runs them (modules of the
    ``checks`` package imported first)."""
    _load()
    return tuple(sorted(_CHECKS.values(), key=lambda c: (c.order, c.names[0])))
