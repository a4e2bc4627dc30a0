"""soft_molds: YAML recipe for a cast silicone actuator -> checked, printable mold set.

Public API::

    from soft_molds import load_recipe, build
    recipe = load_recipe("recipes/seedling-finger.yaml")
    molds = build(recipe)          # MoldSet: shells, core, cast preview, all checked
    molds.export("out")            # out/<recipe>/<label>/*.stl, *.step, manifest.json
"""

from .errors import GeometryError, MeshIntegrityError, RecipeError, SoftMoldsError
from .pipeline import MoldSet, Part, build
from .recipe import Recipe, load_recipe
from .version import __version__

__all__ = [
    "GeometryError", "MeshIntegrityError", "MoldSet", "Part", "Recipe", "RecipeError",
    "SoftMoldsError", "__version__", "build", "load_recipe",
]
