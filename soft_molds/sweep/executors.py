"""Where the variants of a sweep run: one interface, :class:`Executor`, over a local pool
of worker processes (:class:`ProcessPool`, the default) and a Dask distributed cluster
(:class:`DaskCluster`).

Either way each variant is built alone, from its recipe only, so the output bytes do not
depend on where or next to what it ran; every task is reported exactly once, as it
finishes; Ctrl-C stops handing out work, lets the running variants finish and makes
:meth:`Executor.run` return True.
"""

from __future__ import annotations

import multiprocessing as mp
import os
import signal
import sys
from collections.abc import Callable, Iterator, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from contextlib import contextmanager
from dataclasses import dataclass, field
from multiprocessing import forkserver
from multiprocessing.context import BaseContext
from typing import Protocol

from ..errors import SoftMoldsError
from . import lifeline
from .outcome import Outcome, Worker, exception_reason, failed
from .plan import Task

DEFAULT_RECYCLE_AFTER = 20
"""Variants a pool worker builds before it is replaced by a fresh process."""

Report = Callable[[Task, Outcome], None]
"""Called once per task, in the calling thread, as soon as its outcome is known."""

Note = Callable[[str], None]
"""Called with a line for the person watching (an interruption)."""


@dataclass(frozen=True)
class Job:
    """What every task of a run does: ``worker(task.recipe, out_root, force)``."""

    worker: Worker
    out_root: str
    force: bool


class Executor(Protocol):
    def run(self, todo: Sequence[Task], job: Job, report: Report, note: Note) -> bool:
        """Run ``job`` on every task, reporting each outcome; True when interrupted."""
        ...


def make_executor(jobs: int = 1, recycle_after: int = DEFAULT_RECYCLE_AFTER,
                  scheduler: str | None = None) -> Executor:
    """A Dask cluster when a scheduler address is given, else a local pool."""
    if scheduler:
        return DaskCluster(scheduler)
    return ProcessPool(jobs, recycle_after)


class _Pending(Protocol):
    def result(self) -> Outcome: ...


def _collect(fut: _Pending, t: Task, report: Report) -> None:
    try:
        o = fut.result()
    except Exception as exc:  # a worker that died, or a bug: record it, go on
        o = failed(t, exception_reason(exc))
    report(t, o)


# ------------------------------------------------------------------------- local pool

#: Imported once in the fork server, so every worker forked from it starts with the CAD
#: kernel and the pipeline loaded (a fresh import costs seconds per worker). The lifeline
#: comes first: it ties the fork server to the sweep before the slow imports.
PRELOAD = ("soft_molds.sweep.lifeline", "soft_molds.geometry.kernel", "soft_molds.pipeline",
           "soft_molds.moldset", "soft_molds.analysis.review", "soft_molds.export.card",
           "soft_molds.sweep.runner", "soft_molds.sweep.executors",
           "concurrent.futures.process")


@dataclass(frozen=True)
class _Generation:
    """How one pool's life ended: tasks never handed out, tasks in flight when a worker
    died (which of them killed it cannot be told), and whether Ctrl-C ended it."""

    unstarted: list[Task] = field(default_factory=list)
    lost: list[Task] = field(default_factory=list)
    interrupted: bool = False


class ProcessPool:
    """Worker processes on this machine, ``jobs`` at a time, one variant in flight per
    worker (so a Ctrl-C waits for no more than the variants being built).

    Workers come in generations: each generation's pool gets at most ``recycle_after``
    variants per worker and is then replaced by a fresh one, so memory stays flat over a
    long night (the pool's own per-worker recycling is not dependable on every Python
    3.11 release). A worker that dies (a crash inside the kernel) breaks its pool and
    every variant in flight with it; those become suspects and are built again one at a
    time, each in a pool of its own: a suspect that kills its worker again is recorded
    as failed, the others are built as usual."""

    def __init__(self, jobs: int = 1, recycle_after: int = DEFAULT_RECYCLE_AFTER) -> None:
        self.jobs = max(1, jobs)
        self.recycle_after = max(1, recycle_after)

    def run(self, todo: Sequence[Task], job: Job, report: Report, note: Note) -> bool:
        queue, suspects = list(todo), list[Task]()
        while queue or suspects:
            alone = bool(suspects)
            if alone:
                batch = [suspects.pop(0)]
            else:
                n = self.jobs * self.recycle_after
                batch, queue = queue[:n], queue[n:]
            end = self._generation(batch, 1 if alone else min(self.jobs, len(batch)), job,
                                   report, note)
            if end.interrupted:
                return True
            if alone:  # built on its own and killed its worker again: this is the one
                for t in end.lost:
                    report(t, failed(t, "the worker process died while building it (twice)"))
            else:
                suspects += end.lost
            queue = end.unstarted + queue
        return False

    def _generation(self, batch: list[Task], width: int, job: Job, report: Report,
                    note: Note) -> _Generation:
        ex = ProcessPoolExecutor(max_workers=width, mp_context=_context(),
                                 initializer=_init_worker,
                                 initargs=(self.jobs == 1, worker_import_path()))
        pending: dict[Future[Outcome], Task] = {}
        try:
            while batch or pending:
                while batch and len(pending) < width:
                    # Submit before taking the task off the list: a broken pool raises
                    # here, and the task must stay queued for the next pool.
                    with _helper_environment():  # spawned workers start inside submit
                        fut = ex.submit(job.worker, batch[0].recipe, job.out_root, job.force)
                    pending[fut] = batch.pop(0)
                finished, _ = wait(list(pending), return_when=FIRST_COMPLETED)
                if any(isinstance(f.exception(), BrokenProcessPool) for f in finished):
                    raise BrokenProcessPool("a worker died")
                for fut in finished:
                    _collect(fut, pending.pop(fut), report)
            return _Generation()
        except BrokenProcessPool:
            return _Generation(batch, list(pending.values()))
        except KeyboardInterrupt:
            for fut in list(pending):
                if fut.cancel():
                    pending.pop(fut)
            note("interrupted: finishing the variants being built")
            for fut in list(pending):
                try:
                    _collect(fut, pending.pop(fut), report)
                except KeyboardInterrupt:  # a second Ctrl-C: stop waiting
                    break
            return _Generation(batch, [], True)
        finally:
            ex.shutdown(wait=True, cancel_futures=True)


