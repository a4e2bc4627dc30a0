"""Command line: ``soft-molds build``, ``check``, ``sweep``, ``report`` and helpers.

Exit status: 0 success; 1 a mold could not be built, a mesh failed its integrity check or
a manufacturability check failed (``check --strict``: or warned), or the output folder
cannot be written (``build`` probes it before building); 2 bad input (recipe problems, one
line each, no traceback, nothing written; also a folder named that holds no recipe).
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from collections.abc import Callable, Sequence
from typing import TYPE_CHECKING, TextIO

from .analysis.findings import Finding, Severity, counts
from .errors import RecipeError, SoftMoldsError
from .units import mm3_to_cm3
from .version import __version__

if TYPE_CHECKING:
    from .sweep.outcome import Outcome

CAUTIONS = (
    "Cautions: inflated silicone parts can balloon and burst - wear eye protection, use a "
    "regulator and a relief valve, ramp pressure slowly and never exceed a pressure you have "
    "tested.",
    "Mix silicone with nitrile or vinyl gloves and good ventilation; follow the material "
    "safety data sheets, local codes and licensed practice. Parts worn on a body are not "
    "medical devices.",
)


def _fmt_part(p) -> str:
    lo, hi = p.mesh.bbox_mm()
    size = " x ".join(f"{h - a:.1f}" for a, h in zip(lo, hi))
    pull = "-" if p.pull_dir is None else _axis_name(p.pull_dir)
    verdict = "ok" if p.report.ok else "FAILED"
    return (f"  {p.name:<12} {p.role:<5} {p.brep_volume_mm3:>11.1f} mm3 {p.mesh.triangle_count:>8} "
            f"triangles  {size} mm  pull {pull:<3} {verdict}")


def _findings_table(findings: Sequence[Finding], show_info: bool = True) -> list[str]:
    """The review's findings as aligned lines, errors first."""
    rows = [f for f in findings if show_info or f.severity is not Severity.INFO]
    n = counts(findings)
    head = f"  checks: {n.errors} error(s), {n.warnings} warning(s), {n.infos} note(s)"
    if not rows:
        return [head]
    width = max(len(f.check) for f in rows)
    pw = max(len(f.part) for f in rows)
    word = {Severity.ERROR: "ERROR", Severity.WARNING: "WARNING", Severity.INFO: "note"}
    return [head] + [f"  {word[f.severity]:<7} {f.check:<{width}} {f.part:<{pw}} {f.message}"
                     for f in rows]


def _weigh_out(molds) -> list[str]:
    plan = molds.casting
    if plan is None:
        return []
    q, g = plan.quantities, plan.grade
    parts = ", ".join(f"{p.what} {p.grams:g} g" for p in q.portions)
    return [f"  weigh out ({g.name}, {q.waste_pct:g} % waste included): {parts}; pot life "
            f"{g.pot_life_min:g} min, demold after {g.demold_h:g} h (the recipe's material "
            "figures; check your data sheet; casting-card.md)"]


def cmd_blend(args: argparse.Namespace) -> int:
    from .recipe.materials import blend, grades

    table = grades()
    missing = [n for n in (args.first, args.second) if n not in table]
    if missing:
        print(f"error: unknown grade {', '.join(missing)}; allowed: {', '.join(table)}",
              file=sys.stderr)
        return 2
    try:
        b = blend(table[args.first], table[args.second], args.shore_a)
    except ValueError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    phi, w = b.volume_fraction_first, b.weight_fraction_first
    print(f"for about Shore A{args.shore_a:g} (E {b.modulus_mpa:.3f} MPa by Gent's relation): "
          f"{phi * 100:.1f} % {args.first} and {(1 - phi) * 100:.1f} % {args.second} by "
          f"volume ({w * 100:.1f} % / {(1 - w) * 100:.1f} % by weight)")
    print("an approximation (modulus interpolated between the two grades): cast a test piece "
          "and measure its hardness")
    return 0


def _axis_name(d: Sequence[float]) -> str:
    for i, name in enumerate("xyz"):
        if abs(d[i]) > 0.5:
            return ("+" if d[i] > 0 else "-") + name
    return "?"


def _expand(paths: Sequence[str]) -> list[str]:
    """Recipe files named, with every ``*.yaml`` of a named folder (sorted)."""
    from pathlib import Path

    out: list[str] = []
    for p in paths:
        if Path(p).is_dir():
            out += [str(q) for q in sorted(Path(p).glob("*.yaml"))]
        else:
            out.append(p)
    return out


