"""soft_molds: YAML recipe for a cast silicone actuator -> checked, printable mold set.

Public API::

    from soft_molds import load_recipe, build
    recipe = load_recipe("recipes/seedling-finger.yaml")
    molds = build(recipe)          # MoldSet: shells, core, cast preview, all checked
    molds.export("out")            # out/<recipe>/<label>/*.stl, *.step, cards, manifest.json
    for spec, variant in load_variants("recipes/finger-family.yaml"):   # A-E
        build(variant).export("out")

``build``, ``MoldSet`` and ``Part`` load the mesh and CAD libraries on first use, so a bad
recipe is reported without paying for them.
"""

from __future__ import annotations

from typing import Any

from .errors import GeometryError, MeshIntegrityError, RecipeError, SoftMoldsError
from .recipe import Recipe, load_recipe, load_variants
from .version import __version__

__all__ = [
    "GeometryError", "MeshIntegrityError", "MoldSet", "Part", "Recipe", "RecipeError",
    "SoftMoldsError", "__version__", "build", "load_recipe", "load_variants",
]

_LAZY = {"build", "MoldSet", "Part"}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        from . import pipeline

        return getattr(pipeline, name)
    raise AttributeError(f"module 'soft_molds' has no attribute {name!r}")
