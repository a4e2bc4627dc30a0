"""soft_molds: YAML recipe for a cast silicone actuator -> checked, printable mold set.

Public API::

    from soft_molds import load_recipe, build
    recipe = load_recipe("recipes/seedling-finger.yaml")
    molds = build(recipe)          # MoldSet: shells, core, cast preview, all checked
    molds.export("out")            # out/<recipe>/<label>/*.stl, *.step, cards, manifest.json
    for spec, variant in load_variants("recipes/finger-family.yaml"):   # A-E
        build(variant).export("out")

``load_recipe`` and ``load_variants`` check the recipe and the rules of the mold it plans
(parting plane, block features), every problem at once, before any CAD kernel is loaded
(but for a body drawn in a STEP file, ``kind: file``, whose reading loads it);
``build``, ``MoldSet`` and ``Part`` load the mesh and CAD libraries on first use. A recipe
with ``process: {kind: layered}`` or ``{kind: overmold}`` is built by ``build_steps`` (two
pours; ``soft_molds.export.overmold.write_steps`` writes its files).
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path
from typing import Any

from .errors import GeometryError, MeshIntegrityError, RecipeError, SoftMoldsError
from .plan import plan_problems
from .recipe import Recipe, VariantSpec
from .recipe import load_recipe as _load_recipe
from .recipe import load_variants as _load_variants
from .recipe.imported import BodyFileRefused, ImportedBody, Triple, use_body_reader
from .recipe.variants import merge_problems, prefix_problems
from .version import __version__

__all__ = [
    "GeometryError", "MeshIntegrityError", "MoldSet", "Part", "Recipe", "RecipeError",
    "SoftMoldsError", "__version__", "build", "build_layered", "build_steps", "load_recipe",
    "load_variants",
]

_LAZY = {"build", "build_layered", "build_steps", "MoldSet", "Part"}


def load_recipe(path: str | os.PathLike) -> Recipe:
    """Read and validate a recipe file, and check the rules of the mold it plans; raise
    :class:`RecipeError` listing every problem (field path, line, value, what is allowed)."""
    try:
        r = _load_recipe(path)
    except RecipeError as exc:
        raise _with_plan_problems(exc) from None
    problems = plan_problems(r)
    if problems:
        raise RecipeError(problems, r.source)
    return r


def _with_plan_problems(exc: RecipeError) -> RecipeError:
    """The recipe's problems and, when its fields were all valid, the mold's too."""
    if not isinstance(exc.recipe, Recipe):
        return exc
    return RecipeError([*exc.problems, *plan_problems(exc.recipe)], exc.source)


def load_variants(path: str | os.PathLike, progress: Callable[[int, int], None] | None = None
                  ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    """Every variant of a recipe file, each validated and planned; one RecipeError lists the
    problems of every variant (merged where variants share them). ``progress(done, total)``
    is called after each variant is validated."""
    try:
        pairs = _load_variants(path, progress=progress)
    except RecipeError as exc:
        raise _with_plan_problems(exc) from None
    problems = []
    for spec, r in pairs:
        found = plan_problems(r)
        if found:
            problems += prefix_problems(RecipeError(found, r.source), spec) if spec.label \
                else found
    if problems:
        merged = merge_problems(problems)
        # A problem every variant shares is the recipe's own: say it once, unlabelled.
        every = "[" + ", ".join(r.label for _, r in pairs) + "] "
        raise RecipeError([replace(p, path=p.path.removeprefix(every)) for p in merged],
                          pairs[0][1].source)
    return pairs


def _read_body_file(path: Path, translate_mm: Triple, rotate_deg: Triple
                    ) -> ImportedBody | BodyFileRefused:
    """The geometry stage's STEP reader, loaded (with the CAD kernel) on the first body
    file a recipe names: the recipe stage may not import it, the package may."""
    from .geometry.stepbody import read_step_body

    return read_step_body(path, translate_mm, rotate_deg)


# Every way into the recipe stage imports this package first, so a ``file`` body always
# finds its reader (recipe/imported.py).
use_body_reader(_read_body_file)


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        from . import pipeline

        return getattr(pipeline, name)
    raise AttributeError(f"module 'soft_molds' has no attribute {name!r}")
