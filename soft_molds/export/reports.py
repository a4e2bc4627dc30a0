"""The morning report of a sweep: ``summary.json`` and ``summary.csv`` in the output root
(one row per variant), and per family, in the recipe's folder, a sheet
(``family-sheet[-F<n>].png`` / ``.svg``), a casting card (``casting-card[-F<n>].md``
/ ``.html``) and the family's print plates (``family-plate[-F<n>]-<k>.3mf`` / ``.png``:
every variant's printed parts, each variant on one bed where it fits, see
:mod:`soft_molds.export.plates`) made from the manifests and STL files of the variants
that were built or are up to date.

A row is anything with the attributes of :class:`ReportedVariant` (the sweep's outcome).
"""

from __future__ import annotations

import csv
import io
import os
import re
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Protocol

from ..analysis.findings import Severity, Verdict
from ..meshdata import TriMesh
from ..version import __version__
from .assembly import read_pictures
from .card import card_files
from .fieldwords import field_words
from .files import json_bytes, write_atomic
from .manifest import Manifest, ManifestError, read_manifest
from .plates import family_plate_files, indexed_mesh
from .results import template_bytes, write_template
from .sheet import (
    SheetData,
    SheetVariant,
    manifest_row,
    motion_curve,
    render_sheet,
    stepped_row,
    unbuilt_row,
)
from .steps_manifest import SteppedManifest, read_stepped_manifest
from .stl import read_binary_stl
from .typedjson import ShapeError


class ReportedVariant(Protocol):
    """One variant as the report shows it. ``status``: built, up to date, refused or
    failed; ``verdict`` None when nothing was built; ``silicone_cm3`` and ``mix_g``
    (grams weighed out in all) None unless built or up to date; ``bend_deg`` and
    ``extension_mm``: the predicted tip angle (a bender) or extension (an extender) at the
    working pressure, None otherwise; ``ok``: built or up to
    date; ``out_dir``: its folder (absolute)."""

    @property
    def recipe(self) -> str: ...
    @property
    def label(self) -> str: ...
    @property
    def family(self) -> str: ...
    @property
    def status(self) -> str: ...
    @property
    def reason(self) -> str: ...
    @property
    def verdict(self) -> Verdict | None: ...
    @property
    def errors(self) -> int: ...
    @property
    def warnings(self) -> int: ...
    @property
    def seconds(self) -> float: ...
    @property
    def silicone_cm3(self) -> float | None: ...
    @property
    def mix_g(self) -> float | None: ...
    @property
    def bend_deg(self) -> float | None: ...
    @property
    def extension_mm(self) -> float | None: ...
    @property
    def changed(self) -> Mapping[str, object]: ...
    @property
    def description(self) -> str: ...
    @property
    def out_dir(self) -> str: ...
    @property
    def ok(self) -> bool: ...


SUMMARY_FIELDS = ("recipe", "label", "family", "status", "verdict", "errors", "warnings",
                  "warning_checks", "min_pressure_margin", "silicone_cm3", "mix_g", "bend_deg",
                  "extension_mm", "seconds", "changed", "reason", "out_dir")

#: The family of a recipe that makes one: family 1 of the documented numbering (its sheet
#: and card have no suffix).
ONE_FAMILY = "F1"


def summary_row(v: ReportedVariant, man: Manifest | None = None) -> dict[str, object]:
    """The row of ``summary.json`` (keys in :data:`SUMMARY_FIELDS` order). ``man``: the
    variant's manifest, when it was built or is up to date; it gives ``warning_checks``
    (the checks that warned, in review order) and ``min_pressure_margin`` (the lowest
    margin of any wall over the working pressure; None without one)."""
    warned: list[str] = []
    margin = None
    if man is not None:
        warned = list(dict.fromkeys(f.check for f in man.checks
                                    if f.severity is Severity.WARNING))
        margins = [w.margin for w in man.pressure.walls if w.margin is not None]
        margin = min(margins) if margins else None
    return {"recipe": v.recipe, "label": v.label, "family": v.family or ONE_FAMILY,
            "status": str(v.status), "verdict": "" if v.verdict is None else str(v.verdict),
            "errors": v.errors, "warnings": v.warnings, "warning_checks": warned,
            "min_pressure_margin": margin, "silicone_cm3": v.silicone_cm3, "mix_g": v.mix_g,
            "bend_deg": v.bend_deg, "extension_mm": v.extension_mm,
            "seconds": round(v.seconds, 3), "changed": dict(v.changed), "reason": v.reason,
            "out_dir": v.out_dir}