def _empty_folders(paths: Sequence[str]) -> list[str]:
    """One error line for each named folder that holds no recipe (``*.yaml``)."""
    from pathlib import Path

    return [f"{p}: folder holds no recipe file (*.yaml)" for p in paths
            if Path(p).is_dir() and not any(Path(p).glob("*.yaml"))]


#: A recipe family bigger than this reports its validation progress on stderr (at about
#: 0.1-0.2 s a variant, 200 variants take half a minute before the first build).
PROGRESS_ABOVE = 200


def _validation_progress(path: str) -> Callable[[int, int], None]:
    """A ``progress(done, total)`` callback that prints, for a family of more than
    ``PROGRESS_ABOVE`` variants, a first line and one line per tenth validated."""
    def report(done: int, total: int) -> None:
        if total <= PROGRESS_ABOVE:
            return
        if done == 1:
            print(f"{path}: validating {total} variants", file=sys.stderr, flush=True)
        if done * 10 // total > (done - 1) * 10 // total:
            print(f"{path}: validated {done} of {total} variants "
                  f"({100 * done // total} %)", file=sys.stderr, flush=True)
    return report


def _load(paths: Sequence[str], label: str | None = None, folders: bool = True):
    """(variants of every file as (spec, recipe), bad input?); problems printed. With
    ``folders`` a folder stands for its recipe files (a folder without one is bad input)."""
    from . import load_variants

    found, bad = [], False
    if folders:
        for line in _empty_folders(paths):
            bad = True
            print(f"error: {line}", file=sys.stderr)
    for path in (_expand(paths) if folders else paths):
        try:
            vs = load_variants(path, progress=_validation_progress(path))
        except RecipeError as exc:
            bad = True
            for line in exc.lines():
                print(f"error: {line}", file=sys.stderr)
            continue
        if label is not None:
            pick = [v for v in vs if v[1].label == label]
            if not pick:
                bad = True
                print(f"error: {path}: no variant labelled {label}; allowed: "
                      + ", ".join(r.label for _, r in vs), file=sys.stderr)
            vs = tuple(pick)
        found += list(vs)
    return found, bad


def _out_writable(out: str) -> bool:
    """Whether files can be written under ``out``; else one error line. Found before
    minutes of building, not after, and nothing is left behind. Exit 1 as when a write
    fails after the build: the same fault gives the same status whenever it is found."""
    from pathlib import Path

    from .export.files import probe_writable

    why = probe_writable(Path(out))
    if why is not None:
        print(f"error: cannot write under {out}: {why}; nothing built", file=sys.stderr)
    return why is None


def cmd_build(args: argparse.Namespace) -> int:
    variants, bad = _load([args.recipe], args.variant, folders=False)
    if bad:
        return 2
    if not _out_writable(args.out):
        return 1
    from .analysis.findings import refuses_to_write, verdict
    from .pipeline import build

    status = 0
    for _, r in variants:
        t = time.perf_counter()
        if r.multi_step:
            status = max(status, _build_steps(r, args))
            continue
        try:
            molds = build(r)
        except SoftMoldsError as exc:
            print(f"error: {r.source}: {exc}", file=sys.stderr)
            status = 1
            continue
        print(f"{r.name} {r.label}: built in {time.perf_counter() - t:.1f} s")
        for p in molds.parts:
            print(_fmt_part(p))
        print(f"  silicone {mm3_to_cm3(molds.silicone_volume_mm3):.2f} cm3; sprue and vents: "
              + ", ".join(o.kind for o in molds.openings))
        if molds.motion is not None:
            print(f"  predicted motion ({molds.motion.model}, an estimate): "
                  f"{molds.motion.headline}")
        if molds.parting_candidates:
            pa = molds.recipe.parting
            print(f"  parting plane chosen: {pa.axis} = {pa.offset_mm:g} mm "
                  f"(of {len(molds.parting_candidates)} candidates)")
        for line in _findings_table(molds.findings, show_info=args.verbose):
            print(line)
        for line in _weigh_out(molds):
            print(line)
        if refuses_to_write(verdict(molds.findings), args.force):
            print(f"error: {r.source}: {r.label}: {len(molds.errors)} check(s) failed; nothing "
                  "written (fix the recipe, or pass --force to write the files anyway)",
                  file=sys.stderr)
            status = 1
            continue
        try:
            paths = molds.export(args.out)
        except OSError as exc:
            print(f"error: cannot write under {args.out}: {exc.strerror or exc}",
                  file=sys.stderr)
            return 1
        forced = " despite failed checks (--force)" if molds.errors else ""
        print(f"  wrote {len(paths)} files to {molds.output_dir(args.out)}{forced}")
    for line in CAUTIONS:
        print(line)
    return status