def _context() -> BaseContext:
    """A fork server where the platform has one (it has not run the kernel, so forking it
    is safe), else spawned workers that import everything themselves.

    The fork server and the resource tracker beside it are started here, in
    :func:`_helper_environment`; the pool would otherwise start them on its own (the
    tracker as soon as it makes its queues)."""
    if "forkserver" not in mp.get_all_start_methods():
        return mp.get_context("spawn")
    ctx = mp.get_context("forkserver")
    ctx.set_forkserver_preload(list(PRELOAD))
    with _helper_environment():
        forkserver.ensure_running()  # and the resource tracker; both stay for the process
    return ctx


@contextmanager
def _helper_environment() -> Iterator[None]:
    """The environment the pool's new processes start in: Python's safe-path mode (the
    fork server starts as ``python -c``, which would put the working folder first on its
    import path, so a file there named like a standard module would run inside the
    sweep) and the sweep's pid for :mod:`lifeline`."""
    wanted = {"PYTHONSAFEPATH": "1", lifeline.PARENT_ENV: str(os.getpid())}
    saved = {k: os.environ.get(k) for k in wanted}
    os.environ.update(wanted)
    try:
        yield
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v


def worker_import_path() -> list[str]:
    """The import path for the workers: this process's, without the working folder that
    ``python -c``, ``python -m`` or the prompt put first (workers import installed code
    and what this process was explicitly given, never what lies in the working folder)."""
    path = list(sys.path)
    if path and not sys.flags.safe_path and _is_working_folder(path[0]):
        del path[0]
    return path


def _is_working_folder(entry: str) -> bool:
    # The folder now, and where Python started (what it put on the path then).
    started = getattr(mp.process, "ORIGINAL_DIR", None)
    here = {os.path.realpath(d) for d in (os.getcwd(), started) if d}
    return os.path.realpath(entry or os.curdir) in here


def _init_worker(parallel: bool, import_path: list[str]) -> None:
    """Runs first in every pool worker."""
    from .. import geometry

    lifeline.bind_worker()
    # Ctrl-C is the sweep's to handle: a worker finishes the variant it is building.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    sys.path[:] = import_path
    # With a worker per core, OCCT's own threads only compete with the other workers.
    geometry.preload(parallel)


# ------------------------------------------------------------------------------- Dask

class DaskCluster:
    """The workers of a Dask distributed cluster (the optional ``cluster`` extra). They
    need this package installed and the output root on a shared file system."""

    def __init__(self, address: str) -> None:
        self.address = address

    def run(self, todo: Sequence[Task], job: Job, report: Report, note: Note) -> bool:
        try:
            from distributed import Client, as_completed
        except ImportError as exc:  # the optional extra is not installed
            raise SoftMoldsError("--scheduler needs the cluster extra: pip install "
                                 "'soft_molds[cluster]'") from exc
        with Client(self.address) as client:
            futs = {client.submit(job.worker, t.recipe, job.out_root, job.force, pure=False,
                                  key=_dask_key(t)): t for t in todo}
            try:
                for fut in as_completed(list(futs)):
                    _collect(fut, futs[fut], report)
            except KeyboardInterrupt:
                note("interrupted: cancelling the variants not yet built")
                client.cancel(list(futs))
                return True
        return False


def _dask_key(t: Task) -> str:
    r = t.recipe
    return f"soft-molds-{r.name}-{r.label}-{r.params_sha256()[:12]}"
