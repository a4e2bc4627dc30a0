"""Registries of body and void kinds.

A kind is a frozen dataclass meeting the contract in :mod:`.contracts` (checked when it
registers), put in its own module under ``soft_molds/recipe/kinds/`` and decorated with
:func:`body_kind` or :func:`void_kind`. Every module in that package is imported on first
use, so adding a kind is adding one file.
"""

from __future__ import annotations

import importlib
import pkgutil
from collections.abc import Callable
from typing import TypeVar, cast

from .contracts import BodyKind, VoidKind, check_kind

T = TypeVar("T", bound=type)

BODY_KINDS: dict[str, type] = {}
VOID_KINDS: dict[str, type] = {}
_loaded = False


def _register(table: dict[str, type], what: str, name: str) -> Callable[[T], T]:
    def deco(cls: T) -> T:
        check_kind(cls, what)
        if name in table and table[name] is not cls:
            raise TypeError(f"{what} kind {name!r} is registered twice")
        cls.KIND = name  # type: ignore[attr-defined]
        table[name] = cls
        return cls
    return deco


def body_kind(name: str) -> Callable[[T], T]:
    return _register(BODY_KINDS, "body", name)


def void_kind(name: str) -> Callable[[T], T]:
    return _register(VOID_KINDS, "void", name)


def _load() -> None:
    global _loaded
    if _loaded:
        return
    from . import kinds

    for info in sorted(pkgutil.iter_modules(kinds.__path__), key=lambda m: m.name):
        importlib.import_module(f"{kinds.__name__}.{info.name}")
    _loaded = True


def body_kinds() -> dict[str, type[BodyKind]]:
    """Every registered body kind by name (each met its contract when it registered)."""
    _load()
    return {k: cast("type[BodyKind]", v) for k, v in sorted(BODY_KINDS.items())}


def void_kinds() -> dict[str, type[VoidKind]]:
    """Every registered void kind by name (each met its contract when it registered)."""
    _load()
    return {k: cast("type[VoidKind]", v) for k, v in sorted(VOID_KINDS.items())}
