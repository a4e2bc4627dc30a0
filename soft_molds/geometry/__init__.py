"""The geometry stage: solids from the recipe's primitives through the CAD kernel. Only
this package imports cadquery or its OCP bindings."""

from __future__ import annotations


def preload(parallel: bool = True) -> None:
    """Import the CAD kernel now, so a worker process pays for it once and before its
    first variant, and choose whether OCCT may spread one operation over threads
    (``parallel``; a pool with one worker per core runs faster without, and the results
    are the same either way)."""
    from . import kernel

    kernel.set_parallel(parallel)
