"""A whole sweep: list what an earlier run already finished, hand the rest to an
executor, and return every outcome in task order."""

from __future__ import annotations

import os
from collections.abc import Sequence
from dataclasses import replace
from pathlib import Path

from ..export.claim import claim_recipe_folders
from .cache import earlier_outcome
from .executors import DEFAULT_RECYCLE_AFTER, Executor, Job, make_executor
from .outcome import Outcome, Worker
from .plan import Task
from .progress import Progress, ProgressSink
from .runner import run_variant


def run_sweep(tasks: Sequence[Task], out_root: str | os.PathLike[str], jobs: int = 1,
              force: bool = False, recycle_after: int = DEFAULT_RECYCLE_AFTER,
              progress: ProgressSink | None = None, worker: Worker = run_variant,
              scheduler: str | None = None, executor: Executor | None = None
              ) -> tuple[list[Outcome], bool]:
    """Build every task not already up to date under ``out_root``; returns the outcomes
    in task order (a task is missing only when the run was interrupted before it) and
    whether the run was interrupted (Ctrl-C).

    Runs on ``executor`` when given, else on a Dask cluster at ``scheduler``, else in a
    local pool of ``jobs`` workers each replaced after ``recycle_after`` variants.
    ``force`` writes variants with an error-level finding too."""
    root = str(Path(out_root).resolve())  # workers (or cluster nodes) may run elsewhere
    prog = progress if progress is not None else Progress(len(tasks))
    try:
        return _run(tasks, root, jobs, force, recycle_after, prog, worker, scheduler,
                    executor)
    finally:
        if progress is None and isinstance(prog, Progress):
            prog.close()  # an interrupted run leaves no live bar behind


def _run(tasks: Sequence[Task], root: str, jobs: int, force: bool, recycle_after: int,
         prog: ProgressSink, worker: Worker, scheduler: str | None,
         executor: Executor | None) -> tuple[list[Outcome], bool]:
    outcomes: dict[str, Outcome] = {}

    def report(t: Task, o: Outcome) -> None:
        outcomes[t.key] = o
        prog.step(o)

    def note(line: str) -> None:
        print(line, file=prog.stream, flush=True)

    # One run at a time fills a recipe's family folder: a second fails at once.
    with claim_recipe_folders(Path(root), (t.recipe.name for t in tasks)):
        todo = []
        for t in tasks:
            earlier = earlier_outcome(t, root, force)
            if earlier is None:
                todo.append(t)
            else:
                report(t, earlier)
        if isinstance(prog, Progress):
            prog.start_work()
        interrupted = False
        if todo:
            ex = executor if executor is not None else make_executor(jobs, recycle_after,
                                                                       scheduler)
            interrupted = ex.run(todo, Job(worker, root, force), report, note)
    return [_with_spec(outcomes[t.key], t) for t in tasks if t.key in outcomes], interrupted


def _with_spec(o: Outcome, t: Task) -> Outcome:
    return replace(o, family=t.spec.family, changed=t.spec.changed(),
                   description=t.recipe.description)