def _build_steps(r, args: argparse.Namespace) -> int:
    """Build and write a recipe of a multi-step process (layered, overmold): every step's
    parts, the pours in order and the findings; like a one-shot mold, nothing is written
    on an error unless forced."""
    from .analysis.findings import refuses_to_write, verdict
    from .export.overmold import write_steps
    from .pipeline import build_steps

    out = args.out

    t = time.perf_counter()
    try:
        m = build_steps(r)
    except SoftMoldsError as exc:
        print(f"error: {r.source}: {exc}", file=sys.stderr)
        return 1
    kind = "melted core" if r.core.melted else r.process.kind
    print(f"{r.name} {r.label}: built in {time.perf_counter() - t:.1f} s ({kind}, "
          f"{len(m.steps)} pours)")
    for s in m.steps:
        print(f"  pour {s.index} ({s.name}): {mm3_to_cm3(s.pour.cast_mm3):.2f} cm3, mix "
              f"{s.pour.mixed_g:.1f} g")
        for p in s.parts:
            print(_fmt_part(p))
    if m.motion is not None:
        print(f"  predicted motion ({m.motion.model}, an estimate): {m.motion.headline}")
    for line in _findings_table(m.findings, show_info=args.verbose):
        print(line)
    errors = [f for f in m.findings if f.severity is Severity.ERROR]
    if refuses_to_write(verdict(m.findings), args.force):
        print(f"error: {r.source}: {r.label}: {len(errors)} check(s) failed; nothing "
              "written (fix the recipe, or pass --force to write the files anyway)",
              file=sys.stderr)
        return 1
    try:
        paths = write_steps(m, out)
    except OSError as exc:
        print(f"error: cannot write under {out}: {exc.strerror or exc}", file=sys.stderr)
        return 1
    forced = " despite failed checks (--force)" if errors else ""
    print(f"  wrote {len(paths)} files to {paths[-1].parent}{forced}")
    return 0


def cmd_check(args: argparse.Namespace) -> int:
    variants, bad = _load(args.recipes)
    if bad:
        return 2
    failed = []
    files: dict[str, bool] = {}  # recipe file -> every variant passed
    recipes = [r for _, r in variants]
    for r, (text, problem) in zip(recipes, _checked(recipes, args)):
        print(text, end="")
        files.setdefault(r.source, True)
        if problem is not None:
            failed.append(problem)
            files[r.source] = False
    print(check_tally(len(variants) - len(failed), len(variants), sum(files.values()),
                      len(files), args.strict))
    for line in failed:
        print(f"  failed: {line}")
    return 1 if failed else 0


def _checked(recipes: list, args: argparse.Namespace):
    """``(report, problem)`` of each variant, in the order given. With ``--jobs 1`` the
    variants are checked here, one after another; with more, in that many worker
    processes (each imports the CAD kernel once), the reports still printed in order so
    the output does not depend on which worker finished first."""
    if args.jobs == 1 or len(recipes) < 2:
        return (_check_one(r, args) for r in recipes)
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    # "spawn": a fresh interpreter per worker, never a fork of a process that may hold
    # kernel state.
    pool = ProcessPoolExecutor(max_workers=min(args.jobs, len(recipes)),
                               mp_context=multiprocessing.get_context("spawn"))
    with pool:
        return list(pool.map(_check_one, recipes, [args] * len(recipes)))


def _check_one(r, args: argparse.Namespace) -> tuple[str, str | None]:
    """Build and check one variant; its report (parts and findings) and why it failed
    (None: it passed). Multi-step processes get their own checks (trays and a post
    bridge, or two pours on one core: soft_molds.analysis.layered_checks,
    overmold_checks); every step's parts are listed in pour order."""
    import contextlib
    import io

    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        problem = _report_one(r, args)
    return out.getvalue(), problem


def _report_one(r, args: argparse.Namespace) -> str | None:
    """Print one variant's check report; why it failed, or None."""
    from .pipeline import build, build_steps

    try:
        if r.multi_step:
            sm = build_steps(r)
            findings = tuple(sm.findings)
            parts = [p for s in sm.steps for p in s.parts]
            pours = f"{len(sm.steps)} pours, "
        else:
            molds = build(r)
            findings, parts, pours = tuple(molds.findings), list(molds.parts), ""
    except SoftMoldsError as exc:
        print(f"FAIL {r.source} {r.label}: {exc}")
        return f"{r.source} {r.label}: {exc}".splitlines()[0]
    errs = [f for f in findings if f.severity is Severity.ERROR]
    warns = [f for f in findings if f.severity is Severity.WARNING]
    failing = bool(errs) or (args.strict and bool(warns))
    print(f"{'FAIL' if failing else 'ok  '} {r.source}: {r.name} {r.label}, {pours}"
          f"{len(parts)} parts closed and consistent")
    for p in parts:
        print(_fmt_part(p))
    for line in _findings_table(findings, show_info=args.verbose):
        print(line)
    if not failing:
        return None
    worst = (errs or warns)[0]
    return f"{r.source} {r.label}: {worst.check}: {worst.message}"


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