def summary_csv(variants: Sequence[ReportedVariant],
                manifests: Sequence[Manifest | None] | None = None) -> bytes:
    """The rows of :func:`summary_row` as CSV (``manifests``: one per variant, or None),
    ``changed`` as ``path=value; ...``, ``warning_checks`` joined by "; " and an
    empty cell for no margin."""
    mans = list(manifests) if manifests is not None else [None] * len(variants)
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=SUMMARY_FIELDS, lineterminator="\n")
    w.writeheader()
    for v, man in zip(variants, mans):
        row = summary_row(v, man)
        margin, warned = row["min_pressure_margin"], row["warning_checks"]
        assert isinstance(warned, list)
        w.writerow({**row, "warning_checks": "; ".join(warned),
                    "min_pressure_margin": "" if margin is None else margin,
                    "changed": "; ".join(f"{k}={x}" for k, x in v.changed.items())})
    return buf.getvalue().encode()


def families(variants: Sequence[ReportedVariant]
             ) -> dict[tuple[str, str], list[ReportedVariant]]:
    """The variants grouped by (recipe, family), in first-seen order."""
    out: dict[tuple[str, str], list[ReportedVariant]] = {}
    for v in variants:
        out.setdefault((v.recipe, v.family), []).append(v)
    return out


def write_reports(variants: Sequence[ReportedVariant], out_root: str | os.PathLike[str]
                  ) -> list[Path]:
    """Write summary.json, summary.csv and, per family, its sheet and casting card;
    returns the paths written (the two summaries first)."""
    root = Path(out_root)
    mans = [_manifest(Path(v.out_dir)) if v.ok else None for v in variants]
    rows = [summary_row(v, m) for v, m in zip(variants, mans)]
    written = []
    for name, data in (("summary.json", json_bytes({"tool_version": __version__,
                                                    "variants": rows})),
                       ("summary.csv", summary_csv(variants, mans))):
        write_atomic(root / name, data)
        written.append(root / name)
    by_dir = {v.out_dir: m for v, m in zip(variants, mans)}
    for (recipe, fam), members in families(variants).items():
        written += _family_files(root / recipe, recipe, fam, members,
                                 [by_dir[v.out_dir] for v in members])
    return written


