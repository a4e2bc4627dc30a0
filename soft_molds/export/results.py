"""Files of the results loop: the measured-results template a sweep leaves in each family
folder, and the report comparing measurements with predictions.

The template (``measured-results[-F<n>].yaml``) is written only when absent: it is the
file a person fills in, and a later sweep must never overwrite measurements. The report
(``results-plot.png`` / ``.svg``, ``results-report.md`` and the next generation's recipe)
is drawn with matplotlib's Agg and SVG canvases without global state, dates or metadata,
so the same inputs give the same bytes.
"""

from __future__ import annotations

import io
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import matplotlib as mpl
import matplotlib.style
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.backends.backend_svg import FigureCanvasSVG
from matplotlib.figure import Figure
from matplotlib.typing import RcKeyType

from .files import write_atomic, write_new

#: Name of the template / default results file of a family (``-F<n>`` before the dot
#: for family n of a big sweep).
RESULTS_STEM = "measured-results"
PLOT_STEM = "results-plot"
REPORT_NAME = "results-report.md"
DPI = 120

_RC: dict[RcKeyType, object] = {
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans"],  # bundled with matplotlib
    "svg.fonttype": "none",
    "svg.hashsalt": "soft-molds-results-plot",  # fixed ids -> same bytes every render
    "text.parse_math": False,
    "text.usetex": False,
    "path.simplify": False,
}
_COLOURS = ("#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#8c564b", "#17becf")


def results_name(family: str = "") -> str:
    return f"{RESULTS_STEM}{'-' + family if family else ''}.yaml"


# --- the template --------------------------------------------------------------------------

def template_bytes(recipe: str, variants: Sequence[tuple[str, Mapping[str, object]]],
                   quantity: str, working_kpa: float | None) -> bytes:
    """The results template of one family: ``variants`` as (label, changed fields),
    ``quantity`` bend_deg or extension_mm, ``working_kpa`` the builds' working pressure."""
    at = f"{working_kpa:g}" if working_kpa is not None else "null"
    out = [
        f"# Measured results of {recipe}: fill in after casting and testing the variants",
        "# (format: README.md, \"Measured results\"), then run: soft-molds report <this folder>",
        "# Written once by the sweep; a later sweep never overwrites it.",
        f"family: {recipe}",
        f"# recipe: ../../recipes/{recipe}.yaml   # the family recipe, relative to this file",
        "goal:",
        f"  maximise: {quantity}",
        f"  at_kpa: {at}",
        "  min_burst_margin: 1.5",
        "variants:",
    ]
    for label, changed in variants:
        what = ", ".join(f"{k}={v}" for k, v in changed.items())
        out += [
            f"  {label}:" + (f"   # {what}" if what else ""),
            f"    rows: []        # one row per step: {{pressure_kpa: P, {quantity}: value}}",
            "    burst_kpa: null  # pressure it burst at, if taken that far",
            "    leak_kpa: null   # lowest pressure a leak showed at",
            "    defects: []      # bubbles, tear-at-inlet, delamination, leak, other",
            "    notes: \"\"",
        ]
    return ("\n".join(out) + "\n").encode()


def write_template(folder: Path, family: str, data: bytes) -> Path | None:
    """Write the template into ``folder`` unless a results file is already there; the
    path written, or None."""
    path = Path(folder) / results_name(family)
    return path if write_new(path, data) else None


# --- the comparison plot -------------------------------------------------------------------

@dataclass(frozen=True)
class VariantSeries:
    """One variant on the plot: the predicted curve (pressure kPa, value), the measured
    rows (pressure kPa, value) and a caption (its changed fields)."""

    label: str
    caption: str
    curve_kpa: tuple[float, ...]
    curve: tuple[float, ...]
    rows_kpa: tuple[float, ...]
    rows: tuple[float, ...]


@dataclass(frozen=True)
class ComparisonPlot:
    """Everything the plot shows: a title, the measured quantity's axis label, the
    variants and the fitted factor (None when it could not be fitted)."""

    title: str
    axis_label: str
    variants: tuple[VariantSeries, ...]
    factor: float | None


def render_comparison(data: ComparisonPlot) -> tuple[bytes, bytes]:
    """(PNG bytes, SVG bytes) of one panel per variant (predicted, predicted / f dashed,
    measured points) and a last panel of measured against predicted."""
    with matplotlib.style.context("default"), mpl.rc_context(_RC):
        fig = _figure(data)
        png, svg = io.BytesIO(), io.BytesIO()
        FigureCanvasAgg(fig).print_figure(png, format="png", dpi=DPI,
                                          metadata={"Software": None})
        FigureCanvasSVG(fig).print_figure(svg, format="svg", dpi=DPI,
                                          metadata={"Date": None, "Creator": None})
    return png.getvalue(), svg.getvalue()


