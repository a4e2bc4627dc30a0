"""Labels debossed into mold parts, cut with the stroke font of :mod:`..recipe.strokefont`.

The engraving tool is the text swept by a round end mill seen from above: every stroke a
box as wide as the stroke, every polyline vertex a cylinder of the same diameter, so each
segment's tool is a stadium and joins are round. The tool is a straight prism along the
face normal, from ``OVERSHOOT_MM`` outside the face to ``depth_mm`` inside: starting outside
keeps the cut from leaving a skin of zero thickness on the face (coplanar faces are a weak
spot of the kernel's booleans).

World frame: mm. A label is placed by the world point ``origin`` on the face where the
text's baseline starts and two orthogonal unit vectors: ``right`` (reading direction) and
``up`` (from baseline to cap height). The face's outward normal is ``right x up``.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence

import cadquery as cq
import numpy as np

from ..errors import GeometryError
from ..recipe.strokefont import ADVANCE, GLYPH_HEIGHT, text_segments
from . import kernel

#: Defaults for labels on printed mold parts: 5 mm capitals, 0.6 mm deep, 1.0 mm strokes
#: (two and a half line widths of a 0.4 mm nozzle, so a stroke prints as at least two
#: lines; common practice for small printed features).
DEFAULT_HEIGHT_MM = 5.0
DEFAULT_DEPTH_MM = 0.6
DEFAULT_STROKE_MM = 1.0
#: How far the tool starts outside the face (mm).
OVERSHOOT_MM = 0.2
#: Stroke distances closer than this to exact tangency (mm) are refused: two tools that
#: merely touch make a boolean the kernel may get wrong.
_TANGENT_MM = 1e-4
#: Most a stroke is widened to make touching pieces overlap (mm): a hundredth of a stroke
#: of the smallest allowed width, invisible in print.
_WIDEN_MAX_MM = 0.005


def _unit(v: Sequence[float], name: str) -> np.ndarray:
    a = np.asarray(v, dtype=np.float64)
    if a.shape != (3,) or not np.all(np.isfinite(a)):
        raise ValueError(f"{name} must be a finite 3-vector, got {v!r}")
    if abs(np.linalg.norm(a) - 1.0) > 1e-6:
        raise ValueError(f"{name} must be a unit vector, got length {np.linalg.norm(a):.6g}")
    return a


def _segment_distance(p: np.ndarray, q: np.ndarray, r: np.ndarray, s: np.ndarray) -> float:
    """Shortest distance between 2-D segments pq and rs (mm)."""
    d1, d2 = q - p, s - r
    if abs(d1[0] * d2[1] - d1[1] * d2[0]) > 1e-12:
        # Proper crossing: each segment's ends lie on opposite sides of the other's line.
        def side(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> float:
            return float((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]))

        if side(p, q, r) * side(p, q, s) < 0 and side(r, s, p) * side(r, s, q) < 0:
            return 0.0

    def point_seg(x: np.ndarray, a: np.ndarray, b: np.ndarray) -> float:
        ab = b - a
        n2 = float(ab @ ab)
        t = 0.0 if n2 == 0.0 else min(1.0, max(0.0, float((x - a) @ ab) / n2))
        return float(np.linalg.norm(x - (a + t * ab)))

    return min(point_seg(p, r, s), point_seg(q, r, s), point_seg(r, p, q), point_seg(s, p, q))


def _stroke_groups(segs: np.ndarray, stroke_mm: float
                   ) -> tuple[list[list[int]], list[float]]:
    """Segments whose stadiums overlap, grouped into connected pieces (one solid each), and
    the distances (mm) of the pairs from different pieces that nearly touch."""
    n = len(segs)
    parent = list(range(n))

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    lo = segs.min(axis=1)
    hi = segs.max(axis=1)
    near: list[tuple[int, int, float]] = []
    for i in range(n):
        for j in range(i + 1, n):
            # Bounding boxes grown by the stroke width rule most pairs out cheaply.
            if np.any(lo[j] > hi[i] + stroke_mm) or np.any(lo[i] > hi[j] + stroke_mm):
                continue
            d = _segment_distance(segs[i, 0], segs[i, 1], segs[j, 0], segs[j, 1])
            if d < stroke_mm - _TANGENT_MM:
                parent[find(i)] = find(j)
            elif d < stroke_mm + _TANGENT_MM:
                near.append((i, j, d))
    # Tangency inside one piece is harmless (every bar is tangent to its joint cylinders);
    # between two pieces it leaves the kernel to decide whether they are one solid or two.
    touching = [d for i, j, d in near if find(i) != find(j)]
    groups: dict[int, list[int]] = {}
    for i in range(n):
        groups.setdefault(find(i), []).append(i)
    return sorted(groups.values(), key=lambda g: (float(segs[g, :, 0].min()), g[0])), touching


def settled_stroke(segs: np.ndarray, stroke_mm: float, part: str = "label"
                   ) -> tuple[float, list[list[int]]]:
    """The stroke width (mm) the tool is built with, and its connected pieces.

    ``stroke_mm`` itself unless two pieces would touch without overlapping (their strokes'
    distance within ``_TANGENT_MM`` of the width, e.g. neighbouring glyphs at a 3 mm cap
    height and a 1 mm stroke: the glyph gap is then exactly one stroke). Then the stroke is
    widened just enough that each such pair overlaps by at least ``_TANGENT_MM``, repeated
    until no pair touches; the pieces join into one. The widening is a few tenths of a
    micrometre, far below what a printer resolves, and never exceeds ``_WIDEN_MAX_MM``."""
    s = float(stroke_mm)
    while True:
        groups, touching = _stroke_groups(segs, s)
        if not touching:
            return s, groups
        s = max(touching) + 2.0 * _TANGENT_MM
        if s - stroke_mm > _WIDEN_MAX_MM:  # pragma: no cover - needs pathological strokes
            raise GeometryError(
                "label strokes", f"strokes touch without overlapping at every width from "
                f"{stroke_mm} to {s:.4f} mm; change the stroke or the height", part)


def label_solid(text: str, origin: Sequence[float], right: Sequence[float],
                up: Sequence[float], height_mm: float = DEFAULT_HEIGHT_MM,
                depth_mm: float = DEFAULT_DEPTH_MM, stroke_mm: float = DEFAULT_STROKE_MM,
                part: str = "label") -> cq.Shape:
    """The engraving tool for debossing ``text`` into a flat face (world frame, mm).

    ``origin`` is the point on the face where the baseline starts; the text runs along the
    unit vector ``right`` with its capitals along the unit vector ``up`` (orthogonal to
    ``right``); ``right x up`` is the face's outward normal. Capitals are ``height_mm`` tall,
    strokes ``stroke_mm`` wide with round ends and joins, and the tool spans from
    ``OVERSHOOT_MM`` outside the face to ``depth_mm`` inside it.

    Returns one solid per connected piece of the text (usually one per glyph), checked for
    validity and count; several pieces come back as one compound of disjoint solids.
    """
    o = np.asarray(origin, dtype=np.float64)
    if o.shape != (3,) or not np.all(np.isfinite(o)):
        raise ValueError(f"origin must be a finite 3-vector, got {origin!r}")
    r, u = _unit(right, "right"), _unit(up, "up")
    if abs(float(r @ u)) > 1e-6:
        raise ValueError(f"right and up must be orthogonal (dot product {float(r @ u):.6g})")
    if depth_mm <= 0 or stroke_mm <= 0:
        raise ValueError(f"label depth and stroke must be positive, got {depth_mm} mm and "
                         f"{stroke_mm} mm")
    pieces = _pieces(text, float(height_mm), float(depth_mm), float(stroke_mm), part)
    normal = np.cross(r, u)
    plane = cq.Plane(cq.Vector(*o), cq.Vector(*r), cq.Vector(*normal))
    placed = [p.moved(cq.Location(plane)) for p in pieces]
    if len(placed) == 1:
        return kernel.checked(placed[0], part, "place label")
    return kernel.checked(cq.Compound.makeCompound(placed), part, "place label",
                          solids=len(placed))


def _pieces(text: str, height_mm: float, depth_mm: float, stroke_mm: float,
            part: str) -> tuple[cq.Shape, ...]:
    """The tool's connected pieces in the text frame (x right, y up, z out of the face).

    Pieces are built once per run of characters and size (:func:`_run_pieces`) and moved
    to their place: a sweep's labels share most of their characters, and a mold set cuts
    the same text into three parts. A run is one glyph while the font's gap between
    glyphs (2 grid units, a third of the cap height) exceeds the stroke; a stroke as wide
    as the gap joins neighbouring glyphs, and glyphs joined by a piece are built as one
    run, so that no two pieces of the tool overlap or touch."""
    segs = text_segments(text, height_mm)
    if len(segs) == 0:
        raise ValueError(f"label {text!r} has no strokes to cut")
    stroke, groups = settled_stroke(segs, stroke_mm, part)
    chars = text.upper()
    owner = np.repeat(np.arange(len(chars)), [len(text_segments(c, height_mm)) for c in chars])
    runs: list[list[int]] = []  # [first, last] character of each run, in reading order
    for first, last in sorted((int(owner[g].min()), int(owner[g].max())) for g in groups):
        if runs and first <= runs[-1][1]:
            runs[-1][1] = max(runs[-1][1], last)
        else:
            runs.append([first, last])
    step = ADVANCE * height_mm / GLYPH_HEIGHT
    out: list[cq.Shape] = []
    for first, last in runs:
        for piece in _run_pieces(chars[first:last + 1], height_mm, depth_mm, stroke, part):
            out.append(piece.translate(cq.Vector(first * step, 0.0, 0.0)) if first else piece)
    return tuple(out)


@functools.lru_cache(maxsize=256)
def _run_pieces(chars: str, height_mm: float, depth_mm: float, stroke_mm: float,
                part: str) -> tuple[cq.Shape, ...]:
    """The connected pieces of a run of characters placed at the text origin (empty for
    spaces only); ``stroke_mm`` as settled for the whole text (:func:`settled_stroke`)."""
    segs = text_segments(chars, height_mm)
    if len(segs) == 0:
        return ()
    groups, touching = _stroke_groups(segs, stroke_mm)
    if touching:  # settled_stroke rules this out for the whole text, so for its runs
        raise GeometryError("label strokes", f"two strokes touch without overlapping "
                            f"({touching[0]:.6f} mm apart at a {stroke_mm} mm stroke)", part)

    half = stroke_mm / 2.0
    length = depth_mm + OVERSHOOT_MM
    pieces: list[cq.Shape] = []
    # Built in the text frame (x right, y up, z out of the face) and placed once at the end.
    for group in groups:
        tools: list[cq.Shape] = []
        joints: dict[tuple[float, float], np.ndarray] = {}
        for (a, b) in segs[group]:
            for p in (a, b):
                joints.setdefault((round(float(p[0]), 9), round(float(p[1]), 9)), p)
            d = b - a
            seg_len = float(np.hypot(d[0], d[1]))
            if seg_len < 1e-9:
                continue
            bar = kernel.box((0.0, -half, -depth_mm), (seg_len, half, OVERSHOOT_MM))
            angle = float(np.degrees(np.arctan2(d[1], d[0])))
            if angle != 0.0:
                bar = bar.rotate(cq.Vector(0, 0, 0), cq.Vector(0, 0, 1), angle)
            tools.append(bar.translate(cq.Vector(float(a[0]), float(a[1]), 0.0)))
        for p in joints.values():
            tools.append(kernel.cylinder(2, (float(p[0]), float(p[1]), -depth_mm), length, half))
        # All of a piece's tools in one boolean (fusing one by one grows quadratically,
        # kernel-notes); kernel.fuse insists on one solid, so each connected piece is one
        # call and the pieces, apart by construction, are gathered without a boolean.
        pieces.append(kernel.fuse(tools, part, "fuse label strokes"))
    return tuple(pieces)


def deboss(part_shape: cq.Shape, tool: cq.Shape, part: str, step: str,
           depth_mm: float | None = None) -> tuple[cq.Shape, float]:
    """Cut the engraving ``tool`` (from :func:`label_solid`) into ``part_shape``.

    Returns the cut part and the volume removed (mm3). The cut must remove exactly the
    tool's volume inside the part. With ``depth_mm`` (the depth the tool was made with)
    that volume is ``volume(tool) * depth / (depth + OVERSHOOT_MM)``, exact for a prism
    normal to a flat face, so a label hanging over an edge or into a curved face is
    refused; without it the inside volume is measured with a kernel intersection.
    """
    tool_vol = kernel.volume(tool)
    if depth_mm is not None:
        if depth_mm <= 0:
            raise ValueError(f"label depth must be positive, got {depth_mm} mm")
        inside = tool_vol * depth_mm / (depth_mm + OVERSHOOT_MM)
    else:
        try:
            common = tool.intersect(part_shape)
        except Exception as exc:  # OCCT raises bare Standard_Failure subclasses
            raise GeometryError(step, f"intersection failed: {exc}", part) from exc
        inside = kernel.volume(kernel.checked(common, part, step + " (tool inside part)",
                                              solids=None))
    before = kernel.volume(part_shape)
    # The label is the last cut into a part: leave its many small faces unmerged.
    out = kernel.cut(part_shape, [tool], part, step, volume_mm3=before - inside, clean=False)
    return out, before - kernel.volume(out)
