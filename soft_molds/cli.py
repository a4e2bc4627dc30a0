"""Command line: ``soft-molds build`` and ``soft-molds check``.

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

from .analysis.findings import Finding, Severity, counts
from .errors import RecipeError, SoftMoldsError
from .units import mm3_to_cm3
from .version import __version__

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
        if r.process.layered:
            status = max(status, _build_layered(r, args.out))
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


def _build_layered(r, out: str) -> int:
    """Build and write a layered recipe: both steps' parts and the pours in order."""
    from .export.layered import write_layered
    from .pipeline import build_layered

    t = time.perf_counter()
    try:
        m = build_layered(r)
    except SoftMoldsError as exc:
        print(f"error: {r.source}: {exc}", file=sys.stderr)
        return 1
    print(f"{r.name} {r.label}: built in {time.perf_counter() - t:.1f} s (layered, "
          f"{len(m.steps)} pours)")
    for s in m.steps:
        print(f"  pour {s.index} ({s.name}): {mm3_to_cm3(s.pour.cast_mm3):.2f} cm3, mix "
              f"{s.pour.mixed_g:.1f} g")
        for p in s.parts:
            print(_fmt_part(p))
    try:
        paths = write_layered(m, out)
    except OSError as exc:
        print(f"error: cannot write under {out}: {exc.strerror or exc}", file=sys.stderr)
        return 1
    print(f"  wrote {len(paths)} files to {paths[-1].parent}")
    return 0


def cmd_check(args: argparse.Namespace) -> int:
    variants, bad = _load(args.recipes)
    if bad:
        return 2
    from .pipeline import build, build_layered

    failed = []
    files: dict[str, bool] = {}  # recipe file -> every variant passed
    for _, r in variants:
        files.setdefault(r.source, True)
        if r.process.layered:
            # Layered steps are checked as closed parts; the manufacturability checks of
            # the one-shot review do not run on trays yet.
            try:
                lm = build_layered(r)
            except SoftMoldsError as exc:
                failed.append(f"{r.source} {r.label}: {exc}".splitlines()[0])
                files[r.source] = False
                print(f"FAIL {r.source} {r.label}: {exc}")
                continue
            print(f"ok   {r.source}: {r.name} {r.label}, {len(lm.steps)} pours, "
                  f"{sum(len(s.parts) for s in lm.steps)} parts closed and consistent")
            for st in lm.steps:
                for p in st.parts:
                    print(_fmt_part(p))
            continue
        try:
            molds = build(r)
        except SoftMoldsError as exc:
            failed.append(f"{r.source} {r.label}: {exc}".splitlines()[0])
            files[r.source] = False
            print(f"FAIL {r.source} {r.label}: {exc}")
            continue
        bad_one = bool(molds.errors) or (args.strict and bool(molds.warnings))
        verdict = "FAIL" if bad_one else "ok  "
        print(f"{verdict} {r.source}: {r.name} {r.label}, {len(molds.parts)} parts closed and "
              f"consistent")
        for p in molds.parts:
            print(_fmt_part(p))
        for line in _findings_table(molds.findings, show_info=args.verbose):
            print(line)
        if bad_one:
            worst = (molds.errors or molds.warnings)[0]
            failed.append(f"{r.source} {r.label}: {worst.check}: {worst.message}")
            files[r.source] = False
    print(check_tally(len(variants) - len(failed), len(variants), sum(files.values()),
                      len(files), args.strict))
    for line in failed:
        print(f"  failed: {line}")
    return 1 if failed else 0


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
        outcomes, interrupted = run_sweep(tasks, args.out, jobs=args.jobs, force=args.force,
                                          recycle_after=args.recycle_after,
                                          progress=Progress(len(tasks)),
                                          scheduler=args.scheduler)
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
    print(f"{'recipe':<18} {'label':<6} {'status':<11} {'checks':<8} {'silicone':>9} "
          f"{'mix g':>7} {'motion':>9} {'s':>6}  changed / reason")
    for o in outcomes:
        vol = "-" if o.silicone_cm3 is None else f"{o.silicone_cm3:.2f} cm3"
        mix = "-" if o.mix_g is None else f"{o.mix_g:g}"
        move = (f"{o.bend_deg:.1f} deg" if o.bend_deg is not None else
                f"{o.extension_mm:.2f} mm" if o.extension_mm is not None else "-")
        note = o.reason or ", ".join(f"{k}={v}" for k, v in o.changed.items())
        print(f"{o.recipe:<18} {o.label:<6} {o.status:<11} {o.verdict or '-':<8} {vol:>9} "
              f"{mix:>7} {move:>9} {o.seconds:>6.1f}  {note}")
    bad = [o for o in outcomes if not o.ok]
    print(f"{len(outcomes) - len(bad)} of {len(tasks)} variants built or up to date; report: "
          + ", ".join(str(p) for p in written[:2]))
    for line in CAUTIONS:
        print(line)
    if interrupted:
        print("interrupted: run the same command again to finish", file=sys.stderr)
        return 130
    return 1 if bad or len(outcomes) < len(tasks) else 0


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
