"""Registry of output formats.

A format is one module in this package with a function decorated with
:func:`output_format`: given a built :class:`~soft_molds.moldset.MoldSet` and its
:class:`~soft_molds.export.manifest.Manifest` (``files`` still empty), it returns file name
-> bytes. It must be deterministic (the same build gives the same bytes), write only plain
file names (no folders), never ``manifest.json`` (the writer adds that last, with the
digest of every file the formats made), and take its file names from the manifest where
the manifest names them (``PartRecord.file``, ``PartRecord.step``). Every module here is
imported on first use, so adding a format is adding one file.
"""

from __future__ import annotations

import importlib
import pkgutil
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest

Encoder = Callable[["BuiltMoldSet", "Manifest"], Mapping[str, bytes]]


@dataclass(frozen=True)
class OutputFormat:
    """A registered format: its ``name``, a one-line ``summary`` and its ``encode``."""

    name: str
    summary: str
    encode: Encoder


_FORMATS: dict[str, OutputFormat] = {}
_loaded = False


def output_format(name: str, summary: str) -> Callable[[Encoder], Encoder]:
    """Register the decorated encoder as format ``name`` (ValueError when taken)."""
    def deco(fn: Encoder) -> Encoder:
        if name in _FORMATS:
            raise ValueError(f"output format {name!r} is registered twice")
        _FORMATS[name] = OutputFormat(name, summary, fn)
        return fn
    return deco


def _load() -> None:
    global _loaded
    if _loaded:
        return
    for info in sorted(pkgutil.iter_modules(__path__), key=lambda m: m.name):
        importlib.import_module(f"{__name__}.{info.name}")
    _loaded = True


def output_formats() -> dict[str, OutputFormat]:
    """Every registered format by name, in name order."""
    _load()
    return dict(sorted(_FORMATS.items()))
