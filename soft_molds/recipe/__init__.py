"""Recipe stage: YAML text -> validated, frozen value objects. Knows nothing of CAD."""

from .load import (
    load_recipe,
    load_variants,
    recipe_from_node,
    recipe_from_text,
    variants_from_node,
    variants_from_text,
)
from .model import Recipe
from .variants import VariantSpec

__all__ = ["Recipe", "VariantSpec", "load_recipe", "load_variants", "recipe_from_node",
           "recipe_from_text", "variants_from_node", "variants_from_text"]