def _figure(data: ComparisonPlot) -> Figure:
    n = len(data.variants) + 1
    cols = min(3, n)
    rows = -(-n // cols)
    fig = Figure(figsize=(4.0 * cols, 3.2 * rows + 0.6))
    fig.suptitle(data.title + (f" - fitted modulus factor f = {data.factor:.3f}"
                               if data.factor is not None else " - no factor fitted"))
    axes = [fig.add_subplot(rows, cols, i + 1) for i in range(n)]
    for i, (ax, v) in enumerate(zip(axes, data.variants)):
        c = _COLOURS[i % len(_COLOURS)]
        ax.plot(v.curve_kpa, v.curve, color=c, lw=1.5, label="predicted")
        if data.factor is not None:
            ax.plot(v.curve_kpa, np.asarray(v.curve) / data.factor, color=c, lw=1.0,
                    ls="--", label="predicted / f")
        ax.plot(v.rows_kpa, v.rows, "o", color="black", ms=4, label="measured")
        ax.set_title(f"{v.label}  {v.caption}", fontsize=9)
        ax.set_xlabel("pressure, kPa")
        ax.set_ylabel(data.axis_label)
        ax.grid(True, lw=0.3)
        if i == 0:
            ax.legend(fontsize=7, loc="upper left")
    parity = axes[len(data.variants)]
    top = 0.0
    for i, v in enumerate(data.variants):
        pred = np.interp(v.rows_kpa, v.curve_kpa, v.curve) if v.curve_kpa else np.empty(0)
        keep = [j for j, p in enumerate(v.rows_kpa) if v.curve_kpa and p <= v.curve_kpa[-1]]
        xs = [float(pred[j]) for j in keep]
        ys = [v.rows[j] for j in keep]
        parity.plot(xs, ys, "o", color=_COLOURS[i % len(_COLOURS)], ms=4, label=v.label)
        top = max([top, *xs, *ys])
    top = top or 1.0
    parity.plot([0, top], [0, top], color="grey", lw=0.8, label="measured = predicted")
    if data.factor is not None:
        parity.plot([0, top], [0, top / data.factor], color="black", lw=0.8, ls="--",
                    label="measured = predicted / f")
    parity.set_xlabel(f"predicted {data.axis_label}")
    parity.set_ylabel(f"measured {data.axis_label}")
    parity.set_title("measured against predicted", fontsize=9)
    parity.grid(True, lw=0.3)
    parity.legend(fontsize=7, loc="upper left")
    fig.tight_layout()
    return fig


def write_report(folder: Path, files: Mapping[str, bytes]) -> list[Path]:
    """Write each named file into ``folder`` (replacing an earlier report's); the paths,
    in the order given."""
    out = []
    for name, data in files.items():
        path = Path(folder) / name
        write_atomic(path, data)
        out.append(path)
    return out


# --- the written report --------------------------------------------------------------------

@dataclass(frozen=True)
class RankRow:
    """One line of the ranking: place, label, score (with whether it was measured or a
    calibrated prediction), burst margin, defects, and why it misses the goal ("" if not)."""

    place: int
    label: str
    score: float | None
    measured: bool
    burst_margin: float | None
    defects: tuple[str, ...]
    why_not: str


@dataclass(frozen=True)
class ReportText:
    """What ``results-report.md`` says (numbers already in their units)."""

    family: str
    relation: str
    factor: float | None
    low: float | None
    high: float | None
    confidence: float
    points: int
    beyond_model: int
    residual_sd: float | None
    per_variant_rms: tuple[tuple[str, float], ...]
    goal: str
    unit: str
    ranking: tuple[RankRow, ...]
    next_recipe: str
    next_rule: str
    cautions: tuple[str, ...]


def _num(x: float | None, fmt: str = ".3f") -> str:
    return "-" if x is None else format(x, fmt)


def report_markdown(r: ReportText) -> bytes:
    """The report as Markdown (no date: the same inputs give the same bytes)."""
    out = [f"# Measured against predicted: {r.family}", "", f"Model relation: {r.relation}", ""]
    if r.factor is not None:
        hi = "open above" if r.high is None or r.high == float("inf") else f"{r.high:.3f}"
        out += [f"Fitted modulus factor f = {r.factor:.3f} ({r.confidence * 100:g} % "
                f"interval {_num(r.low)} to {hi}; {r.points} rows, {r.beyond_model} above "
                f"the model's range left out; residual s.d. {_num(r.residual_sd)} {r.unit})",
                "", "| variant | RMS residual |", "|---|---|"]
        out += [f"| {lb} | {rms:.3f} {r.unit} |" for lb, rms in r.per_variant_rms]
    else:
        out.append("No factor fitted (fewer than two measured rows within the model's range).")
    out += ["", f"Goal: {r.goal}", "", "| place | variant | score | from | burst margin | "
            "defects | misses the goal |", "|---|---|---|---|---|---|---|"]
    for row in r.ranking:
        score = "-" if row.score is None else f"{row.score:.2f} {r.unit}"
        origin = ("measured" if row.measured else "-" if row.score is None
                  else "prediction / f")
        out.append(f"| {row.place} | {row.label} | {score} | {origin} | "
                   f"{_num(row.burst_margin, '.2f')} | {', '.join(row.defects) or '-'} | "
                   f"{row.why_not or '-'} |")
    out += ["", f"Next generation: {r.next_recipe}", "", r.next_rule, ""]
    out += [*r.cautions, ""]
    return "\n".join(out).encode()
