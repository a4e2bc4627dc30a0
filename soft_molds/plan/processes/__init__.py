"""Casting processes, registered by name: each turns a validated recipe into its casting
steps, in pour order. A process is one module in this package decorated with
:func:`casting_process`; every module here is imported on first use, so adding a process is
adding one file (and its test).

Contract: ``steps(recipe) -> tuple[CastingStep, ...]``, at least one step, step names
unique (they name the output folders of multi-step processes). A step whose parting plane
is None asks the pipeline to choose it (``parting: auto``). A process with rules of its own
registers ``problems(recipe, line) -> list[Problem]`` with it: the plan stage reports them
(exit 2, nothing built) instead of the one-shot mold's parting rules.
"""

from __future__ import annotations

import importlib
import pkgutil
from collections.abc import Callable

from ...errors import Problem
from ...recipe.model import Recipe
from ..lines import LineOf
from ..model import CastingStep

StepsOf = Callable[[Recipe], tuple[CastingStep, ...]]
ProblemsOf = Callable[[Recipe, LineOf], list[Problem]]

PROCESSES: dict[str, StepsOf] = {}
PROBLEMS: dict[str, ProblemsOf] = {}
_loaded = False


def casting_process(name: str, problems: ProblemsOf | None = None
                    ) -> Callable[[StepsOf], StepsOf]:
    def deco(fn: StepsOf) -> StepsOf:
        if not callable(fn):
            raise TypeError(f"casting process {name!r}: not a function of the recipe")
        if name in PROCESSES and PROCESSES[name] is not fn:
            raise TypeError(f"casting process {name!r} is registered twice")
        PROCESSES[name] = fn
        if problems is not None:
            PROBLEMS[name] = problems
        return fn
    return deco


def own_problems(process: str) -> ProblemsOf | None:
    """The rules a process checks itself (None: the one-shot mold's parting rules)."""
    processes()
    return PROBLEMS.get(process)


def processes() -> dict[str, StepsOf]:
    global _loaded
    if not _loaded:
        for info in sorted(pkgutil.iter_modules(__path__), key=lambda m: m.name):
            importlib.import_module(f"{__name__}.{info.name}")
        _loaded = True
    return dict(sorted(PROCESSES.items()))


def steps_of(process: str, r: Recipe) -> tuple[CastingStep, ...]:
    steps = processes()[process](r)
    names = [s.name for s in steps]
    if not steps or len(set(names)) != len(names):
        raise ValueError(f"casting process {process!r} gave steps {names}: at least one, "
                         "each named once")
    return steps
