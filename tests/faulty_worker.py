"""A sweep worker that breaks the geometry kernel for variant B (tests import it by name,
so spawned worker processes can too)."""

from __future__ import annotations


def worker(recipe, root, force):
    from soft_molds import sweep

    if recipe.label != "B":
        return sweep.run_variant(recipe, root, force)
    import soft_molds.geometry.kernel as kernel

    real = kernel.split_at

    def broken(*_a, **_k):
        raise RuntimeError("injected kernel failure")

    kernel.split_at = broken
    try:
        return sweep.run_variant(recipe, root, force)
    finally:
        kernel.split_at = real


def dying_worker(recipe, root, force):
    """Kills its own process on variant B, as a crash inside the kernel would."""
    import os

    from soft_molds import sweep

    if recipe.label == "B":
        os._exit(1)
    return sweep.run_variant(recipe, root, force)
