"""``soft-molds report`` on a built family folder (two variants of the bundled finger family,
built once and shared): the plot and the report are written, the factor is fitted, the
next generation's recipe loads; bad input is one line per problem, exit 2, nothing written,
and no CAD work.

Outside references: the fitted factor is checked against numpy.linalg.lstsq on the same
pairs; line numbers are those of the documents written here, known by construction.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import numpy as np
import pytest
from conftest import built_variant

from soft_molds import load_variants
from soft_molds.cli import main
from soft_molds.export.manifest import manifest_bytes, read_manifest

ROOT = Path(__file__).resolve().parents[2]
FAMILY = ROOT / "recipes" / "finger-family.yaml"
LABELS = ("A", "C")

RESULTS = f"""\
# invented demo figures
family: finger-family
recipe: {FAMILY}
goal: {{maximise: bend_deg, at_kpa: 60, min_burst_margin: 1.5}}
variants:
  A:
    rows:
      - {{pressure_kpa: 0, bend_deg: 0}}
      - {{pressure_kpa: 30, bend_deg: 4.5}}
      - {{pressure_kpa: 60, bend_deg: 8.5}}
    burst_kpa: null
  C:
    rows:
      - {{pressure_kpa: 30, bend_deg: 7.5}}
      - {{pressure_kpa: 60, bend_deg: 18}}
    burst_kpa: 135
    defects: [bubbles]
"""


@pytest.fixture(scope="module")
def family_dir(tmp_path_factory) -> Path:
    """A family folder holding the manifests of variants A and C (manifest.json only: the
    report reads nothing else)."""
    root = tmp_path_factory.mktemp("report") / "finger-family"
    for label in LABELS:
        (root / label).mkdir(parents=True)
        man = built_variant("finger-family", label).manifest()
        (root / label / "manifest.json").write_bytes(manifest_bytes(man))
    return root


@pytest.fixture
def family(family_dir, tmp_path) -> Path:
    """A fresh copy of the family folder per test (the report writes into it)."""
    return Path(shutil.copytree(family_dir, tmp_path / "finger-family"))


def test_report_plots_fits_ranks_and_writes_a_next_generation_that_loads(family, capsys):
    (family / "measured-results.yaml").write_text(RESULTS)
    assert main(["report", str(family)]) == 0
    out = capsys.readouterr().out
    for name in ("results-plot.png", "results-plot.svg", "results-report.md"):
        assert (family / name).stat().st_size > 1000, name
    # the factor against numpy.linalg.lstsq on the predictions at the measured pressures
    pred, meas = [], []
    for label, rows in (("A", [(30, 4.5), (60, 8.5)]), ("C", [(30, 7.5), (60, 18.0)])):
        mo = read_manifest(family / label).motion
        assert mo is not None
        kpa = [p.pressure_kpa for p in mo.points]
        deg = [p.angle_deg for p in mo.points]
        pred += [float(np.interp(p, kpa, deg)) for p, _ in rows]
        meas += [m for _, m in rows]
    (g,), *_ = np.linalg.lstsq(np.array(pred)[:, None], np.array(meas), rcond=None)
    assert f"modulus factor f = {1 / g:.3f}" in out
    # C bends more at 60 kPa and holds 135 / 60 = 2.25 >= 1.5: it ranks first
    assert "  1. C 18.0 deg" in out and "  2. A 8.5 deg" in out
    nxt = family / "finger-family-generation-2.yaml"
    pairs = load_variants(nxt)
    assert [r.voids[0].height_mm for _, r in pairs] == [7.5, 7.75, 8.0, 8.25, 8.5]
    assert {r.name for _, r in pairs} == {"finger-family-gen2"}
    report = (family / "results-report.md").read_text()
    assert "measured(P) = predicted(P) / f" in report and "| 1 | C |" in report


def test_the_plot_bytes_repeat(family):
    (family / "measured-results.yaml").write_text(RESULTS)
    assert main(["report", str(family)]) == 0
    first = (family / "results-plot.png").read_bytes(), (family / "results-plot.svg").read_bytes()
    assert main(["report", str(family)]) == 0
    assert first == ((family / "results-plot.png").read_bytes(),
                     (family / "results-plot.svg").read_bytes())


BAD = [
    ("unknown label", RESULTS.replace("  C:", "  B:"),
     "variants.B: is not a variant of the family (got 'B'); allowed: A, C", 12),
    ("negative pressure", RESULTS.replace("pressure_kpa: 30, bend_deg: 4.5",
                                          "pressure_kpa: -30, bend_deg: 4.5"),
     "variants.A.rows[1].pressure_kpa: is negative (got -30); allowed: a number >= 0", 9),
    ("angle without pressure", RESULTS.replace("pressure_kpa: 30, bend_deg: 7.5",
                                               "bend_deg: 7.5"),
     "variants.C.rows[0]: has bend_deg without pressure_kpa", 14),
    ("duplicated row", RESULTS.replace("pressure_kpa: 60, bend_deg: 18",
                                       "pressure_kpa: 30, bend_deg: 18"),
     "variants.C.rows[1].pressure_kpa: duplicates the row at line 14 (got 30.0)", 15),
    ("value without its unit key", RESULTS.replace("bend_deg: 18", "bend: 18"),
     "variants.C.rows[1].bend: is not a known key; allowed: pressure_kpa, bend_deg, "
     "extension_mm", 15),
    ("burst without its unit key", RESULTS.replace("burst_kpa: 135", "burst: 135"),
     "variants.C.burst: is not a known key", 16),
    ("a quantity the model does not predict", RESULTS.replace("bend_deg: 7.5",
                                                              "extension_mm: 7.5")
     .replace("bend_deg: 18", "extension_mm: 18"),
     "variants.C.rows: measures extension_mm, the model predicts bend_deg", 12),
]


@pytest.mark.parametrize("text, want, line", [b[1:] for b in BAD], ids=[b[0] for b in BAD])
def test_bad_results_are_one_line_exit_2_nothing_written(family, no_cad_work, capsys, text,
                                                         want, line):
    path = family / "measured-results.yaml"
    path.write_text(text)
    before = sorted(p.name for p in family.iterdir())
    assert main(["report", str(family)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 1, err
    assert err[0].startswith(f"error: {path}:{line}: {want}"), err[0]
    assert sorted(p.name for p in family.iterdir()) == before


def test_a_folder_without_builds_and_a_bad_option_are_refused(tmp_path, capsys):
    assert main(["report", str(tmp_path)]) == 2
    assert "holds no built variant" in capsys.readouterr().err
    assert main(["report", str(tmp_path), "--at-kpa", "-5"]) == 2
    assert capsys.readouterr().err.strip() == (
        "error: --at-kpa: is out of range (got -5.0); allowed: > 0 kPa")
    assert list(tmp_path.iterdir()) == []
