"""One variant of a sweep, as a worker process runs it: build (the pipeline), refuse an
error-level mold set unless forced (the one rule of ``analysis.findings``), write (the
export stage) and report what became of it."""

from __future__ import annotations

import os
import resource
import time
from collections.abc import Callable

from ..analysis.findings import Finding, Severity, counts, refuses_to_write, verdict
from ..errors import SoftMoldsError
from ..export.files import remove_stale_temps
from ..pipeline import build
from ..recipe.model import Recipe
from .outcome import Outcome, Status, motion_figures, report_figures
from .plan import output_dir


def run_variant(recipe: Recipe, out_root: str, force: bool = False) -> Outcome:
    """Build, check and write one variant under ``out_root`` (absolute: workers may run
    in another folder or on another machine). ``family`` and ``changed`` are left for the
    caller, which knows the variant's spec."""
    t = time.perf_counter()
    d = output_dir(out_root, recipe)
    remove_stale_temps(d)  # what a killed earlier run left half-written

    def done(status: Status, reason: str = "", findings: tuple[Finding, ...] | None = None,
             figures: tuple[float | None, float | None] = (None, None),
             motion: tuple[float | None, float | None] = (None, None)) -> Outcome:
        """``findings`` None: nothing was built (no verdict)."""
        n = counts(findings or ())
        return Outcome(recipe.name, recipe.label, "", status, reason=reason,
                       verdict=None if findings is None else verdict(findings),
                       errors=n.errors, warnings=n.warnings,
                       seconds=time.perf_counter() - t, silicone_cm3=figures[0],
                       mix_g=figures[1], bend_deg=motion[0], extension_mm=motion[1],
                       out_dir=str(d), worker_pid=os.getpid(),
                       worker_rss_mb=_rss_mb(), worker_peak_mb=_peak_mb())

    if recipe.multi_step:
        return _run_steps(recipe, out_root, done, force)
    try:
        molds = build(recipe)
    except SoftMoldsError as exc:
        return done(Status.FAILED, str(exc).splitlines()[0])
    findings = tuple(molds.findings)
    if refuses_to_write(verdict(findings), force):
        first = molds.errors[0]
        return done(Status.REFUSED, f"{first.check}: {first.message}", findings)
    try:
        molds.export(out_root)
    except OSError as exc:
        return done(Status.FAILED, f"cannot write: {exc.strerror or exc}")
    # Rounded as the manifest records them, so a rerun that finds the variant up to date
    # reports the same figures.
    return done(Status.BUILT, "", findings, report_figures(
        round(molds.silicone_volume_mm3, 3),
        () if molds.casting is None else (p.grams for p in molds.casting.quantities.portions)),
        motion_figures(molds.manifest().motion))


def _run_steps(recipe: Recipe, out_root: str, done: Callable[..., Outcome],
               force: bool) -> Outcome:
    """A variant of a multi-step process: every step built, checked (the process's own
    checks, e.g. :mod:`soft_molds.analysis.layered_checks`) and written unless an error
    refuses it."""
    from ..export.manifest import motion_record
    from ..export.overmold import write_steps
    from ..pipeline import build_steps

    try:
        m = build_steps(recipe)
    except SoftMoldsError as exc:
        return done(Status.FAILED, str(exc).splitlines()[0])
    findings = tuple(m.findings)
    if refuses_to_write(verdict(findings), force):
        first = next(f for f in findings if f.severity is Severity.ERROR)
        return done(Status.REFUSED, f"{first.check}: {first.message}", findings)
    try:
        write_steps(m, out_root)
    except OSError as exc:
        return done(Status.FAILED, f"cannot write: {exc.strerror or exc}")
    # Every portion to weigh, a core mold's wax or alloy too (as the stepped manifest's
    # mixed_grams, which an up-to-date rerun reports).
    grams = [p.grams for s in m.steps for p in s.pour.portions]
    return done(Status.BUILT, "", findings,
                report_figures(round(m.silicone_volume_mm3, 3), grams),
                motion_figures(None if m.motion is None else motion_record(m.motion)))


def _rss_mb() -> float:
    """Current resident set size of this process (MB; 0 where /proc is missing)."""
    try:
        with open("/proc/self/statm") as f:
            pages = int(f.read().split()[1])
    except (OSError, ValueError, IndexError):
        return 0.0
    return pages * os.sysconf("SC_PAGE_SIZE") / 2 ** 20


def _peak_mb() -> float:
    """Peak resident set size of this process so far (MB; Linux reports KiB)."""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
