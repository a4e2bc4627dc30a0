"""The morning report of a sweep: ``summary.json`` and ``summary.csv`` in the output root
(one row per variant), and per family, in the recipe's folder, a sheet
(``family-sheet[-F<n>].png`` / ``.svg``) and a casting card (``casting-card[-F<n>].md``
/ ``.html``) made from the manifests of the variants that were built or are up to date.

A row is anything with the attributes of :class:`ReportedVariant` (the sweep's outcome).
"""

from __future__ import annotations

import csv
import io
import os
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Protocol

from ..analysis.findings import Verdict
from ..version import __version__
from .card import card_files
from .files import json_bytes, write_atomic
from .manifest import Manifest, ManifestError, read_manifest
from .sheet import (
    SheetData,
    SheetVariant,
    manifest_row,
    motion_curve,
    render_sheet,
    unbuilt_row,
)


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
    def out_dir(self) -> str: ...
    @property
    def ok(self) -> bool: ...


SUMMARY_FIELDS = ("recipe", "label", "family", "status", "verdict", "errors", "warnings",
                  "silicone_cm3", "mix_g", "bend_deg", "extension_mm", "seconds", "changed",
                  "reason", "out_dir")


def summary_row(v: ReportedVariant) -> dict[str, object]:
    """The row of ``summary.json`` (keys in :data:`SUMMARY_FIELDS` order)."""
    return {"recipe": v.recipe, "label": v.label, "family": v.family, "status": str(v.status),
            "verdict": "" if v.verdict is None else str(v.verdict), "errors": v.errors,
            "warnings": v.warnings, "silicone_cm3": v.silicone_cm3, "mix_g": v.mix_g,
            "bend_deg": v.bend_deg, "extension_mm": v.extension_mm,
            "seconds": round(v.seconds, 3), "changed": dict(v.changed), "reason": v.reason,
            "out_dir": v.out_dir}


def summary_csv(variants: Sequence[ReportedVariant]) -> bytes:
    """The rows of :func:`summary_row` as CSV, ``changed`` as ``path=value; ...``."""
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=SUMMARY_FIELDS, lineterminator="\n")
    w.writeheader()
    for v in variants:
        w.writerow({**summary_row(v),
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
    rows = [summary_row(v) for v in variants]
    written = []
    for name, data in (("summary.json", json_bytes({"tool_version": __version__,
                                                    "variants": rows})),
                       ("summary.csv", summary_csv(variants))):
        write_atomic(root / name, data)
        written.append(root / name)
    for (recipe, fam), members in families(variants).items():
        written += _family_files(root / recipe, recipe, fam, members)
    return written


def _family_files(folder: Path, recipe: str, fam: str, members: Sequence[ReportedVariant]
                  ) -> list[Path]:
    suffix = f"-{fam}" if fam else ""
    mans, rows = [], []
    for v in members:
        man = _manifest(Path(v.out_dir)) if v.ok else None
        rows.append(_sheet_row(v, man))
        if man is not None:
            mans.append(man)
    title = f"{recipe}" + (f" family {fam}" if fam else "")
    written = []
    curves = tuple(c for c in (motion_curve(m) for m in mans) if c is not None)
    works = {m.motion.working_pressure_kpa for m in mans if m.motion is not None}
    png, svg = render_sheet(SheetData(title, f"soft-molds {__version__}", tuple(rows), curves,
                                      works.pop() if len(works) == 1 else None))
    for ext, data in (("png", png), ("svg", svg)):
        p = folder / f"family-sheet{suffix}.{ext}"
        write_atomic(p, data)
        written.append(p)
    if mans:
        for name, data in card_files(mans, title, f"casting-card{suffix}").items():
            write_atomic(folder / name, data)
            written.append(folder / name)
    return written


def _manifest(folder: Path) -> Manifest | None:
    """The manifest in ``folder``; None when it is missing or unreadable."""
    try:
        return read_manifest(folder)
    except ManifestError:
        return None


def _sheet_row(v: ReportedVariant, man: Manifest | None) -> SheetVariant:
    """One variant's row of the family sheet: its key figures and a section of its cast
    part, or its status and reason when there is no manifest to show."""
    changed = tuple((k, f"{x:g}" if isinstance(x, float) else str(x))
                    for k, x in v.changed.items())
    if man is None:
        return unbuilt_row(v.label, changed, str(v.status), v.reason)
    return manifest_row(man, Path(v.out_dir), changed)
