"""The results template a sweep leaves in each family folder: it reads back as a results
file, and a filled one is never overwritten (demo scenario: the seedling finger)."""

from __future__ import annotations

from soft_molds.analysis.findings import Verdict
from soft_molds.export.reports import write_reports
from soft_molds.export.results import (
    ComparisonPlot,
    VariantSeries,
    render_comparison,
    template_bytes,
)
from soft_molds.export.writer import write_mold_set
from soft_molds.recipe.results import read_results, results_from_text
from soft_molds.sweep.outcome import Outcome, Status


def Row(recipe: str, label: str, family: str, status: str, out_dir: str, **kw) -> Outcome:
    """The sweep's own outcome of one variant (what the report stage is given)."""
    return Outcome(recipe, label, family, Status(status), out_dir=out_dir, **kw)


def test_the_template_reads_back_with_every_label_and_no_rows():
    data = template_bytes("finger-family", [("A", {"voids[0].height_mm": 6}),
                                            ("B", {"voids[0].height_mm": 7})], "bend_deg", 60)
    res = results_from_text(data.decode(), "t.yaml", ["A", "B"])
    assert [v.label for v in res.variants] == ["A", "B"]
    assert all(v.points == () and v.defects == () for v in res.variants)
    assert res.goal.at_kpa == 60.0 and res.family == "finger-family"


def test_a_sweep_writes_the_template_once_and_never_over_measurements(finger, tmp_path):
    folder = write_mold_set(finger, tmp_path).directory
    rows = [Row("seedling-finger", "A", "", "built", str(folder), verdict=Verdict.OK,
                changed={"voids[0].height_mm": 8})]
    written = write_reports(rows, tmp_path)
    path = tmp_path / "seedling-finger" / "measured-results.yaml"
    assert path in written
    assert read_results(path, ["A"]).variants[0].quantity is None
    filled = path.read_text().replace("rows: []", "rows: [{pressure_kpa: 20, bend_deg: 5}]")
    path.write_text(filled)
    again = write_reports(rows, tmp_path)
    assert path not in again and path.read_text() == filled
    assert [p.value for p in read_results(path, ["A"]).variants[0].points] == [5.0]


def test_the_comparison_plot_has_the_same_bytes_every_render():
    plot = ComparisonPlot("f", "tip angle, deg",
                          (VariantSeries("A", "h = 6", (0.0, 50.0), (0.0, 10.0), (25.0,), (4.0,)),),
                          1.2)
    png, svg = render_comparison(plot)
    assert (png, svg) == render_comparison(plot)
    assert png.startswith(b"\x89PNG") and b"<svg" in svg and b"Date" not in svg