def check_tally(variants_ok: int, variants: int, recipes_ok: int, recipes: int,
                strict: bool) -> str:
    """The last line of ``check``: variants counted as variants, recipe files as recipes
    (a recipe passes when every variant of it passes)."""
    what = "errors or warnings" if strict else "errors"
    return (f"{variants_ok} of {_count(variants, 'variant')} passed (no {what}); "
            f"{recipes_ok} of {_count(recipes, 'recipe')} passed in every variant")


def cmd_sweep(args: argparse.Namespace) -> int:
    from .export.claim import FolderBusyError
    from .sweep import Progress, SweepInputError, plan_tasks, run_sweep, write_reports

    try:
        tasks = plan_tasks(_expand(args.recipes))
    except SweepInputError as exc:
        for line in exc.lines:
            print(f"error: {line}", file=sys.stderr)
        return 2
    if not tasks:
        print("error: no recipes given", file=sys.stderr)
        return 2
    if not _out_writable(args.out):
        return 1
    try:
        with Progress(len(tasks)) as progress:  # closed on Ctrl-C too: no bar left live
            outcomes, interrupted = run_sweep(tasks, args.out, jobs=args.jobs,
                                              force=args.force,
                                              recycle_after=args.recycle_after,
                                              progress=progress, scheduler=args.scheduler)
    except FolderBusyError as exc:  # another run is filling the same folders: not bad input
        print(f"error: {exc}", file=sys.stderr)
        return 1
    except SoftMoldsError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    try:
        written = write_reports(outcomes, args.out)
    except OSError as exc:
        print(f"error: cannot write the report under {args.out}: {exc.strerror or exc}",
              file=sys.stderr)
        return 1
    print_sweep_table(outcomes, sys.stdout)
    bad = [o for o in outcomes if not o.ok]
    print(f"{len(outcomes) - len(bad)} of {len(tasks)} variants built or up to date; report: "
          + ", ".join(str(p) for p in written[:2]))
    for line in CAUTIONS:
        print(line)
    if interrupted:
        print("interrupted: run the same command again to finish", file=sys.stderr)
        return 130
    return 1 if bad or len(outcomes) < len(tasks) else 0


#: The morning report's columns: heading and whether the figures align right.
SWEEP_COLUMNS = (("recipe", False), ("label", False), ("status", False), ("checks", False),
                 ("silicone", True), ("mix g", True), ("motion", True), ("s", True),
                 ("changed / reason", False))


def _sweep_row(o: Outcome) -> tuple[str, ...]:
    vol = "-" if o.silicone_cm3 is None else f"{o.silicone_cm3:.2f} cm3"
    mix = "-" if o.mix_g is None else f"{o.mix_g:g}"
    move = (f"{o.bend_deg:.1f} deg" if o.bend_deg is not None else
            f"{o.extension_mm:.2f} mm" if o.extension_mm is not None else "-")
    note = o.reason or ", ".join(f"{k}={v}" for k, v in o.changed.items())
    return (o.recipe, o.label, str(o.status), o.verdict or "-", vol, mix, move,
            f"{o.seconds:.1f}", note)


def print_sweep_table(outcomes: Sequence[Outcome], out: TextIO) -> None:
    """The morning report, one row per variant: a drawn table on a terminal, fixed-width
    plain text (no control codes) in a log or pipe."""
    from .sweep.progress import is_terminal

    rows = [_sweep_row(o) for o in outcomes]
    if not is_terminal(out):
        widths = (18, 6, 11, 8, 9, 7, 9, 6)
        for row in [tuple(h for h, _ in SWEEP_COLUMNS), *rows]:
            cells = [c.rjust(w) if right else c.ljust(w)
                     for c, w, (_, right) in zip(row, widths, SWEEP_COLUMNS)]
            print(" ".join(cells) + "  " + row[-1], file=out)
        return
    from rich.console import Console
    from rich.table import Table

    table = Table(box=None, pad_edge=False, header_style="bold")
    for heading, right in SWEEP_COLUMNS:
        table.add_column(heading, justify="right" if right else "left", no_wrap=True)
    for row in rows:
        table.add_row(*row)
    # Never squeezed to the window: a narrow terminal wraps whole rows, as it wraps the
    # plain text, rather than rich cutting figures or notes short.
    Console(file=out, force_terminal=True, highlight=False, width=10_000).print(table)


