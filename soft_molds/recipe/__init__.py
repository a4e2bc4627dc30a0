"""Recipe stage: YAML text -> validated, frozen value objects. Knows nothing of CAD."""

from .load import load_recipe, recipe_from_node, recipe_from_text
from .model import Recipe

__all__ = ["Recipe", "load_recipe", "recipe_from_node", "recipe_from_text"]
