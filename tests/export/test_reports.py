"""The morning report's summary rows and family sheet, from written variants (demo
scenario: the seedling finger)."""

from __future__ import annotations

import csv
import io
import json

import pytest

from soft_molds.export.reports import write_reports
from soft_molds.export.writer import write_mold_set
from soft_molds.sweep.outcome import Outcome, Status


def Row(recipe: str, label: str, family: str, status: str, out_dir: str, **kw) -> Outcome:
    """The sweep's own outcome of one variant (what the report stage is given)."""
    return Outcome(recipe, label, family, Status(status), out_dir=out_dir, **kw)


def test_summary_fills_family_names_warnings_and_the_lowest_margin(finger, tmp_path):
    folder = write_mold_set(finger, tmp_path).directory
    man = finger.manifest()
    rows = [Row("seedling-finger", "A", "", "built", str(folder), verdict=man.verdict,
                changed={"voids[0].height_mm": 8}, description=finger.recipe.description),
            Row("seedling-finger", "B", "", "failed", str(tmp_path / "nowhere"),
                reason="kernel: broke", changed={"voids[0].height_mm": 9})]
    write_reports(rows, tmp_path)
    table = list(csv.DictReader(io.StringIO((tmp_path / "summary.csv").read_text())))
    # one family: family 1 of the documented numbering, for every variant
    assert [r["family"] for r in table] == ["F1", "F1"]
    warned = list(dict.fromkeys(f.check for f in man.checks if f.severity == "warning"))
    assert table[0]["warning_checks"] == "; ".join(warned)
    # margin = limit pressure / working pressure of the weakest wall (manifest figures)
    work = man.pressure.working_pressure_kpa
    lowest = min(w.limit_kpa / work for w in man.pressure.walls if w.limit_kpa)
    assert float(table[0]["min_pressure_margin"]) == pytest.approx(lowest, abs=2e-3)
    assert table[1]["warning_checks"] == table[1]["min_pressure_margin"] == ""
    back = json.loads((tmp_path / "summary.json").read_text())["variants"]
    assert back[0]["warning_checks"] == warned and back[1]["family"] == "F1"


def test_family_sheet_words_the_changes_and_names_description_and_hash(finger, tmp_path):
    folder = write_mold_set(finger, tmp_path).directory
    rows = [Row("seedling-finger", "A", "", "built", str(folder),
                changed={"voids[0].height_mm": 8}, description=finger.recipe.description),
            Row("seedling-finger", "B", "", "refused", str(tmp_path / "nowhere"),
                reason="trapped-air: a bubble", changed={"voids[0].height_mm": 9.5})]
    write_reports(rows, tmp_path)
    svg = (tmp_path / "seedling-finger" / "family-sheet.svg").read_text()
    assert "chamber height 8 mm" in svg and "chamber height 9.5 mm" in svg
    assert "voids[0]" not in svg
    assert finger.recipe.description in svg
    assert finger.manifest().source_params_sha256[:12] in svg
    assert ">refused: trapped-air<" in svg   # the check named first in the reason



