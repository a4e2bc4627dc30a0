"""Shared fixtures: each bundled recipe is built once per test session, because a build
costs seconds of CAD kernel time and many tests look at the same parts."""

from __future__ import annotations

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
RECIPES = ROOT / "recipes"

_cache: dict[str, object] = {}


def recipe_path(name: str) -> Path:
    return RECIPES / f"{name}.yaml"


def built(name: str):
    """The MoldSet of bundled recipe ``name`` (built on first use, then shared)."""
    if name not in _cache:
        from soft_molds import build, load_recipe

        _cache[name] = build(load_recipe(recipe_path(name)))
    return _cache[name]


@pytest.fixture(scope="session")
def finger():
    return built("seedling-finger")


@pytest.fixture(scope="session")
def pusher():
    return built("tray-pusher")


@pytest.fixture(scope="session")
def cushion():
    return built("stem-cushion")


@pytest.fixture(scope="session")
def tamper():
    return built("soil-tamper")


@pytest.fixture(scope="session")
def twister():
    return built("wrist-twister")


def _process(path: Path) -> str:
    """The casting process of a recipe file. Recipes of a multi-step process (layered,
    overmold, a melted core) build into a different result (steps): the tests of the
    one-shot mold set leave them to tests/*/test_layered*.py, tests/*/test_overmold*.py
    and tests/*/test_melted*.py."""
    import yaml

    doc = yaml.safe_load(path.read_text())
    core = doc.get("core")
    if isinstance(core, dict) and core.get("kind") == "melted":
        return "melted-core"  # a core mold, then the one-shot mold: built in steps
    block = doc.get("process")
    return str(block.get("kind", "one-shot")) if isinstance(block, dict) else "one-shot"


BUNDLED = sorted(p.stem for p in RECIPES.glob("*.yaml") if _process(p) == "one-shot")
LAYERED = sorted(p.stem for p in RECIPES.glob("*.yaml") if _process(p) == "layered")
MULTI_STEP = sorted(p.stem for p in RECIPES.glob("*.yaml") if _process(p) != "one-shot")
MELTED = sorted(p.stem for p in RECIPES.glob("*.yaml") if _process(p) == "melted-core")


def built_layered(name: str):
    """The LayeredMoldSet of bundled recipe ``name`` (built on first use, then shared)."""
    key = f"layered:{name}"
    if key not in _cache:
        from soft_molds import load_recipe
        from soft_molds.pipeline import build_layered

        _cache[key] = build_layered(load_recipe(recipe_path(name)))
    return _cache[key]


def built_steps(name: str):
    """The built set of a bundled multi-step recipe ``name`` (built on first use, then
    shared; a layered recipe's is :func:`built_layered`'s)."""
    key = f"layered:{name}"
    if key not in _cache:
        from soft_molds import load_recipe
        from soft_molds.pipeline import build_steps

        _cache[key] = build_steps(load_recipe(recipe_path(name)))
    return _cache[key]


def bundled_variants() -> list[tuple[str, str]]:
    """(recipe stem, variant label) of every variant of every bundled recipe."""
    from soft_molds import load_variants

    return [(stem, r.label) for stem in BUNDLED for _, r in load_variants(recipe_path(stem))]


def built_variant(stem: str, label: str):
    """The MoldSet of one variant of a bundled recipe (built on first use, then shared; the
    default variant is the one ``built(stem)`` gives)."""
    key = f"{stem}/{label}"
    if key not in _cache:
        from soft_molds import build, load_recipe, load_variants

        default = load_recipe(recipe_path(stem))
        if default.label == label:
            _cache[key] = built(stem)
        else:
            (r,) = [r for _, r in load_variants(recipe_path(stem)) if r.label == label]
            _cache[key] = build(r)
    return _cache[key]


@pytest.fixture(scope="session")
def bundled():
    """Callable: bundled recipe name -> its shared MoldSet."""
    return built
