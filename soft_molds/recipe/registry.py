"""Registries of body and void kinds.

A kind is a frozen dataclass with a ``FIELDS`` tuple and a ``primitives`` method, put in
its own module under ``soft_molds/recipe/kinds/`` and decorated with :func:`body_kind`
or :func:`void_kind`. Every module in that package is imported on first use, so adding
a kind is adding one file.
"""

from __future__ import annotations

import importlib
import pkgutil
from typing import Any

BODY_KINDS: dict[str, type] = {}
VOID_KINDS: dict[str, type] = {}
_loaded = False


def body_kind(name: str):
    def deco(cls: type) -> type:
        cls.KIND = name  # type: ignore[attr-defined]
        BODY_KINDS[name] = cls
        return cls
    return deco


def void_kind(name: str):
    def deco(cls: type) -> type:
        cls.KIND = name  # type: ignore[attr-defined]
        VOID_KINDS[name] = cls
        return cls
    return deco


def _load() -> None:
    global _loaded
    if _loaded:
        return
    from . import kinds

    for info in sorted(pkgutil.iter_modules(kinds.__path__), key=lambda m: m.name):
        importlib.import_module(f"{kinds.__name__}.{info.name}")
    _loaded = True


def body_kinds() -> dict[str, Any]:
    _load()
    return dict(sorted(BODY_KINDS.items()))


def void_kinds() -> dict[str, Any]:
    _load()
    return dict(sorted(VOID_KINDS.items()))