def _family_manifests(folder: str) -> tuple[list, list[str]]:
    """(manifests of the variant folders under ``folder``, in label order; error lines)."""
    from pathlib import Path

    from .export.manifest import MANIFEST_NAME, ManifestError, read_manifest

    root = Path(folder)
    if not root.is_dir():
        return [], [f"{folder}: not a folder; allowed: the family folder a sweep wrote "
                    "(out/<recipe>)"]
    mans, errors = [], []
    for sub in sorted(p for p in root.iterdir() if (p / MANIFEST_NAME).is_file()):
        try:
            # Any version: the prediction compared is the one made when the parts were
            # built and cast, whatever soft_molds reads it now.
            mans.append(read_manifest(sub, any_version=True))
        except ManifestError as exc:
            errors.append(str(exc))
    if not mans and not errors:
        errors.append(f"{folder}: holds no built variant (no */{MANIFEST_NAME}); allowed: "
                      "the family folder a sweep wrote (out/<recipe>)")
    names = sorted({m.recipe for m in mans})
    if len(names) > 1:
        errors.append(f"{folder}: variants of several recipes ({', '.join(names)}); "
                      "allowed: one family")
    return sorted(mans, key=lambda m: m.label), errors


def _curve(man) -> tuple[tuple[float, ...], tuple[float, ...]]:
    mo = man.motion
    if mo is None:
        return (), ()
    bending = mo.kind == "bending"
    return (tuple(p.pressure_kpa for p in mo.points),
            tuple(p.angle_deg if bending else p.extension_mm for p in mo.points))


