"""Overnight sweeps: build, check and write every variant of one or more recipes in a pool
of worker processes, resume an interrupted run, and leave a morning report.

- Each worker imports the CAD kernel once and is replaced after ``recycle_after`` variants,
  so memory stays flat over a long night. Ctrl-C stops handing out work, lets the running
  variants finish (their files appear complete or not at all) and reports what is done.
- A variant whose ``manifest.json`` matches its parameter hash and tool version, and whose
  files are all present with the recorded hashes, is not built again.
- A variant that fails (recipe, kernel, mesh or an error-level check) is recorded with its
  reason and the rest go on. Nothing is written for a variant with a failed check unless
  ``force``.
- Outputs are byte-identical whatever the number of workers (each variant is built alone,
  from its recipe only).

The report: ``summary.json`` and ``summary.csv`` in the output root (one row per variant),
and per family a sheet (``family-sheet[-F<n>].png`` / ``.svg``) and a casting card
(``casting-card[-F<n>].md`` / ``.html``) in the recipe's folder.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import sys
import time
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from .errors import RecipeError, SoftMoldsError
from .recipe.model import Recipe
from .recipe.variants import VariantSpec
from .version import __version__

DEFAULT_RECYCLE_AFTER = 20
"""Variants a worker builds before it is replaced by a fresh process."""


@dataclass(frozen=True)
class Task:
    """One variant to build: the recipe file it came from, its spec and its recipe."""

    source: str
    spec: VariantSpec
    recipe: Recipe

    @property
    def key(self) -> str:
        return f"{self.recipe.name}/{self.recipe.label}"


@dataclass(frozen=True)
class Outcome:
    """What became of one variant. ``status``: built, up to date, refused (an error-level
    check; nothing written) or failed (recipe, kernel or mesh error)."""

    recipe: str
    label: str
    family: str
    status: str
    reason: str = ""
    verdict: str = ""               # ok, warning, error ("" when nothing was built)
    errors: int = 0
    warnings: int = 0
    seconds: float = 0.0
    silicone_cm3: float | None = None
    mix_g: float | None = None
    changed: dict[str, Any] = field(default_factory=dict)
    out_dir: str = ""
    worker_pid: int = 0
    worker_rss_mb: float = 0.0      # the worker's resident memory after this variant
    worker_peak_mb: float = 0.0     # and its peak so far

    @property
    def ok(self) -> bool:
        return self.status in ("built", "up to date")


def plan_tasks(paths: Iterable[str | os.PathLike]) -> list[Task]:
    """Every variant of every recipe file, in file then label order; a RecipeError lists
    the problems of every file at once."""
    from . import load_variants

    tasks, problems = [], []
    for p in paths:
        try:
            for spec, r in load_variants(p):
                tasks.append(Task(str(p), spec, r))
        except RecipeError as exc:
            problems.extend(exc.lines())
    seen: dict[str, str] = {}
    for t in tasks:
        other = seen.setdefault(t.key, t.source)
        if other != t.source:
            problems.append(f"{t.source}: recipe {t.recipe.name!r} variant {t.recipe.label} "
                            f"is also made by {other}; both would write {t.key}/ (give one "
                            "of them another name)")
    if problems:
        raise SweepInputError(problems)
    return tasks


class SweepInputError(SoftMoldsError):
    def __init__(self, lines: list[str]):
        self.lines = lines
        super().__init__("\n".join(lines))


def output_dir(root: str | os.PathLike, r: Recipe) -> Path:
    return Path(root) / r.name / r.label


def file_digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def up_to_date(root: str | os.PathLike, r: Recipe) -> dict[str, Any] | None:
    """The manifest of a finished earlier build of ``r`` under ``root``, if it is complete
    and was built from the same parameters by the same version; else None."""
    d = output_dir(root, r)
    try:
        man = json.loads((d / "manifest.json").read_text())
    except (OSError, ValueError):
        return None
    # The hash of the recipe as given: with parting: auto the build fills in the plane, so
    # the manifest's own params hash differs from the task's.
    if (man.get("source_params_sha256") != r.params_sha256()
            or man.get("tool_version") != __version__):
        return None
    files = man.get("files")
    if not isinstance(files, dict) or not files:
        return None
    for name, digest in files.items():
        try:
            if file_digest((d / name).read_bytes()) != digest:
                return None
        except OSError:
            return None
    return man


def _figures(man: dict[str, Any]) -> tuple[float, float]:
    c = man.get("casting") or {}
    return (round(man["silicone_volume_mm3"] / 1000.0, 3),
            round(sum(p["g"] for p in c.get("portions", [])), 3))


def run_variant(recipe: Recipe, out_root: str, force: bool = False) -> Outcome:
    """Build, check and write one variant (runs in a worker process)."""
    import resource

    from .export.files import remove_stale_temps
    from .pipeline import build

    t = time.perf_counter()
    d = output_dir(out_root, recipe)
    remove_stale_temps(d)

    def done(**kw: Any) -> Outcome:
        return Outcome(recipe.name, recipe.label, "", seconds=time.perf_counter() - t,
                       out_dir=str(d), worker_pid=os.getpid(), worker_rss_mb=_rss_mb(),
                       worker_peak_mb=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
                       / 1024.0, **kw)

    try:
        molds = build(recipe)
    except SoftMoldsError as exc:
        return done(status="failed", reason=str(exc).splitlines()[0])
    man = molds.manifest()
    verdict = man["verdict"]
    n_err, n_warn = len(molds.errors), len(molds.warnings)
    if molds.errors and not force:
        first = molds.errors[0]
        return done(status="refused", reason=f"{first.check}: {first.message}",
                    verdict=verdict, errors=n_err, warnings=n_warn)
    try:
        molds.export(out_root)
    except OSError as exc:
        return done(status="failed", reason=f"cannot write: {exc.strerror or exc}")
    vol, mix = _figures(man)
    return done(status="built", verdict=verdict, errors=n_err, warnings=n_warn,
                silicone_cm3=vol, mix_g=mix)


def _rss_mb() -> float:
    """Current resident set size of this process (MB; 0 where /proc is missing)."""
    try:
        with open("/proc/self/statm") as f:
            pages = int(f.read().split()[1])
    except (OSError, ValueError, IndexError):
        return 0.0
    return pages * os.sysconf("SC_PAGE_SIZE") / 2 ** 20


def _init_worker(threads: bool = True) -> None:
    import signal

    # Ctrl-C is the parent's to handle: a worker finishes the variant it is building.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    import cadquery  # noqa: F401  (the kernel import, once per worker)

    from .geometry import kernel

    # With a worker per core, OCCT's own threads only compete with the other workers.
    kernel.set_parallel(threads)


class Progress:
    """One line per finished variant with a bar and an estimate of the time left."""

    def __init__(self, total: int, stream=None) -> None:
        self.total, self.done, self.worked = total, 0, 0
        self.start = time.perf_counter()
        self.first_work: float | None = None
        self.stream = stream if stream is not None else sys.stderr

    def step(self, o: Outcome) -> None:
        now = time.perf_counter()
        self.done += 1
        el = now - self.start
        # The rate counts built variants only: up-to-date ones cost nothing and would make
        # a resumed night look nearly finished.
        if o.status != "up to date":
            self.worked += 1
            if self.first_work is None:
                self.first_work = self.start
        left = self.total - self.done
        if self.worked and self.first_work is not None:
            eta = (now - self.first_work) / self.worked * left
        else:
            eta = 0.0
        width = 20
        fill = round(width * self.done / max(self.total, 1))
        bar = "#" * fill + "." * (width - fill)
        what = o.status if not o.reason else f"{o.status}: {o.reason[:60]}"
        print(f"[{bar}] {self.done}/{self.total} {o.recipe} {o.label} {what} "
              f"({o.seconds:.1f} s) elapsed {_clock(el)} left {_clock(eta)}",
              file=self.stream, flush=True)


def _clock(s: float) -> str:
    s = int(round(s))
    return f"{s // 3600}:{s % 3600 // 60:02d}:{s % 60:02d}"


Worker = Callable[[Recipe, str, bool], Outcome]


def run_sweep(tasks: Sequence[Task], out_root: str | os.PathLike, jobs: int = 1,
              force: bool = False, recycle_after: int = DEFAULT_RECYCLE_AFTER,
              progress: Progress | None = None, worker: Worker = run_variant,
              scheduler: str | None = None) -> tuple[list[Outcome], bool]:
    """Build every task not already up to date; returns the outcomes in task order and
    whether the run was interrupted (Ctrl-C)."""
    root = str(Path(out_root).resolve())  # workers (or cluster nodes) may run elsewhere
    outcomes: dict[str, Outcome] = {}
    todo: list[Task] = []
    for t in tasks:
        man = up_to_date(root, t.recipe)
        if man is None:
            todo.append(t)
            continue
        vol, mix = _figures(man)
        refused = man["verdict"] == "error" and not force
        first_err = next((f for f in man["checks"] if f["severity"] == "error"), None)
        outcomes[t.key] = Outcome(t.recipe.name, t.recipe.label, t.spec.family,
                                  "refused" if refused else "up to date",
                                  reason=(f"{first_err['check']}: {first_err['message']} "
                                          "(written earlier with --force)"
                                          if refused and first_err else ""),
                                  verdict=man["verdict"],
                                  errors=sum(f["severity"] == "error" for f in man["checks"]),
                                  warnings=sum(f["severity"] == "warning" for f in man["checks"]),
                                  silicone_cm3=vol, mix_g=mix,
                                  out_dir=str(output_dir(root, t.recipe)))
    prog = progress or Progress(len(tasks))
    for o in outcomes.values():
        prog.step(o)
    if isinstance(prog, Progress):
        prog.first_work = time.perf_counter()  # building starts now
    interrupted = False
    if todo:
        run = _run_dask if scheduler else _run_pool
        interrupted = run(todo, root, jobs, force, recycle_after, prog, worker, outcomes,
                          scheduler)
    result = []
    for t in tasks:
        o = outcomes.get(t.key)
        if o is not None:
            result.append(_with_spec(o, t))
    return result, interrupted


def _with_spec(o: Outcome, t: Task) -> Outcome:
    from dataclasses import replace

    return replace(o, family=t.spec.family, changed=t.spec.changed())


def _run_pool(todo, root, jobs, force, recycle_after, prog, worker, outcomes, _sched) -> bool:
    """Run ``todo`` in generations of worker processes: each generation's pool gets at most
    ``recycle_after`` variants per worker and is then replaced by a fresh one (the pool's
    own per-worker recycling is not dependable on every Python 3.11 release).

    A worker that dies (a crash inside the kernel) breaks its pool and every variant in
    flight with it, and which of them killed it cannot be told. Those variants become
    suspects and are built again one at a time, each in a pool of its own: a suspect that
    kills its worker again is recorded as failed, the others are built as usual."""
    import multiprocessing as mp
    from concurrent.futures.process import BrokenProcessPool

    ctx = _context(mp)
    jobs = max(1, jobs)
    queue = list(todo)
    suspects: list[Task] = []
    interrupted = False
    while (queue or suspects) and not interrupted:
        alone = bool(suspects)
        if alone:
            batch = [suspects.pop(0)]
        else:
            batch, queue = queue[: jobs * recycle_after], queue[jobs * recycle_after:]
        width = 1 if alone else min(jobs, len(batch))
        ex = ProcessPoolExecutor(max_workers=width, mp_context=ctx,
                                 initializer=_init_worker, initargs=(jobs == 1,))
        pending: dict[Future, Task] = {}
        try:
            # One variant per worker in flight: a Ctrl-C then waits for no more than the
            # variants being built (the pool would start queued ones it cannot cancel).
            while batch or pending:
                while batch and len(pending) < width:
                    # Submit before taking the task off the list: a broken pool raises
                    # here, and the task must stay queued for the next pool.
                    fut = ex.submit(worker, batch[0].recipe, root, force)
                    pending[fut] = batch.pop(0)
                finished, _ = wait(list(pending), return_when=FIRST_COMPLETED)
                if any(isinstance(f.exception(), BrokenProcessPool) for f in finished):
                    raise BrokenProcessPool("a worker died")
                for fut in finished:
                    _collect(fut, pending.pop(fut), outcomes, prog)
        except BrokenProcessPool:
            hit = list(pending.values())
            pending.clear()
            if alone:  # built on its own and killed its worker again: this is the one
                for t in hit:
                    _record(t, "failed", "the worker process died while building it (twice)",
                            outcomes, prog)
            else:
                suspects += hit
            queue = batch + queue
        except KeyboardInterrupt:
            interrupted = True
            for fut in list(pending):
                if fut.cancel():
                    pending.pop(fut)
            print("interrupted: finishing the variants being built", file=prog.stream,
                  flush=True)
            for fut in list(pending):
                try:
                    _collect(fut, pending.pop(fut), outcomes, prog)
                except KeyboardInterrupt:
                    break
        finally:
            ex.shutdown(wait=True, cancel_futures=True)
    return interrupted


def _record(t: Task, status: str, reason: str, outcomes: dict[str, Outcome],
            prog: Progress) -> None:
    o = Outcome(t.recipe.name, t.recipe.label, t.spec.family, status, reason=reason)
    outcomes[t.key] = o
    prog.step(o)


#: Imported once in the fork server, so every worker forked from it starts with the CAD
#: kernel and the pipeline already loaded (a fresh import costs seconds per worker).
PRELOAD = ["cadquery", "soft_molds.pipeline", "soft_molds.moldset", "soft_molds.analysis.review",
           "soft_molds.export.card"]


def _context(mp):
    """A fork server where the platform has one (it has not run the kernel, so forking
    it is safe), else spawned workers that import everything themselves."""
    if "forkserver" in mp.get_all_start_methods():
        ctx = mp.get_context("forkserver")
        ctx.set_forkserver_preload(PRELOAD)
        return ctx
    return mp.get_context("spawn")


def _collect(fut: Future, t: Task, outcomes: dict[str, Outcome], prog: Progress) -> None:
    try:
        o = fut.result()
    except Exception as exc:  # a worker that died, or a bug: record it, go on
        o = Outcome(t.recipe.name, t.recipe.label, t.spec.family, "failed",
                    reason=f"{type(exc).__name__}: {exc}".splitlines()[0])
    outcomes[t.key] = o
    prog.step(o)


def _run_dask(todo, root, jobs, force, recycle_after, prog, worker, outcomes, scheduler
              ) -> bool:
    try:
        from distributed import Client, as_completed
    except ImportError as exc:  # the optional extra is not installed
        raise SoftMoldsError("--scheduler needs the cluster extra: pip install "
                             "'soft_molds[cluster]'") from exc
    interrupted = False
    with Client(scheduler) as client:
        futs = {client.submit(worker, t.recipe, root, force, pure=False,
                              key=f"soft-molds-{t.recipe.name}-{t.recipe.label}-"
                                  f"{t.recipe.params_sha256()[:12]}"): t for t in todo}
        try:
            for fut in as_completed(list(futs)):
                t = futs[fut]
                try:
                    o = fut.result()
                except Exception as exc:
                    o = Outcome(t.recipe.name, t.recipe.label, t.spec.family, "failed",
                                reason=f"{type(exc).__name__}: {exc}".splitlines()[0])
                outcomes[t.key] = o
                prog.step(o)
        except KeyboardInterrupt:
            interrupted = True
            client.cancel(list(futs))
    return interrupted


# ------------------------------------------------------------------------------ report

SUMMARY_FIELDS = ("recipe", "label", "family", "status", "verdict", "errors", "warnings",
                  "silicone_cm3", "mix_g", "seconds", "changed", "reason", "out_dir")


def summary_rows(outcomes: Sequence[Outcome]) -> list[dict[str, Any]]:
    rows = []
    for o in outcomes:
        d = asdict(o)
        rows.append({k: (round(d[k], 3) if k == "seconds" else d[k]) for k in SUMMARY_FIELDS})
    return rows


def summary_csv(rows: Sequence[dict[str, Any]]) -> bytes:
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=SUMMARY_FIELDS, lineterminator="\n")
    w.writeheader()
    for r in rows:
        w.writerow({**r, "changed": "; ".join(f"{k}={v}" for k, v in r["changed"].items())})
    return buf.getvalue().encode()


def families(outcomes: Sequence[Outcome]) -> dict[tuple[str, str], list[Outcome]]:
    out: dict[tuple[str, str], list[Outcome]] = {}
    for o in outcomes:
        out.setdefault((o.recipe, o.family), []).append(o)
    return out


def write_reports(outcomes: Sequence[Outcome], out_root: str | os.PathLike) -> list[Path]:
    """summary.json, summary.csv and, per family, its sheet and casting card."""
    from .export.files import json_bytes, write_atomic

    root = Path(out_root)
    rows = summary_rows(outcomes)
    written = []
    for name, data in (("summary.json", json_bytes({"tool_version": __version__,
                                                    "variants": rows})),
                       ("summary.csv", summary_csv(rows))):
        write_atomic(root / name, data)
        written.append(root / name)
    for (recipe, fam), members in families(outcomes).items():
        suffix = f"-{fam}" if fam else ""
        written += _family_files(root / recipe, recipe, fam, suffix, members)
    return written


def _family_files(folder: Path, recipe: str, fam: str, suffix: str,
                  members: Sequence[Outcome]) -> list[Path]:
    from .analysis.section import section_segments
    from .export.card import card_files
    from .export.files import write_atomic
    from .export.sheet import SheetData, SheetVariant, render_sheet
    from .export.stl import read_binary_stl

    mans, variants = [], []
    for o in members:
        man = None
        if o.ok:
            try:
                man = json.loads((Path(o.out_dir) / "manifest.json").read_text())
            except (OSError, ValueError):
                man = None
        changed = tuple((k, f"{v:g}" if isinstance(v, float) else str(v))
                        for k, v in o.changed.items())
        if man is None:
            variants.append(SheetVariant(o.label, changed, (("status", o.status),
                                                            ("reason", o.reason[:80])),
                                         "failed" if o.status == "failed" else "errors",
                                         np.empty((0, 2, 2)), ("x", "z")))
            continue
        mans.append(man)
        up = man["pour"]["up"]
        cross = "y" if up[2] else "z"       # the in-plane cross axis: cut across it
        cy, cz = man["params"]["inlet"]["center_mm"]
        seg, axes = section_segments(read_binary_stl(Path(o.out_dir) / "cast.stl"), cross,
                                     cy if cross == "y" else cz)
        figs = [("silicone", f"{man['silicone_volume_mm3'] / 1000:.2f} cm3"),
                ("mix", " + ".join(f"{p['g']:g} g {p['what'].split()[-1]}"
                                   for p in man["casting"]["portions"]))]
        walls = [f["value"] for f in man["checks"] if f["check"] == "silicone-wall"
                 and f["value"] is not None]
        if walls:
            figs.append(("thinnest wall", f"{min(walls):.2f} mm"))
        lims = [w["limit_kpa"] for w in man["pressure"]["walls"] if w["limit_kpa"] is not None]
        if lims:
            figs.append(("balloons at", f"about {min(lims):.0f} kPa"))
        verdict = {"ok": "ok", "warning": "warnings", "error": "errors"}[man["verdict"]]
        variants.append(SheetVariant(o.label, changed, tuple(figs), verdict, seg, axes))
    title = f"{recipe}" + (f" family {fam}" if fam else "")
    written = []
    png, svg = render_sheet(SheetData(title, f"soft-molds {__version__}", tuple(variants)))
    for ext, data in (("png", png), ("svg", svg)):
        p = folder / f"family-sheet{suffix}.{ext}"
        write_atomic(p, data)
        written.append(p)
    if mans:
        for name, data in card_files(mans, title, f"casting-card{suffix}").items():
            write_atomic(folder / name, data)
            written.append(folder / name)
    return written
