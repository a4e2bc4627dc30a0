"""The family sheet: one printable A4 picture per family of up to five variants, in PNG and
SVG, to pin beside the casts.

One row per variant: the label and a badge naming its worst finding (``warning: pressure``)
on the left, the changed recipe parameters in the words of the bench ("chamber height
6 mm") and the key figures in the middle, a section drawing through the cast part on the
right. The header gives the recipe's description, the tool version and, per row, the
recipe hash. The sheet carries no date on purpose: the same recipe and tool version must
give the same bytes (the build digests pin them), and the version and hash say which
build a printed sheet belongs to better than a date would.
Every section is drawn at one common scale (paper mm per part mm), so the rows compare by
eye; each row carries a scale bar, and the header states the scale at 100 % print.

The page is built on a private ``matplotlib.figure.Figure`` and rendered through the Agg
and SVG canvases directly: no pyplot, no backend switch, no display. Style settings are
reset to matplotlib's built-in defaults for the duration of a render (then restored), so a
user's matplotlibrc cannot change the output: the same data gives the same bytes.

Units: section coordinates are mm in the drawing's own 2-D frame, named by
``section_axes`` (e.g. ("x", "z"): the body long axis and the parting axis, see the frames
in DEVELOPERS.md). Page geometry below is in inches from the lower-left corner of the page
(matplotlib's figure frame), font sizes in points.
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

import matplotlib as mpl
import matplotlib.style
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.backends.backend_svg import FigureCanvasSVG
from matplotlib.collections import LineCollection
from matplotlib.figure import Figure
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.typing import RcKeyType

from ..analysis.findings import Severity
from ..analysis.section import section_segments
from ..units import mm3_to_cm3
from .card import verdict_word
from .manifest import Manifest
from .steps_manifest import SteppedManifest
from .stl import read_binary_stl

MAX_VARIANTS = 5
DPI = 150
#: ISO 216 A4, 210 mm x 297 mm, in inches (8.27 x 11.69 rounded).
PAGE_IN = (210.0 / 25.4, 297.0 / 25.4)
CAUTION = ("Inflated silicone parts can burst: eye protection, relief valve, never exceed a "
           "tested pressure.")

#: Fill colour and text colour per verdict; the word is always written too, so the sheet
#: still reads on a black-and-white print.
VERDICT_STYLE = {
    "ok": ("#2e7d32", "white"),
    "warnings": ("#f2a900", "black"),
    "errors": ("#c62828", "white"),
    "failed": ("#c62828", "white"),
}

FONT = "DejaVu Sans"  # bundled with matplotlib, so no system font is needed
_RC: dict[RcKeyType, object] = {
    "font.family": "sans-serif",
    "font.sans-serif": [FONT],
    "svg.fonttype": "none",      # keep text as <text>: searchable, small
    "svg.hashsalt": "soft-molds-family-sheet",  # fixed ids -> same bytes every render
    "text.parse_math": False,    # "$" in a value is a dollar sign, not mathtext
    "text.usetex": False,
    "path.simplify": False,      # draw every segment as given
}

# Page layout, inches.
_MARGIN = 0.5
_HEADER_TOP = 0.45     # from the top edge to the title's top
_ROWS_TOP = 1.35       # from the top edge to the first row
_ROWS_BOTTOM = 0.85    # from the bottom edge: footer below
_COL_LABEL = (_MARGIN, 1.55)        # x from, width
_COL_TEXT = (2.15, 2.45)
_COL_SECTION = (4.75, PAGE_IN[0] - _MARGIN - 4.75)
_ROW_PAD = 0.12        # top and bottom padding inside a row
_BAR_BAND = 0.30       # height reserved at the foot of each section axes for the scale bar
_DRAW_PAD = 0.08       # clearance around the drawing inside its axes

_PLOT_BAND = 1.55     # height the motion plot takes from the rows, when there is one
_PLOT_X = (1.05, PAGE_IN[0] - _MARGIN - 1.05)   # plot axes x from, width

_TEXT_PT = 7.5
_HEAD_PT = 6.5
_LINE_IN = _TEXT_PT * 1.32 / 72.0


@dataclass(frozen=True)
class SheetVariant:
    """One row of the sheet.

    ``changed``: (parameter words, value text with unit) pairs that differ from the
    family's reference recipe, drawn as "chamber height 6 mm". ``figures``: (name, value
    text with unit) key figures. ``verdict``: "ok", "warnings", "errors" or "failed" (the
    badge's colour). ``badge``: the badge's text, e.g. "warning: pressure" (the verdict
    when empty). ``section``: (n, 2, 2) line segments in mm in the 2-D frame named by
    ``section_axes`` (first name horizontal, second vertical, pointing up); may be empty
    (shape (0, 2, 2) or size 0).
    """

    label: str
    changed: tuple[tuple[str, str], ...]
    figures: tuple[tuple[str, str], ...]
    verdict: str
    section: np.ndarray
    section_axes: tuple[str, str]
    badge: str = ""


@dataclass(frozen=True)
class SheetCurve:
    """One variant's predicted motion for the sheet's plot: ``pressure_kpa`` against
    ``value`` (degrees of tip bend, or mm of extension: ``quantity`` names which), in
    ascending pressure; the curve ends at its last point (where the model stopped)."""

    label: str
    quantity: str
    pressure_kpa: tuple[float, ...]
    value: tuple[float, ...]


@dataclass(frozen=True)
class SheetData:
    """A family sheet: title and subtitle (e.g. tool version), 1..5 rows, the recipe's
    description (drawn under the title when not empty); ``curves``: the variants'
    predicted motion, drawn on one plot above the rows (none: no plot, the rows keep the
    page)."""

    title: str
    subtitle: str
    variants: tuple[SheetVariant, ...]
    description: str = ""
    curves: tuple[SheetCurve, ...] = ()
    working_pressure_kpa: float | None = None


Pair = tuple[str, str]


def worst_finding(man: Manifest | SteppedManifest) -> str:
    """The badge of a variant: "ok", or the severity and check of its worst finding
    (errors before warnings, then in review order), with "+n" for n other checks that
    found as bad, e.g. "warning: pressure +1"."""
    for sev in (Severity.ERROR, Severity.WARNING):
        names = list(dict.fromkeys(f.check for f in man.checks if f.severity is sev))
        if names:
            more = f" +{len(names) - 1}" if len(names) > 1 else ""
            return f"{sev}: {names[0]}{more}"
    return "ok"


def manifest_row(man: Manifest, folder: Path, changed: tuple[Pair, ...] = ()) -> SheetVariant:
    """The row of a built variant: label, worst finding and key figures from its manifest,
    and a section through the cast part it wrote into ``folder``, cut across the in-plane
    cross axis (y when z is up, else z) through the centre of the tube socket.
    ``changed``: (words, value) pairs as drawn (see :mod:`.fieldwords`)."""
    cross = "y" if man.pour.up[2] else "z"
    cy, cz = man.inlet_center_mm
    cast = next((p for p in man.parts if p.role == "cast"), None)
    if cast is None:
        seg, axes = np.empty((0, 2, 2)), ("x", "z")
    else:
        seg, axes = section_segments(read_binary_stl(folder / cast.file), cross,
                                     cy if cross == "y" else cz)
    return SheetVariant(man.label, changed, manifest_figures(man), verdict_word(man.verdict),
                        seg, axes, worst_finding(man))


def manifest_figures(man: Manifest) -> tuple[Pair, ...]:
    """The key figures of a variant as (name, value with unit): silicone volume, the mix
    to weigh, the thinnest silicone wall and the lowest pressure at which a wall balloons
    (an estimate)."""
    figs = [("silicone", f"{mm3_to_cm3(man.silicone_volume_mm3):.2f} cm3")]
    if man.casting is not None:
        figs.append(("mix", " + ".join(f"{p.g:g} g {p.what.split()[-1]}"
                                       for p in man.casting.portions)))
    walls = [f.value for f in man.checks if f.check == "silicone-wall" and f.value is not None]
    if walls:
        figs.append(("thinnest wall", f"{min(walls):.2f} mm"))
    lims = [w.limit_kpa for w in man.pressure.walls if w.limit_kpa is not None]
    if lims:
        figs.append(("balloons at", f"about {min(lims):.0f} kPa"))
    mo = man.motion
    if mo is not None and mo.working_pressure_kpa is not None:
        w = mo.at_working
        verb = "bends" if mo.kind == "bending" else "extends"
        name = f"{verb} at {mo.working_pressure_kpa:.0f} kPa"
        figs.append((name, f"beyond the {mo.stop}" if w is None else
                     f"about {w.angle_deg:.0f} deg" if mo.kind == "bending" else
                     f"about {w.extension_mm:.1f} mm"))
    figs.append(("recipe hash", man.source_params_sha256[:12]))
    return tuple(figs)


def motion_curve(man: Manifest | SteppedManifest) -> SheetCurve | None:
    """The plot's curve of a built variant: its predicted tip angle (a bender) or extension
    (an extender) against pressure, from the manifest; None without a prediction."""
    mo = man.motion
    if mo is None or not mo.points:
        return None
    bending = mo.kind == "bending"
    return SheetCurve(man.label, "angle_deg" if bending else "extension_mm",
                      tuple(p.pressure_kpa for p in mo.points),
                      tuple(p.angle_deg if bending else p.extension_mm for p in mo.points))


#: Gap between the stacked sections of a stepped variant's casts on the sheet (mm).
STEP_GAP_MM = 3.0


def stepped_row(man: SteppedManifest, folder: Path,
                changed: tuple[Pair, ...] = ()) -> SheetVariant:
    """The row of a variant cast in several steps: each pour's silicone and its mix to
    weigh, the verdict, and each step's cast cut across y through its middle (x along the
    page, z up as poured), step 1 on top and each later step stacked below it."""
    figs: list[Pair] = []
    for s in man.steps:
        mix = " + ".join(f"{p.grams:g} g {p.what.split()[-1]}" for p in s.pour.portions)
        figs.append((f"pour {s.index}",
                     f"{s.name} {mm3_to_cm3(s.pour.cast_mm3):.2f} cm3, mix {mix}"))
    mo = man.motion
    if mo is not None and mo.working_pressure_kpa is not None:
        w = mo.at_working
        figs.append((f"bends at {mo.working_pressure_kpa:.0f} kPa",
                     f"beyond the {mo.stop}" if w is None else f"about {w.angle_deg:.0f} deg"))
    figs.append(("recipe hash", man.params_sha256[:12]))
    pieces: list[np.ndarray] = []
    floor = 0.0
    for s in man.steps:
        cast = next((p for p in s.parts if p.role == "cast"), None)
        if cast is None:
            continue
        mesh = read_binary_stl(folder / cast.file)
        lo, hi = mesh.vertices.min(axis=0), mesh.vertices.max(axis=0)
        seg, _ = section_segments(mesh, "y", float(lo[1] + hi[1]) / 2.0)
        # Stack: this step's top sits STEP_GAP_MM below the previous step's bottom.
        shift = 0.0 if not pieces else floor - STEP_GAP_MM - float(hi[2])
        seg = seg + np.array([0.0, shift])
        floor = float(lo[2]) + shift
        pieces.append(seg)
    section = np.concatenate(pieces) if pieces else np.empty((0, 2, 2))
    return SheetVariant(man.label, changed, tuple(figs), verdict_word(man.verdict), section,
                        ("x", "z"), worst_finding(man))


def unbuilt_row(label: str, changed: tuple[Pair, ...], status: str,
                reason: str) -> SheetVariant:
    """The row of a variant with no files: ``status`` "failed" (the build broke) or another
    word (e.g. "refused": a check failed), with the first 80 characters of ``reason``; the
    badge says the status and, for a reason that starts with a check's name (a refusal's
    does: "trapped-air: ..."), that check."""
    m = re.match(r"([a-z][a-z0-9]*(?:-[a-z0-9]+)*): ", reason)
    badge = f"{status}: {m.group(1)}" if m and status != "failed" else status
    return SheetVariant(label, changed, (("status", status), ("reason", reason[:80])),
                        "failed" if status == "failed" else "errors", np.empty((0, 2, 2)),
                        ("x", "z"), badge)


@dataclass(frozen=True)
class _Scale:
    """Common drawing scale: inches of paper per mm of part, and the scale bar length."""

    in_per_mm: float
    bar_mm: float


def render_sheet(data: SheetData) -> tuple[bytes, bytes]:
    """Render ``data`` as an A4 portrait page; return (PNG bytes, SVG bytes).

    PNG at ``DPI`` dots per inch (size = page inches x DPI, truncated to whole pixels as
    matplotlib's Agg canvas does); SVG in points (1/72 in). Raises ValueError for no or
    more than ``MAX_VARIANTS`` variants, an unknown verdict, or a section that is not
    (n, 2, 2) finite numbers.
    """
    with matplotlib.style.context("default"), mpl.rc_context(_RC):
        fig = build_figure(data)
        png = io.BytesIO()
        FigureCanvasAgg(fig).print_figure(
            png, format="png", dpi=DPI, metadata={"Software": None, "Title": data.title})
        svg = io.BytesIO()
        FigureCanvasSVG(fig).print_figure(
            svg, format="svg", dpi=DPI, metadata={"Date": None, "Title": data.title})
    return png.getvalue(), svg.getvalue()


def build_figure(data: SheetData) -> Figure:
    """The sheet as an unrendered matplotlib Figure (page inches, see module docstring).

    Call inside the same style context as ``render_sheet`` for identical results; the
    section axes carry gids ``section-<i>`` (the drawing) and ``scalebar-<i>``.
    """
    variants = tuple(data.variants)
    if not 1 <= len(variants) <= MAX_VARIANTS:
        raise ValueError(f"a family sheet holds 1 to {MAX_VARIANTS} variants, "
                         f"got {len(variants)}")
    sections = [_segments(v) for v in variants]
    for v in variants:
        if v.verdict not in VERDICT_STYLE:
            raise ValueError(f"variant {v.label!r}: verdict must be one of "
                             f"{', '.join(VERDICT_STYLE)}, got {v.verdict!r}")

    fig = Figure(figsize=PAGE_IN, dpi=DPI, facecolor="white")
    # A private Agg canvas, only to measure text widths for truncation.
    measure = FigureCanvasAgg(fig).get_renderer()
    page_w, page_h = PAGE_IN

    def at(x_in: float, y_in: float) -> tuple[float, float]:
        return x_in / page_w, y_in / page_h

    fig.text(*at(_MARGIN, page_h - _HEADER_TOP), data.title, ha="left", va="top",
             fontsize=15, fontweight="bold")
    sub = data.subtitle if not data.description else f"{data.description}  \u2014  " \
        f"{data.subtitle}"
    fig.text(*at(_MARGIN, page_h - _HEADER_TOP - 0.32),
             _fit(sub, page_w - 2 * _MARGIN, 8.5, "normal", measure), ha="left", va="top",
             fontsize=8.5, color="0.3")

    rows_top = _ROWS_TOP + (_PLOT_BAND if data.curves else 0.0)
    if data.curves:
        ax = fig.add_axes((*at(_PLOT_X[0], page_h - rows_top + 0.42), _PLOT_X[1] / page_w,
                           (_PLOT_BAND - 0.62) / page_h))
        _draw_curves(ax, data.curves, data.working_pressure_kpa)
    row_h = (page_h - rows_top - _ROWS_BOTTOM) / MAX_VARIANTS
    ax_w = _COL_SECTION[1]
    ax_h = row_h - 2 * _ROW_PAD
    scale = _common_scale(sections, ax_w - 2 * _DRAW_PAD, ax_h - _BAR_BAND - 2 * _DRAW_PAD)
    if scale is not None:
        fig.text(*at(_MARGIN, page_h - _HEADER_TOP - 0.55), _scale_note(scale), ha="left",
                 va="top", fontsize=7.5, color="0.3")

    for i, (v, segs) in enumerate(zip(variants, sections)):
        top = page_h - rows_top - i * row_h
        if i:
            fig.add_artist(_hline(fig, top, page_w))
        _draw_label(fig, at, v, top, measure)
        _draw_text(fig, at, v, top, row_h, measure)
        ax = fig.add_axes((*at(_COL_SECTION[0], top - _ROW_PAD - ax_h), ax_w / page_w,
                           ax_h / page_h))
        _draw_section(ax, segs, v.section_axes, scale, ax_w, ax_h, i)

    bottom = _ROWS_BOTTOM - 0.05
    fig.add_artist(_hline(fig, page_h - rows_top - MAX_VARIANTS * row_h, page_w))
    fig.text(*at(page_w / 2, bottom - 0.25), "Caution: " + CAUTION, ha="center", va="top",
             fontsize=8, fontweight="bold")
    return fig


def _segments(v: SheetVariant) -> np.ndarray:
    s = np.asarray(v.section, dtype=float)
    if s.size == 0:
        return np.zeros((0, 2, 2))
    if s.ndim != 3 or s.shape[1:] != (2, 2):
        raise ValueError(f"variant {v.label!r}: section must be (n, 2, 2) segments in mm, "
                         f"got shape {s.shape}")
    if not np.isfinite(s).all():
        raise ValueError(f"variant {v.label!r}: section has non-finite coordinates")
    return s


def _nice(x: float, steps: Sequence[float] = (1.0, 2.0, 5.0)) -> float:
    """The largest step * 10^k not above ``x`` (x > 0)."""
    k = math.floor(math.log10(x))
    best = steps[0] * 10.0 ** k
    for m in steps:
        if m * 10.0 ** k <= x * (1 + 1e-12):
            best = m * 10.0 ** k
    return best


def _common_scale(sections: Sequence[np.ndarray], w_in: float, h_in: float) -> _Scale | None:
    """One scale for every section: the largest round print ratio (1:1, 1:2, 1:5, 1:10 ...,
    2:1, 5:1) at which the widest and the tallest section fit the drawing box of
    ``w_in`` x ``h_in`` inches. A round ratio lets a ruler on the printed page read mm.
    None when no section has anything to draw."""
    drawn = [s for s in sections if len(s)]
    if not drawn:
        return None
    span_w = max(float(np.ptp(s[:, :, 0])) for s in drawn)
    span_h = max(float(np.ptp(s[:, :, 1])) for s in drawn)
    fits = []
    if span_w > 0:
        fits.append(w_in * 25.4 / span_w)
    if span_h > 0:
        fits.append(h_in * 25.4 / span_h)
    ratio = min(fits) if fits else 1.0   # all sections are points: draw them 1:1
    ratio = min(_nice(ratio, (1.0, 2.0, 2.5, 5.0)), 5.0)  # paper mm per part mm
    in_per_mm = ratio / 25.4
    box_mm = w_in / in_per_mm
    bar = 10.0 if box_mm / 8 <= 10.0 <= box_mm / 2.5 else _nice(box_mm / 4)
    return _Scale(in_per_mm=in_per_mm, bar_mm=bar)


def _ratio_text(in_per_mm: float) -> str:
    r = in_per_mm * 25.4
    if r >= 1:
        return f"{r:g} : 1"
    return f"1 : {1 / r:g}"


def _scale_note(scale: _Scale) -> str:
    return (f"All sections at one scale, {_ratio_text(scale.in_per_mm)} on A4 printed at "
            f"100 %; scale bars {scale.bar_mm:g} mm.")


def _hline(fig: Figure, y_in: float, page_w: float) -> Line2D:
    y = y_in / PAGE_IN[1]
    return Line2D([_MARGIN / page_w, 1 - _MARGIN / page_w], [y, y], transform=fig.transFigure,
                  color="0.75", linewidth=0.6)


def _fit(text: str, width_in: float, size: float, weight: str, renderer) -> str:
    """``text`` cut with an ellipsis so it is at most ``width_in`` wide at ``size`` pt."""
    prop = FontProperties(family="sans-serif", size=size, weight=weight)
    limit = width_in * renderer.dpi

    def width(s: str) -> float:
        return renderer.get_text_width_height_descent(s, prop, ismath=False)[0]

    if width(text) <= limit:
        return text
    lo, hi = 0, len(text)
    while lo < hi:  # longest prefix that fits with the ellipsis
        mid = (lo + hi + 1) // 2
        if width(text[:mid] + "\u2026") <= limit:
            lo = mid
        else:
            hi = mid - 1
    return text[:lo] + "\u2026"


def _fit_pair(head: str, tail: str, width_in: float, size: float, renderer) -> str:
    """``head + tail`` fitted to ``width_in``: the middle of ``head`` gives way first, since a
    parameter path says the most at its two ends (which part, which field) and the value in
    ``tail`` is what the row is about."""
    whole = head + tail
    if _fit(whole, width_in, size, "normal", renderer) == whole:
        return whole
    prop = FontProperties(family="sans-serif", size=size)
    limit = width_in * renderer.dpi

    def elided(k: int) -> str:
        front = (k + 1) // 2
        return head[:front] + "\u2026" + head[len(head) - (k - front):] + tail

    def width(text: str) -> float:
        return renderer.get_text_width_height_descent(text, prop, ismath=False)[0]

    if width(elided(min(len(head) - 1, 8))) > limit:
        return _fit(whole, width_in, size, "normal", renderer)  # the value itself is too long
    lo, hi = 0, len(head) - 1
    while lo < hi:  # most characters of ``head`` kept
        mid = (lo + hi + 1) // 2
        if width(elided(mid)) <= limit:
            lo = mid
        else:
            hi = mid - 1
    return elided(lo)


PagePoint = Callable[[float, float], tuple[float, float]]  # page inches -> figure fraction


def _draw_label(fig: Figure, at: PagePoint, v: SheetVariant, top: float, renderer) -> None:
    x, w = _COL_LABEL
    # Shrink long labels to the column rather than cut them: the label is the row's name.
    size = 26.0
    prop = FontProperties(family="sans-serif", size=size, weight="bold")
    tw = renderer.get_text_width_height_descent(v.label, prop, ismath=False)[0] / renderer.dpi
    if tw > w:
        size = max(7.0, size * w / tw)
    label = _fit(v.label, w, size, "bold", renderer)
    fig.text(*at(x, top - _ROW_PAD), label, ha="left", va="top", fontsize=size,
             fontweight="bold")
    face, ink = VERDICT_STYLE[v.verdict]
    # The badge names the worst finding; shrink it to the column (its box pads 0.35 em).
    badge = v.badge or v.verdict
    bsize = 10.0
    bprop = FontProperties(family="sans-serif", size=bsize, weight="bold")
    room = w - 0.06 - 2 * 0.35 * bsize / 72.0
    bw = renderer.get_text_width_height_descent(badge, bprop, ismath=False)[0] / renderer.dpi
    if bw > room:
        bsize = max(6.0, bsize * room / bw)
    badge = _fit(badge, room, bsize, "bold", renderer)
    fig.text(*at(x + 0.06, top - _ROW_PAD - 0.62), badge, ha="left", va="top",
             fontsize=bsize, fontweight="bold", color=ink,
             bbox={"boxstyle": "round,pad=0.35", "facecolor": face, "edgecolor": "black",
                   "linewidth": 0.8})


def _draw_text(fig: Figure, at: PagePoint, v: SheetVariant, top: float, row_h: float,
               renderer) -> None:
    x, w = _COL_TEXT
    capacity = int((row_h - 2 * _ROW_PAD) / _LINE_IN)
    changed = [(p, f" {val}") for p, val in v.changed] or [("nothing (reference)", "")]
    figures = [(name, f": {val}") for name, val in v.figures] or [("none", "")]
    # Two headings; figures keep their room first, the changes get what is left.
    room = max(capacity - 2, 2)
    n_fig = min(len(figures), max(room - 1, 1))
    n_chg = room - n_fig
    if len(figures) > n_fig:
        figures = figures[:n_fig - 1] + [(f"+ {len(figures) - n_fig + 1} more", "")]
    if len(changed) > n_chg:
        keep = max(n_chg - 1, 0)
        changed = changed[:keep] + [(f"+ {len(changed) - keep} more", "")]
    y = top - _ROW_PAD
    for heading, pairs in (("changed", changed), ("figures", figures)):
        fig.text(*at(x, y), heading, ha="left", va="top", fontsize=_HEAD_PT,
                 fontweight="bold", color="0.35")
        y -= _LINE_IN
        for head, tail in pairs:
            fig.text(*at(x, y), _fit_pair(head, tail, w, _TEXT_PT, renderer), ha="left",
                     va="top", fontsize=_TEXT_PT)
            y -= _LINE_IN


def _draw_section(ax, segs: np.ndarray, names: tuple[str, str], scale: _Scale | None,
                  ax_w: float, ax_h: float, index: int) -> None:
    """Draw ``segs`` (mm) in ``ax`` (``ax_w`` x ``ax_h`` inches) at the common scale.

    The data limits are set from the box size and the scale, so 1 mm is the same length on
    paper in every row and in both directions (equal aspect by construction)."""
    ax.set_xticks([])
    ax.set_yticks([])
    for spine in ax.spines.values():
        spine.set_color("0.85")
        spine.set_linewidth(0.5)
    ax.set_xlabel(f"{names[0]} \u2192", fontsize=6.5, color="0.55", labelpad=2, loc="right")
    ax.set_ylabel(f"{names[1]} \u2192", fontsize=6.5, color="0.55", labelpad=2, loc="top")
    if not len(segs) or scale is None:
        ax.set_xlim(0, 1)
        ax.set_ylim(0, 1)
        ax.text(0.5, 0.5, "no section", ha="center", va="center", fontsize=9, color="0.4",
                style="italic", transform=ax.transAxes)
        return
    k = scale.in_per_mm
    span_x, span_y = ax_w / k, ax_h / k
    bar_mm = _BAR_BAND / k
    xs, ys = segs[:, :, 0], segs[:, :, 1]
    cx = 0.5 * (xs.min() + xs.max())
    # Centre the drawing in the box above the scale-bar band.
    cy = 0.5 * (ys.min() + ys.max())
    y0 = cy - 0.5 * (span_y - bar_mm) - bar_mm
    ax.set_xlim(cx - span_x / 2, cx + span_x / 2)
    ax.set_ylim(y0, y0 + span_y)
    ax.set_aspect("equal", adjustable="datalim")
    ax.add_collection(LineCollection(list(segs), colors="black", linewidths=0.8,
                                     capstyle="round", gid=f"section-{index}"),
                      autolim=False)
    # Scale bar in the band at the lower left, with end ticks.
    pad = _DRAW_PAD / k
    bx0, by = cx - span_x / 2 + pad, y0 + 0.45 * bar_mm
    tick = 0.12 * bar_mm
    bar = LineCollection(
        [[(bx0, by), (bx0 + scale.bar_mm, by)], [(bx0, by - tick), (bx0, by + tick)],
         [(bx0 + scale.bar_mm, by - tick), (bx0 + scale.bar_mm, by + tick)]],
        colors="black", linewidths=1.2, gid=f"scalebar-{index}")
    ax.add_collection(bar, autolim=False)
    ax.text(bx0 + scale.bar_mm + 0.6 * pad, by, f"{scale.bar_mm:g} mm", ha="left",
            va="center", fontsize=7)


_QUANTITY = {"angle_deg": "tip bend, degrees", "extension_mm": "extension, mm"}


def _draw_curves(ax, curves: Sequence[SheetCurve], working_kpa: float | None) -> None:
    """Every variant's predicted curve on one pair of axes, each labelled at its end (where
    the model stopped: the balloon limit, or where a fibre would break); the working
    pressure as a dashed line. Curves of another quantity than the first are left out
    (one y axis)."""
    quantity = curves[0].quantity
    shown = [c for c in curves if c.quantity == quantity and len(c.pressure_kpa)]
    for spine in ("top", "right"):
        ax.spines[spine].set_visible(False)
    ax.tick_params(labelsize=6.5, length=2)
    ax.set_xlabel("pressure, kPa", fontsize=7)
    ax.set_ylabel(_QUANTITY.get(quantity, quantity), fontsize=7)
    ax.set_title("Predicted motion (beam estimate; each curve stops at its limit)",
                 fontsize=7.5, loc="left")
    top_p = max((max(c.pressure_kpa) for c in shown), default=1.0)
    if working_kpa is not None:
        top_p = max(top_p, working_kpa)
        ax.axvline(working_kpa, color="0.5", linewidth=0.6, linestyle="--")
        ax.text(working_kpa, 1.0, " working", transform=ax.get_xaxis_transform(),
                fontsize=6, color="0.4", va="top", ha="left")
    for c in shown:
        line = ax.plot(c.pressure_kpa, c.value, linewidth=1.0, gid=f"curve-{c.label}")[0]
        ax.plot([c.pressure_kpa[-1]], [c.value[-1]], marker="o", markersize=2.5,
                color=line.get_color())
        ax.annotate(c.label, (c.pressure_kpa[-1], c.value[-1]), xytext=(3, 0),
                    textcoords="offset points", fontsize=7, fontweight="bold",
                    color=line.get_color(), va="center")
    ax.set_xlim(0.0, top_p * 1.08)
    ax.set_ylim(bottom=0.0)