def cmd_report(args: argparse.Namespace) -> int:
    """Measured against predicted for a built family: plot, factor, ranking, next recipe."""
    from pathlib import Path

    from .analysis.calibration import Candidate, fit_factor, interpolate, pair_up, rank
    from .errors import Problem
    from .export.results import (
        PLOT_STEM,
        REPORT_NAME,
        ComparisonPlot,
        RankRow,
        ReportText,
        VariantSeries,
        render_comparison,
        report_markdown,
        results_name,
        write_report,
    )
    from .recipe.generation import next_generation, swept_field
    from .recipe.load import variants_from_text
    from .recipe.results import Quantity, read_results
    from .recipe.yamlsource import parse_recipe_text, read_text_file

    def fail(lines: Sequence[str]) -> int:
        for line in lines:
            print(f"error: {line}", file=sys.stderr)
        return 2

    bad_args = [f"--{name.replace('_', '-')}: is out of range (got {v!r}); allowed: {rule}"
                for name, v, ok, rule in (
                    ("at_kpa", args.at_kpa, args.at_kpa is None or args.at_kpa > 0, "> 0 kPa"),
                    ("min_burst_margin", args.min_burst_margin,
                     args.min_burst_margin is None or args.min_burst_margin >= 1, ">= 1"))
                if not ok]
    if bad_args:
        return fail(bad_args)
    mans, errors = _family_manifests(args.family_dir)
    if errors:
        return fail(errors)
    family = mans[0].recipe
    labels = [m.label for m in mans]
    results_path = args.results or str(Path(args.family_dir) / results_name())
    try:
        res = read_results(results_path, labels)
    except RecipeError as exc:
        return fail(exc.lines())
    kinds = {m.motion.kind for m in mans if m.motion is not None}
    quantity = Quantity.BEND_DEG if "bending" in kinds or not kinds else Quantity.EXTENSION_MM
    problems = []
    if res.family != family:
        problems.append(Problem("family", "is not the family in the folder", None, res.family,
                                family))
    for v in res.variants:
        if v.quantity is not None and v.quantity is not quantity:
            problems.append(Problem(f"variants.{v.label}.rows", f"measures {v.quantity.value}"
                                    f", the model predicts {quantity.value}", v.line,
                                    v.quantity.value, quantity.value))
    maximise = Quantity(args.maximise) if args.maximise else res.goal.maximise or quantity
    if maximise is not quantity:
        problems.append(Problem("goal.maximise", "is not what the family's model predicts",
                                None, maximise.value, quantity.value))
    if not any(v.points for v in res.variants):
        problems.append(Problem("variants", "hold no measured row yet", None, None,
                                f"rows of {{pressure_kpa: P, {quantity.value}: value}}"))
    if problems:
        return fail(RecipeError(problems, res.source).lines())
    works = {m.motion.working_pressure_kpa for m in mans if m.motion is not None}
    at_kpa = args.at_kpa or res.goal.at_kpa or (next(iter(works)) if len(works) == 1 else None)
    if at_kpa is None:
        return fail([f"{res.source}: goal.at_kpa: is not given and the variants have no common "
                     "working pressure; allowed: goal.at_kpa in the file or --at-kpa"])
    margin = args.min_burst_margin or res.goal.min_burst_margin or 1.5

    curves = {m.label: _curve(m) for m in mans}
    pairs = [pair_up(v.label, *curves[v.label], [(p.pressure_kpa, p.value) for p in v.points])
             for v in res.variants if v.points]
    try:
        fit = fit_factor(pairs)
    except ValueError as exc:
        print(f"note: no factor fitted: {exc}", file=sys.stderr)
        fit = None
    factor = fit.factor if fit is not None else None
    candidates = []
    for m in mans:
        mv = res.variant(m.label)
        rows = mv.points if mv is not None else ()
        got = interpolate([p.pressure_kpa for p in rows], [p.value for p in rows], at_kpa)
        measured = got is not None
        if got is None and factor is not None:
            pred = interpolate(*curves[m.label], at_kpa)
            got = None if pred is None else pred / factor
        burst = mv.burst_kpa if mv is not None else None
        candidates.append(Candidate(m.label, got, measured,
                                    None if burst is None else burst / at_kpa,
                                    len(mv.defects) if mv is not None else 0,
                                    mv is not None and mv.leak_kpa is not None
                                    and mv.leak_kpa <= at_kpa))
    ranking = rank(candidates, margin)
    best = ranking[0]
    defects = {mv.label: tuple(d.value for d in mv.defects) for mv in res.variants}

    next_name, next_text = "", ""
    next_rule = ("No next generation: no family recipe named (recipe: in the results file, "
                 "or --recipe).")
    recipe_path = args.recipe or (str(Path(res.source).parent / res.recipe)
                                  if res.recipe else None)
    field = None
    if recipe_path is not None:
        try:
            text, label = read_text_file(recipe_path, "recipe")
            field = swept_field(parse_recipe_text(text, label), label)
            value = field.value_of(best.candidate.label)
            if value is None:
                return fail([f"{label}: variants: has no variant {best.candidate.label}; "
                             f"allowed: {', '.join(field.labels)}"])
            stem = Path(recipe_path).stem
            ng = next_generation(text, label, stem, value)
            next_name = f"{stem.split('-generation-')[0]}-generation-{ng.generation}.yaml"
            # Checked where it will be written (a file it names is looked up from there).
            variants_from_text(ng.text, str(Path(args.family_dir) / next_name), ng.name,
                               Path(args.family_dir).resolve())
        except RecipeError as exc:
            return fail(exc.lines())
        next_text = ng.text
        next_rule = (f"Rule: best {best.candidate.label} ({field.path} = {value:g}) +- half "
                     f"the step to its nearest neighbour, five values: "
                     f"{', '.join(f'{x:g}' for x in ng.values)}.")

    unit = "deg" if quantity is Quantity.BEND_DEG else "mm"
    axis = "tip angle, deg" if quantity is Quantity.BEND_DEG else "extension, mm"
    series = []
    for m in mans:
        mv = res.variant(m.label)
        rows = mv.points if mv is not None else ()
        x = field.value_of(m.label) if field is not None else None
        caption = f"{field.path} = {x:g}" if field is not None and x is not None else ""
        series.append(VariantSeries(m.label, caption, *curves[m.label],
                                    tuple(p.pressure_kpa for p in rows),
                                    tuple(p.value for p in rows)))
    png, svg = render_comparison(ComparisonPlot(family, axis, tuple(series), factor))
    relation = ("measured(P) = predicted(P) / f, f = E_effective / E_model (the linear model "
                "theta = k P / E; least squares through the origin, t-interval)")
    text_md = report_markdown(ReportText(
        family, relation, factor, fit.low if fit else None, fit.high if fit else None,
        fit.confidence if fit else 0.95, fit.points if fit else 0,
        sum(p.beyond_model for p in pairs), fit.residual_sd if fit else None,
        fit.per_variant_rms if fit else (),
        f"largest {quantity.value} at {at_kpa:g} kPa with burst margin >= {margin:g}, "
        "then fewest defects", unit,
        tuple(RankRow(r.place, r.candidate.label, r.candidate.score, r.candidate.measured,
                      r.candidate.burst_margin,
                      defects.get(r.candidate.label, ()),
                      r.why_not) for r in ranking),
        next_name or "-", next_rule, CAUTIONS))
    files = {f"{PLOT_STEM}.png": png, f"{PLOT_STEM}.svg": svg, REPORT_NAME: text_md}
    if next_text:
        files[next_name] = next_text.encode()
    try:
        written = write_report(Path(args.family_dir), files)
    except OSError as exc:
        print(f"error: cannot write under {args.family_dir}: {exc.strerror or exc}",
              file=sys.stderr)
        return 1
    if fit is not None:
        hi = "inf" if fit.high == float("inf") else f"{fit.high:.3f}"
        print(f"{family}: modulus factor f = {fit.factor:.3f} ({fit.confidence * 100:g} % "
              f"interval {fit.low:.3f} to {hi}, {fit.points} rows)")
        for lb, rms in fit.per_variant_rms:
            print(f"  {lb}: RMS residual {rms:.2f} {unit}")
    for r in ranking:
        c = r.candidate
        score = "-" if c.score is None else f"{c.score:.1f} {unit}"
        source = "" if c.measured or c.score is None else " (prediction / f)"
        print(f"  {r.place}. {c.label} {score}{source}"
              f"{'; ' + r.why_not if r.why_not else ''}")
    print(next_rule)
    print("wrote " + ", ".join(str(p) for p in written))
    for line in CAUTIONS:
        print(line)
    return 0


