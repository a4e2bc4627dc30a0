"""The tasks of a sweep: every variant of every recipe file, each with the folder it
will be written to; two files that would write the same folder are refused."""

from __future__ import annotations

import os
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from ..errors import RecipeError, SoftMoldsError
from ..recipe.load import load_variants
from ..recipe.model import Recipe
from ..recipe.variants import VariantSpec


@dataclass(frozen=True)
class Task:
    """One variant to build: the recipe file it came from, its spec and its recipe."""

    source: str
    spec: VariantSpec
    recipe: Recipe

    @property
    def key(self) -> str:
        """``<recipe>/<label>``: the folder under the output root, unique in a sweep."""
        return f"{self.recipe.name}/{self.recipe.label}"


class SweepInputError(SoftMoldsError):
    """Bad input for a sweep; ``lines`` holds one printable line per problem."""

    def __init__(self, lines: list[str]):
        self.lines = lines
        super().__init__("\n".join(lines))


def output_dir(root: str | os.PathLike[str], r: Recipe) -> Path:
    """The folder one variant is written to: ``root/<recipe>/<label>``."""
    return Path(root) / r.name / r.label


def plan_tasks(paths: Iterable[str | os.PathLike[str]]) -> list[Task]:
    """Every variant of every recipe file, in file then label order. Raises
    :class:`SweepInputError` listing the problems of every file at once, and one line per
    variant another file also makes (both would write the same folder)."""
    tasks: list[Task] = []
    problems: list[str] = []
    for p in paths:
        try:
            tasks += [Task(str(p), spec, r) for spec, r in load_variants(p)]
        except RecipeError as exc:
            problems.extend(exc.lines())
    problems += _shared_folders(tasks)
    if problems:
        raise SweepInputError(problems)
    return tasks


def _shared_folders(tasks: Iterable[Task]) -> list[str]:
    seen: dict[str, str] = {}
    out = []
    for t in tasks:
        other = seen.setdefault(t.key, t.source)
        if other != t.source:
            out.append(f"{t.source}: recipe {t.recipe.name!r} variant {t.recipe.label} is "
                       f"also made by {other}; both would write {t.key}/ (give one of them "
                       "another name)")
    return out
