"""Up to date: a variant an earlier run finished is not built again.

A variant is up to date when its ``manifest.json`` records the parameter hash of the
recipe as given and this tool version, and every file it lists is present with the
recorded SHA-256. A killed run leaves either no manifest (written last) or files that no
longer match, so such a variant is built again.
"""

from __future__ import annotations

import hashlib
import os
from collections.abc import Mapping, Sequence
from pathlib import Path

from ..analysis.findings import Finding, Severity, counts, refuses_to_write
from ..export.manifest import Manifest, ManifestError, read_manifest
from ..export.steps_manifest import SteppedManifest, read_stepped_manifest
from ..recipe.model import Recipe
from ..version import __version__
from .outcome import Outcome, Status, motion_figures, report_figures
from .plan import Task, output_dir


def read_manifest_facts(path: Path) -> Manifest | None:
    """The manifest in folder ``path`` (typed); None when it is missing, malformed or from
    another tool version."""
    try:
        return read_manifest(path)
    except ManifestError:
        return None


def file_digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def _files_intact(d: Path, files: Mapping[str, str]) -> bool:
    """Every listed file is present with its recorded SHA-256."""
    for name, digest in files.items():
        try:
            if file_digest((d / name).read_bytes()) != digest:
                return False
        except OSError:
            return False
    return bool(files)


def up_to_date(root: str | os.PathLike[str], r: Recipe) -> Manifest | None:
    """The manifest of a finished earlier one-shot build of ``r`` under ``root``, if it is
    complete and was built from the same parameters by the same version; else None."""
    d = output_dir(root, r)
    man = read_manifest_facts(d)
    # The hash of the recipe as given: with parting: auto the build fills in the plane, so
    # the manifest's own params hash differs from the task's.
    if (man is None or man.source_params_sha256 != r.params_sha256()
            or man.tool_version != __version__ or not _files_intact(d, man.files)):
        return None
    return man


def stepped_up_to_date(root: str | os.PathLike[str], r: Recipe) -> SteppedManifest | None:
    """As :func:`up_to_date`, for a recipe cast in several steps (its stepped manifest)."""
    d = output_dir(root, r)
    try:
        man = read_stepped_manifest(d)
    except ManifestError:
        return None
    if man.params_sha256 != r.params_sha256() or not _files_intact(d, man.files):
        return None
    return man


def _refusal(checks: Sequence[Finding], refused: bool) -> str:
    first = next((f for f in checks if f.severity is Severity.ERROR), None)
    return (f"{first.check}: {first.message} (written earlier with --force)"
            if refused and first is not None else "")


def earlier_outcome(t: Task, root: str | os.PathLike[str], force: bool) -> Outcome | None:
    """The outcome of a task an earlier run finished (up to date; or refused, when that
    run forced an error-level variant and this one does not), else None: build it."""
    if t.recipe.multi_step:
        return _earlier_stepped(t, root, force)
    man = up_to_date(root, t.recipe)
    if man is None:
        return None
    n = counts(man.checks)
    refused = refuses_to_write(man.verdict, force)
    vol, mix = report_figures(man.silicone_volume_mm3,
                              () if man.casting is None else (p.g for p in man.casting.portions))
    bend, ext = motion_figures(man.motion)
    return Outcome(t.recipe.name, t.recipe.label, t.spec.family,
                   Status.REFUSED if refused else Status.UP_TO_DATE,
                   reason=_refusal(man.checks, refused),
                   verdict=man.verdict, errors=n.errors, warnings=n.warnings,
                   silicone_cm3=vol, mix_g=mix, bend_deg=bend, extension_mm=ext,
                   out_dir=str(output_dir(root, t.recipe)))


def _earlier_stepped(t: Task, root: str | os.PathLike[str], force: bool) -> Outcome | None:
    man = stepped_up_to_date(root, t.recipe)
    if man is None:
        return None
    n = counts(man.checks)
    refused = refuses_to_write(man.verdict, force)
    vol, mix = report_figures(round(man.actuator_volume_mm3, 3), man.mixed_grams)
    bend, ext = motion_figures(man.motion)
    return Outcome(t.recipe.name, t.recipe.label, t.spec.family,
                   Status.REFUSED if refused else Status.UP_TO_DATE,
                   reason=_refusal(man.checks, refused),
                   verdict=man.verdict, errors=n.errors, warnings=n.warnings,
                   silicone_cm3=vol, mix_g=mix, bend_deg=bend, extension_mm=ext,
                   out_dir=str(output_dir(root, t.recipe)))