def _family_files(folder: Path, recipe: str, fam: str, members: Sequence[ReportedVariant],
                  manifests: Sequence[Manifest | None]) -> list[Path]:
    suffix = f"-{fam}" if fam else ""
    mans = [m for m in manifests if m is not None]
    # Words for the changed fields need the kinds the recipe names; a variant that was not
    # built borrows them from a sibling (a variant changes values, not kinds).
    params = mans[0].params.data if mans else {}
    rows = [_sheet_row(v, m, params) for v, m in zip(members, manifests)]
    printed = []
    for v, man in zip(members, manifests):
        meshes = _printed_meshes(man, Path(v.out_dir)) if man is not None else None
        if man is not None and meshes is not None:
            printed.append((man, meshes))
    title = f"{recipe}" + (f" family {fam}" if fam else "")
    written = []
    stepped = [_stepped_manifest(Path(v.out_dir)) for v, m in zip(members, manifests)
               if m is None and v.ok]
    curves = tuple(c for c in (motion_curve(m) for m in (*mans, *stepped) if m is not None)
                   if c is not None)
    works = {m.motion.working_pressure_kpa for m in (*mans, *stepped)
             if m is not None and m.motion is not None}
    # No date on the sheet: the same recipe and version give the same bytes; the version
    # here and the recipe hash on each row name the build instead.
    png, svg = render_sheet(SheetData(title, f"soft-molds {__version__}", tuple(rows),
                                      members[0].description, curves,
                                      next(iter(works)) if len(works) == 1 else None))
    for ext, data in (("png", png), ("svg", svg)):
        p = folder / f"family-sheet{suffix}.{ext}"
        write_atomic(p, data)
        written.append(p)
    if mans:
        pictures = {m.label: read_pictures(Path(v.out_dir), _link(folder, Path(v.out_dir)))
                    for v, m in zip(members, manifests) if m is not None}
        for name, data in card_files(mans, title, f"casting-card{suffix}",
                                     pictures).items():
            write_atomic(folder / name, data)
            written.append(folder / name)
    # The lab's results file for this family, only where none is yet (measurements are
    # never overwritten; a later sweep of the same family leaves the filled file alone).
    bending = any(m.motion is not None and m.motion.kind == "bending" for m in mans)
    work = sorted(w for w in works if w is not None)
    template = template_bytes(recipe, [(v.label, v.changed) for v in members],
                              "bend_deg" if bending or not mans else "extension_mm",
                              work[0] if len(work) == 1 else None)
    made = write_template(folder, fam, template)
    if made is not None:
        written.append(made)
    stem = f"family-plate{suffix}"
    _, plates = family_plate_files(printed, title, stem)
    for name, data in plates.items():
        write_atomic(folder / name, data)
        written.append(folder / name)
    _remove_stale_plates(folder, stem, set(plates))
    return written


def _link(folder: Path, target: Path) -> str:
    """Relative link prefix from ``folder`` to ``target`` (forward slashes, ends in /)."""
    rel = os.path.relpath(target, folder).replace(os.sep, "/")
    return "" if rel == "." else rel + "/"


def _remove_stale_plates(folder: Path, stem: str, keep: set[str]) -> None:
    """Remove this family's plate files that an earlier report wrote and this one did not
    (the family now fits fewer beds): a stale plate would be printed twice."""
    own = re.compile(re.escape(stem) + r"-\d+\.(3mf|png)")
    for path in sorted(folder.glob(f"{stem}-*")):
        if own.fullmatch(path.name) and path.name not in keep:
            path.unlink(missing_ok=True)


def _printed_meshes(man: Manifest, folder: Path) -> dict[str, TriMesh] | None:
    """The printed parts' meshes of one variant, read from its STL files; None when one is
    missing or damaged, or the manifest names no bed (the variant is left off the plates)."""
    try:
        _ = man.params.bed_mm  # raises ShapeError when the echo names no bed
        return {rec.name: indexed_mesh(read_binary_stl(folder / rec.file))
                for rec in man.parts if rec.printable}
    except (OSError, ValueError, ShapeError):
        return None


def _manifest(folder: Path) -> Manifest | None:
    """The manifest in ``folder``; None when it is missing or unreadable."""
    try:
        return read_manifest(folder)
    except ManifestError:
        return None


def _stepped_manifest(folder: Path) -> SteppedManifest | None:
    """The stepped manifest in ``folder`` (a variant cast in several steps); None when
    there is none or it is unreadable."""
    try:
        return read_stepped_manifest(folder)
    except ManifestError:
        return None


def _sheet_row(v: ReportedVariant, man: Manifest | None,
               params: Mapping[str, object]) -> SheetVariant:
    """One variant's row of the family sheet: its key figures and a section of its cast
    part, or its status and reason when there is no manifest to show; the changed fields
    in words (``params``: a resolved recipe of the family, for the kinds)."""
    own = man.params.data if man is not None else params
    changed = tuple(field_words(k, x, own) for k, x in v.changed.items())
    if man is None:
        stepped = _stepped_manifest(Path(v.out_dir)) if v.ok else None
        if stepped is not None:
            return stepped_row(stepped, Path(v.out_dir), changed)
        return unbuilt_row(v.label, changed, str(v.status), v.reason)
    return manifest_row(man, Path(v.out_dir), changed)