def cmd_show(args: argparse.Namespace) -> int:
    """Build one variant in memory and send its parts to the optional viewer."""
    variants, bad = _load([args.recipe], args.variant, folders=False)
    if bad:
        return 2
    from .geometry.viewer import ViewerMissing, send_to_viewer, viewer

    try:
        viewer()  # before the build: say at once when it is missing
    except ViewerMissing as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 1
    _, r = variants[0]
    if r.multi_step:
        print(f"error: {r.source}: show takes one-shot recipes for now", file=sys.stderr)
        return 1
    from .pipeline import build

    try:
        molds = build(r)
    except SoftMoldsError as exc:
        print(f"error: {r.source}: {exc}", file=sys.stderr)
        return 1
    n = send_to_viewer([(p.name, p.role, p.brep) for p in molds.parts])
    print(f"{r.name} {r.label}: sent {n} parts to the viewer")
    return 0


def cmd_schema(args: argparse.Namespace) -> int:
    from .recipe.json_schema import schema_text

    print(schema_text(), end="")
    return 0


def cmd_reference(args: argparse.Namespace) -> int:
    from .recipe.reference import reference_markdown

    if args.update is None:
        print(reference_markdown(), end="")
        return 0
    from pathlib import Path

    from .export.reference import update_reference

    path = Path(args.update)
    try:
        update_reference(path)
    except (OSError, ValueError) as exc:
        print(f"error: cannot update {path}: {exc}", file=sys.stderr)
        return 1
    print(f"updated the recipe reference and the finding advice in {path}")
    return 0


