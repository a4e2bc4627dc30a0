"""Up to date: a variant an earlier run finished is not built again.

A variant is up to date when its ``manifest.json`` records the parameter hash of the
recipe as given and this tool version, and every file it lists is present with the
recorded SHA-256. A killed run leaves either no manifest (written last) or files that no
longer match, so such a variant is built again.
"""

from __future__ import annotations

import hashlib
import json
import os
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

from ..analysis.findings import Finding, Severity, Verdict, counts, refuses_to_write
from ..recipe.model import Recipe
from ..version import __version__
from .outcome import Outcome, Status, report_figures
from .plan import Task, output_dir


@dataclass(frozen=True)
class PortionFacts:
    g: float


@dataclass(frozen=True)
class CastingFacts:
    portions: tuple[PortionFacts, ...]


@dataclass(frozen=True)
class ManifestFacts:
    """What the sweep reads from a manifest, under the attribute names of
    ``export.manifest.Manifest``."""

    source_params_sha256: str
    tool_version: str
    files: Mapping[str, str]
    verdict: Verdict
    checks: tuple[Finding, ...]
    silicone_volume_mm3: float
    casting: CastingFacts | None


def read_manifest_facts(path: Path) -> ManifestFacts | None:
    """The manifest at ``path``; None when it is missing or malformed."""
    # TODO(merge): read_manifest -- return read_manifest(path), None on ManifestError.
    try:
        m = json.loads(path.read_text())
        c = m["casting"]
        return ManifestFacts(
            m["source_params_sha256"], m["tool_version"], dict(m["files"]),
            Verdict(m["verdict"]),
            tuple(Finding(f["check"], f["severity"], f["part"], f["value"], f["limit"],
                          None if f["where_mm"] is None else tuple(f["where_mm"]),
                          f["message"]) for f in m["checks"]),
            float(m["silicone_volume_mm3"]),
            None if c is None else CastingFacts(tuple(PortionFacts(float(p["g"]))
                                                      for p in c["portions"])))
    except (OSError, ValueError, KeyError, TypeError):
        return None


def file_digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def up_to_date(root: str | os.PathLike[str], r: Recipe) -> ManifestFacts | None:
    """The manifest of a finished earlier build of ``r`` under ``root``, if it is complete
    and was built from the same parameters by the same version; else None."""
    d = output_dir(root, r)
    man = read_manifest_facts(d / "manifest.json")
    # The hash of the recipe as given: with parting: auto the build fills in the plane, so
    # the manifest's own params hash differs from the task's.
    if (man is None or man.source_params_sha256 != r.params_sha256()
            or man.tool_version != __version__ or not man.files):
        return None
    for name, digest in man.files.items():
        try:
            if file_digest((d / name).read_bytes()) != digest:
                return None
        except OSError:
            return None
    return man


def earlier_outcome(t: Task, root: str | os.PathLike[str], force: bool) -> Outcome | None:
    """The outcome of a task an earlier run finished (up to date; or refused, when that
    run forced an error-level variant and this one does not), else None: build it."""
    man = up_to_date(root, t.recipe)
    if man is None:
        return None
    n = counts(man.checks)
    refused = refuses_to_write(man.verdict, force)
    first = next((f for f in man.checks if f.severity is Severity.ERROR), None)
    reason = (f"{first.check}: {first.message} (written earlier with --force)"
              if refused and first is not None else "")
    vol, mix = report_figures(man.silicone_volume_mm3,
                              () if man.casting is None else (p.g for p in man.casting.portions))
    return Outcome(t.recipe.name, t.recipe.label, t.spec.family,
                   Status.REFUSED if refused else Status.UP_TO_DATE, reason=reason,
                   verdict=man.verdict, errors=n.errors, warnings=n.warnings,
                   silicone_cm3=vol, mix_g=mix, out_dir=str(output_dir(root, t.recipe)))