def _positive(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        n = 0
    if n < 1:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of at least 1")
    return n


def make_parser() -> argparse.ArgumentParser:
    ap = argparse.ArgumentParser(
        prog="soft-molds",
        description="Turn a YAML recipe for a cast silicone actuator into a checked set of "
                    "printable molds (two shell parts and a removable core).")
    ap.add_argument("--version", action="version", version=f"soft-molds {__version__}")
    sub = ap.add_subparsers(dest="command", required=True)
    b = sub.add_parser("build", help="build one recipe and write its files",
                       description="Build RECIPE, run the manufacturability checks and write "
                                   "STL, STEP and manifest.json under DIR/<recipe>/<label>/. "
                                   "Nothing is written when a check fails, unless --force.")
    b.add_argument("recipe", metavar="RECIPE", help="path to a recipe YAML file")
    b.add_argument("--variant", metavar="LABEL", help="build only this variant (default: all)")
    b.add_argument("--out", default="out", metavar="DIR", help="output root (default: out)")
    b.add_argument("--force", action="store_true",
                   help="write the files even when a check fails (the manifest records it)")
    b.add_argument("-v", "--verbose", action="store_true",
                   help="also list the checks' notes (figures that need no action)")
    b.set_defaults(func=cmd_build)
    c = sub.add_parser("check", help="build recipes in memory and check every mesh",
                       description="Build each RECIPE in memory (nothing written), check "
                                   "that every part is a closed, consistent volume and run "
                                   "the manufacturability checks. Exit 1 when a mesh or a "
                                   "check fails (with --strict, also on a warning), 2 on bad "
                                   "input.")
    c.add_argument("recipes", nargs="+", metavar="RECIPE",
                   help="recipe YAML files or folders of them (every variant is checked)")
    c.add_argument("--strict", action="store_true", help="fail on warnings too")
    c.add_argument("--jobs", type=_positive, default=1, metavar="N",
                   help="check N variants at a time in worker processes (default 1: in "
                        "this process); the report comes out in the same order")
    c.add_argument("-v", "--verbose", action="store_true",
                   help="also list the checks' notes (figures that need no action)")
    c.set_defaults(func=cmd_check)
    sw = sub.add_parser("sweep", help="build every variant of recipes in worker processes",
                        description="Build, check and write every variant of each RECIPE in a "
                                    "pool of worker processes; skip variants already built "
                                    "from the same parameters (so an interrupted run resumes); "
                                    "write summary.json, summary.csv, a family sheet and a "
                                    "casting card per family. Exit 1 if a variant failed.")
    sw.add_argument("recipes", nargs="+", metavar="RECIPE", help="recipe files or folders")
    sw.add_argument("--jobs", type=_positive, default=max(1, (os.cpu_count() or 1)), metavar="N",
                    help="worker processes (default: the number of CPUs)")
    sw.add_argument("--out", default="out", metavar="DIR", help="output root (default: out)")
    sw.add_argument("--force", action="store_true",
                    help="write variants whose checks fail too (the manifest records it)")
    sw.add_argument("--recycle-after", type=_positive, default=20, metavar="K",
                    help="replace each worker after K variants (default 20)")
    sw.add_argument("--scheduler", metavar="ADDRESS",
                    help="run on a Dask distributed cluster instead (needs the cluster extra)")
    sw.set_defaults(func=cmd_sweep)
    bl = sub.add_parser("blend", help="mix two grades to a target Shore A hardness",
                        description="Ratio of two compatible silicone grades of the shipped "
                                    "table that lands on a target Shore A (interpolated in "
                                    "modulus by Gent's relation; an approximation).")
    bl.add_argument("first", metavar="GRADE", help="e.g. A10")
    bl.add_argument("second", metavar="GRADE", help="e.g. A30")
    bl.add_argument("--shore-a", type=float, required=True, metavar="S",
                    help="target Shore A hardness")
    bl.set_defaults(func=cmd_blend)
    ref = sub.add_parser("reference", help="print every recipe key with unit, default, range",
                         description="Print the recipe reference (Markdown), or rewrite the "
                                     "copies between the reference and the finding-advice "
                                     "markers in FILE.")
    ref.add_argument("--update", metavar="FILE", help="rewrite the reference inside FILE")
    ref.set_defaults(func=cmd_reference)
    rp = sub.add_parser("report", help="compare a cast family's measurements with the "
                        "predictions", description="Read the manifests of the variants under "
                        "FAMILY_DIR and the measured results (default: FAMILY_DIR/"
                        "measured-results.yaml); draw measured against predicted motion, fit "
                        "one modulus factor f (measured = predicted / f), rank the variants "
                        "against the goal and write the next generation's recipe. Exit 2 on "
                        "bad input (nothing written).")
    rp.add_argument("family_dir", metavar="FAMILY_DIR", help="e.g. out/finger-family")
    rp.add_argument("--results", metavar="FILE", help="the measured-results file")
    rp.add_argument("--recipe", metavar="FILE",
                    help="the family recipe (default: recipe: in the results file)")
    rp.add_argument("--at-kpa", type=float, metavar="P", help="goal pressure, kPa")
    rp.add_argument("--min-burst-margin", type=float, metavar="M",
                    help="least burst pressure / goal pressure (default 1.5)")
    rp.add_argument("--maximise", choices=("bend_deg", "extension_mm"),
                    help="the quantity ranked (default: what the model predicts)")
    rp.set_defaults(func=cmd_report)
    sh = sub.add_parser("show", help="send one variant's mold parts to the optional viewer",
                        description="Build one variant of RECIPE in memory (nothing "
                                    "written) and show its parts, coloured by role, in the "
                                    "CAD library's viewer (install the viewer extra).")
    sh.add_argument("recipe", metavar="RECIPE", help="path to a recipe YAML file")
    sh.add_argument("--variant", metavar="LABEL", help="the variant to show (default: the "
                    "first)")
    sh.set_defaults(func=cmd_show)
    sch = sub.add_parser("schema", help="print the JSON Schema of a recipe (for editors)",
                         description="Print the JSON Schema (draft 2020-12) of a recipe file, "
                                     "generated from the same field declarations as the "
                                     "validator; an editor that checks YAML against a schema "
                                     "flags a typo or a value out of range as you type.")
    sch.set_defaults(func=cmd_schema)
    return ap


def main(argv: Sequence[str] | None = None) -> int:
    args = make_parser().parse_args(argv)
    return int(args.func(args))


if __name__ == "__main__":
    sys.exit(main())
