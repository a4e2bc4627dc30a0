"""Pictures of a variant's mold set for the person assembling it at the bench: an exploded
view and a cut-away view (PNG; SVG is left out: ten thousand triangles make megabytes of
it), and the offline 3-D preview page (:func:`preview_html`, viewer in ``preview.js``).

Frames: everything is drawn in the *view frame* (mm): (x, v, w) where x is the world x
(the body's long axis), w the pour orientation's up (the parting axis) and v = w x x, so
the frame is right-handed and the mold always stands with its pour side up. Meshes are
decimated first (vertex clustering on a grid, numpy only, deterministic) to at most
:data:`TRIANGLES_PER_PART` triangles each, so a picture costs well under a second per part.

Exploded view: the cast stays in place, the core is drawn out along its pull direction
until it clears the cast, and each shell is moved along its pull until it clears the cast
and the core (:func:`explode_offsets`). Cut-away view: every part is clipped by the
section plane through the middle of the core that holds x and w (the body's long axis and
the parting axis), the half nearer the viewer removed, so the core inside the cavity shows;
the sprue and vents are drawn as marked lines from the cavity up through the upper block.
The cut-away's long triangles are split before drawing (:func:`split_long`): the painter's
sort orders whole polygons by mean depth, which a long sliver beside small ones defeats
where parts nest (the exploded parts stand apart, so their triangles are drawn as they are).

Pictures are drawn on a private matplotlib Figure with the Agg canvas,
the built-in default style, fixed size and dpi and no date or software stamp, so the same
build gives the same bytes.
"""

from __future__ import annotations

import base64
import html
import io
import json
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

import matplotlib as mpl
import matplotlib.style
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.typing import RcKeyType

from ..constants import ROLE_COLOURS
from ..meshdata import TriMesh
from .manifest import Manifest

TRIANGLES_PER_PART = 3000
SPLIT_PER_SIZE = 12.0  # the cut-away's triangles: edges under 1/12 of the set's size
GAP_FRACTION = 0.12  # clearance between exploded parts, as a fraction of the set's size
PICTURE_IN = (8.0, 5.6)
PICTURE_DPI = 100
#: Colours by role: :data:`soft_molds.constants.ROLE_COLOURS`; a second shell is drawn a
#: shade darker.
OTHER_COLOUR = "#b0b0b0"
OPENING_COLOURS = {"sprue": "#c62828", "vent": "#1565c0"}
_RC: dict[RcKeyType, object] = {
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans"],  # bundled with matplotlib
    "text.parse_math": False,
    "text.usetex": False,
    "path.simplify": False,
}
_LIGHT = np.array([-0.35, -0.55, 0.76])  # view frame; from the front, left and above


@dataclass(frozen=True, eq=False)
class ViewPart:
    """One part ready to draw: name, role, decimated mesh and pull direction, all in the
    view frame (mm; ``pull`` a unit vector or None for the cast)."""

    name: str
    role: str
    mesh: TriMesh
    pull: tuple[float, float, float] | None


@dataclass(frozen=True)
class ViewOpening:
    """A sprue or vent in the view frame: kind, mouth centre (mm), diameter (mm)."""

    kind: str
    at: tuple[float, float, float]
    diameter_mm: float


def view_rotation(up: Sequence[float]) -> np.ndarray:
    """Rows x, v, w of the view frame in world coordinates (see the module doc)."""
    w = np.asarray(up, dtype=float)
    w = w / np.linalg.norm(w)
    x = np.array([1.0, 0.0, 0.0])
    x = x - w * float(x @ w)
    x = x / np.linalg.norm(x)
    return np.vstack([x, np.cross(w, x), w])


def decimate(mesh: TriMesh, max_triangles: int = TRIANGLES_PER_PART) -> TriMesh:
    """``mesh`` with its vertices clustered on a cubic grid (each cluster replaced by its
    mean) and the triangles that collapse dropped, the grid coarsened by 1.15 per try
    until at most ``max_triangles`` remain; unchanged when already small enough.
    Deterministic: clusters are numbered in sorted cell order."""
    if mesh.triangle_count <= max_triangles:
        return mesh
    v, f = mesh.vertices, mesh.faces
    lo = v.min(axis=0)
    size = float(np.max(v.max(axis=0) - lo))
    cell = size / (4.0 * np.sqrt(max_triangles))
    while True:
        k = np.floor((v - lo) / cell).astype(np.int64)
        n = k.max(axis=0) + 1
        # one integer per cell (x-major), so the sort is over a flat array
        cells, inverse = np.unique((k[:, 0] * n[1] + k[:, 1]) * n[2] + k[:, 2],
                                   return_inverse=True)
        inverse = inverse.reshape(-1)
        g = inverse[f]
        keep = (g[:, 0] != g[:, 1]) & (g[:, 1] != g[:, 2]) & (g[:, 0] != g[:, 2])
        g = g[keep]
        # a triangle met twice (same corners, any order) is kept once
        _, first = np.unique(np.sort(g, axis=1), axis=0, return_index=True)
        g = g[np.sort(first)]
        if len(g) <= max_triangles:
            sums = np.zeros((len(cells), 3))
            np.add.at(sums, inverse, v)
            counts = np.bincount(inverse, minlength=len(cells)).astype(float)
            return TriMesh(sums / counts[:, None], g)
        cell *= 1.15


def view_parts(man: Manifest, meshes: Mapping[str, TriMesh],
               max_triangles: int = TRIANGLES_PER_PART) -> list[ViewPart]:
    """The manifest's parts (in its order) decimated and turned into the view frame."""
    rot = view_rotation(man.pour.up)
    out = []
    for rec in man.parts:
        m = decimate(meshes[rec.name], max_triangles)
        pull = None if rec.pull_dir is None else tuple(
            float(round(c, 12)) + 0.0 for c in rot @ np.asarray(rec.pull_dir))
        out.append(ViewPart(rec.name, rec.role, TriMesh(m.vertices @ rot.T, m.faces),
                            pull))  # type: ignore[arg-type]
    return out


def view_openings(man: Manifest) -> list[ViewOpening]:
    rot = view_rotation(man.pour.up)
    return [ViewOpening(str(o.kind), tuple(float(c) for c in rot @ np.asarray(o.at_mm)),  # type: ignore[arg-type]
                        o.diameter_mm) for o in man.pour.openings]


def _extent(parts: Sequence[ViewPart]) -> float:
    allv = np.vstack([p.mesh.vertices for p in parts])
    return float(np.max(allv.max(axis=0) - allv.min(axis=0)))


def explode_offsets(parts: Sequence[ViewPart], gap_mm: float | None = None
                    ) -> dict[str, np.ndarray]:
    """Per part, the shift (mm, view frame) of the exploded view: parts without a pull
    (the cast) stay; the others, cores before shells, each move along their pull until
    the part's span along the pull starts ``gap_mm`` past the farthest span of every part
    already placed (the cast, then the cores as moved and as assembled). ``gap_mm``
    defaults to :data:`GAP_FRACTION` of the set's size."""
    gap = GAP_FRACTION * _extent(parts) if gap_mm is None else gap_mm
    offsets = {p.name: np.zeros(3) for p in parts}
    placed: list[np.ndarray] = [p.mesh.vertices for p in parts if p.pull is None]
    order = sorted((p for p in parts if p.pull is not None),
                   key=lambda p: (p.role == "shell", p.name))
    cores_moved: list[np.ndarray] = []
    for p in order:
        d = np.asarray(p.pull)
        others = placed if p.role != "shell" else placed + cores_moved
        if not others:
            continue
        reach = max(float(np.max(o @ d)) for o in others)
        shift = reach - float(np.min(p.mesh.vertices @ d)) + gap
        offsets[p.name] = d * max(shift, 0.0)
        if p.role != "shell":
            cores_moved += [p.mesh.vertices, p.mesh.vertices + offsets[p.name]]
    return offsets


def part_colours(parts: Sequence[ViewPart]) -> dict[str, str]:
    """Colour (#rrggbb) of each part by role; a second part of a role a shade darker."""
    seen: dict[str, int] = {}
    out = {}
    for p in parts:
        base = ROLE_COLOURS.get(p.role, OTHER_COLOUR)
        k = seen.get(p.role, 0)
        seen[p.role] = k + 1
        rgb = np.array([int(base[i:i + 2], 16) for i in (1, 3, 5)], dtype=float)
        rgb = rgb * (0.82 ** k)
        out[p.name] = "#" + "".join(f"{int(round(c)):02x}" for c in rgb)
    return out


def _shaded(tris: np.ndarray, colour: str) -> np.ndarray:
    """RGBA per triangle: ``colour`` lit by :data:`_LIGHT` (two-sided, so the inside of a
    cut part shows lit)."""
    n = np.cross(tris[:, 1] - tris[:, 0], tris[:, 2] - tris[:, 0])
    n /= np.maximum(np.linalg.norm(n, axis=1, keepdims=True), 1e-12)
    lit = 0.45 + 0.55 * np.abs(n @ (_LIGHT / np.linalg.norm(_LIGHT)))
    rgb = np.array([int(colour[i:i + 2], 16) / 255.0 for i in (1, 3, 5)])
    out = np.ones((len(tris), 4))
    out[:, :3] = np.clip(lit[:, None] * rgb[None, :], 0.0, 1.0)
    return out


def clip_half(tris: np.ndarray, v_cut: float) -> list[np.ndarray]:
    """The parts of triangles (m, 3, 3) on the side v >= ``v_cut`` (view frame), as
    polygons of 3 or 4 corners (Sutherland-Hodgman against one plane)."""
    side = tris[:, :, 1] >= v_cut
    out = list(tris[side.all(axis=1)])
    for t in tris[side.any(axis=1) & ~side.all(axis=1)]:
        poly = []
        for i in range(3):
            a, b = t[i], t[(i + 1) % 3]
            ia, ib = a[1] >= v_cut, b[1] >= v_cut
            if ia:
                poly.append(a)
            if ia != ib:
                s = (v_cut - a[1]) / (b[1] - a[1])
                poly.append(a + s * (b - a))
        out.append(np.array(poly))
    return out


def triangulated(polys: Sequence[np.ndarray]) -> np.ndarray:
    """Polygons of 3 or 4 corners (convex, as :func:`clip_half` gives) as triangles
    (m, 3, 3), a quad split along its first diagonal."""
    out = [p[[0, 1, 2]] for p in polys] + [p[[0, 2, 3]] for p in polys if len(p) == 4]
    return np.array(out).reshape(-1, 3, 3)


def split_long(tris: np.ndarray, max_edge_mm: float) -> np.ndarray:
    """``tris`` (m, 3, 3) with every triangle whose longest edge exceeds ``max_edge_mm``
    cut in two at that edge's midpoint, repeatedly (a long sliver becomes a row of short
    ones); same surface, same winding."""
    done = []
    while len(tris):
        e = np.linalg.norm(tris - np.roll(tris, -1, axis=1), axis=2)  # edge i: i -> i+1
        long = e.max(axis=1) > max_edge_mm
        done.append(tris[~long])
        t, i = tris[long], e[long].argmax(axis=1)
        r = np.arange(len(t))
        a, b, c = t[r, i], t[r, (i + 1) % 3], t[r, (i + 2) % 3]
        m = (a + b) / 2.0
        tris = np.concatenate([np.stack((a, m, c), axis=1), np.stack((m, b, c), axis=1)])
    return np.concatenate(done) if done else tris


def _png(fig: Figure) -> bytes:
    png = io.BytesIO()
    FigureCanvasAgg(fig).print_figure(png, format="png", dpi=PICTURE_DPI,
                                      metadata={"Software": None})
    return png.getvalue()


def _draw(polys: Sequence[np.ndarray], colours: list[np.ndarray],
          labels: Sequence[tuple[str, np.ndarray]], lines: Sequence[tuple[str, str,
          np.ndarray, np.ndarray]], title: str, elev: float, azim: float
          ) -> bytes:
    from mpl_toolkits.mplot3d import Axes3D
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    tris = np.concatenate(polys)
    allv = np.vstack([tris.reshape(-1, 3)] + [np.vstack([a, b]) for _, _, a, b in lines])
    lo, hi = allv.min(axis=0), allv.max(axis=0)
    with matplotlib.style.context("default"), mpl.rc_context(_RC):
        fig = Figure(figsize=PICTURE_IN)
        ax = Axes3D(fig, rect=(0.0, 0.0, 1.0, 0.93), computed_zorder=False)
        fig.add_axes(ax)
        ax.set_xlim(lo[0], hi[0])
        ax.set_ylim(lo[1], hi[1])
        ax.set_zlim(lo[2], hi[2])
        ax.set_autoscale_on(False)  # the limits above hold every polygon and line
        # One collection for every part: the painter's sort is then over all triangles.
        col = np.vstack(colours)
        pc = Poly3DCollection(tris, facecolors=col, edgecolors=col, linewidths=0.3,
                              zsort="average")
        pc.set_zorder(1)
        pc.set_clip_on(False)  # the zoomed set may reach past the 3-D axes' square box
        ax.add_collection3d(pc)
        for kind, word, a, b in lines:
            ax.plot([a[0], b[0]], [a[1], b[1]], [a[2], b[2]], color=OPENING_COLOURS.get(
                kind, "black"), lw=2.2, zorder=5, clip_on=False)
            ax.text(b[0], b[1], b[2], f" {word}", fontsize=7, zorder=6,
                    color=OPENING_COLOURS.get(kind, "black"), ha="left", va="bottom")
        for name, at in labels:
            ax.text(at[0], at[1], at[2], name, fontsize=9, ha="center", va="center",
                    zorder=10, bbox={"boxstyle": "round,pad=0.2", "fc": "white",
                                     "ec": "#555555", "alpha": 0.85})
        ax.set_box_aspect(tuple(float(x) for x in np.maximum(hi - lo, 1e-6)), zoom=1.2)
        ax.view_init(elev=elev, azim=azim)
        ax.set_axis_off()
        fig.suptitle(title, fontsize=10)
        return _png(fig)


def _label_at(p: ViewPart, shift: np.ndarray, verts: np.ndarray | None = None) -> np.ndarray:
    """Where a part's name goes: its box centre, moved to the box face its pull points at
    (the shell's back, the core's grip end; a shell's name toward its +x end), then
    shifted with the part."""
    v = p.mesh.vertices if verts is None else verts
    lo, hi = v.min(axis=0), v.max(axis=0)
    c = (lo + hi) / 2.0
    if p.pull is not None:
        d = np.asarray(p.pull)
        c = c + d * 0.5 * float(np.abs(hi - lo) @ np.abs(d))
    if p.role == "shell":
        c[0] = lo[0] + 0.8 * (hi[0] - lo[0])  # off the middle, where the sprue rises
    return c + shift


def exploded_view(parts: Sequence[ViewPart], title: str) -> bytes:
    """PNG of the exploded set (see :func:`explode_offsets`)."""
    offsets = explode_offsets(parts)
    colours = part_colours(parts)
    polys, cols, labels = [], [], []
    for p in parts:
        tris = p.mesh.triangles() + offsets[p.name]
        polys.append(tris)
        cols.append(_shaded(tris, colours[p.name]))
        labels.append((p.name, _label_at(p, offsets[p.name])))
    return _draw(polys, cols, labels, [], f"{title}: exploded (parts drawn apart along "
                 "their pull directions)", elev=24.0, azim=-58.0)


def section_v(parts: Sequence[ViewPart]) -> float:
    """Where the cut-away's section plane lies (v, mm): through the middle of the core, so
    it shows inside the cavity, else of the cast, else of the set."""
    for role in ("core", "cast"):
        inside = [p for p in parts if p.role == role]
        if inside:
            break
    else:
        inside = list(parts)
    v = np.vstack([p.mesh.vertices for p in inside])[:, 1]
    return float((v.min() + v.max()) / 2.0)


def cutaway_view(parts: Sequence[ViewPart], openings: Sequence[ViewOpening],
                 title: str) -> bytes:
    """PNG of the assembled set cut by the section plane (see the module doc)."""
    v_cut = section_v(parts)
    colours = part_colours(parts)
    longest = _extent(parts) / SPLIT_PER_SIZE
    polys: list[np.ndarray] = []
    cols, labels = [], []
    top = max(float(p.mesh.vertices[:, 2].max()) for p in parts)
    for p in parts:
        kept = split_long(triangulated(clip_half(p.mesh.triangles(), v_cut)), longest)
        if not len(kept):
            continue
        polys.append(kept)
        cols.append(_shaded(kept, colours[p.name]))
        labels.append((p.name, _label_at(p, np.zeros(3), kept.reshape(-1, 3))))
    lines = []
    for o in openings:
        a = np.array(o.at)
        b = np.array([a[0], a[1], top + 0.08 * (top - a[2] + 1.0)])
        lines.append((o.kind, f"{o.kind} {o.diameter_mm:g} mm", a, b))
    return _draw(polys, cols, labels, lines, f"{title}: cut away at the section through "
                 "the core (parts as assembled)", elev=18.0, azim=-74.0)


PREVIEW_SCRIPT = "preview.js"  # shipped beside this module
_PAGE_STYLE = ("body{font-family:sans-serif;margin:1em;color:#111}#view{border:1px solid #888;"
               "touch-action:none;cursor:grab}#controls label{margin-right:1.2em;"
               "white-space:nowrap}.swatch{display:inline-block;width:.9em;height:.9em;"
               "margin:0 .3em;border:1px solid #555;vertical-align:middle}")


def _b64(a: np.ndarray) -> str:
    return base64.b64encode(np.ascontiguousarray(a).tobytes()).decode("ascii")


def preview_data(parts: Sequence[ViewPart]) -> dict[str, object]:
    """The preview page's data (JSON-shaped): per part its name, role, colour, explode
    offset and label point (mm, view frame, 1e-3), vertices quantised to uint16 over the
    set's box and face indices, as base64 of little-endian arrays."""
    offsets = explode_offsets(parts)
    colours = part_colours(parts)
    allv = np.vstack([p.mesh.vertices for p in parts])
    lo = allv.min(axis=0)
    span = np.maximum(allv.max(axis=0) - lo, 1e-9)
    moved = np.vstack([p.mesh.vertices + offsets[p.name] for p in parts] + [allv])
    centre = (moved.min(axis=0) + moved.max(axis=0)) / 2.0
    radius = float(np.max(np.linalg.norm(moved - centre, axis=1)))
    out = []
    for p in parts:
        q = np.rint((p.mesh.vertices - lo) / span * 65535.0).astype("<u2")
        wide = p.mesh.vertices.shape[0] > 65535
        out.append({"name": p.name, "role": p.role, "colour": colours[p.name],
                    "offset_mm": _rounded(offsets[p.name]),
                    "label_mm": _rounded(_label_at(p, np.zeros(3))),
                    "vertices": _b64(q), "index_bytes": 4 if wide else 2,
                    "faces": _b64(p.mesh.faces.astype("<u4" if wide else "<u2")),
                    "triangles": p.mesh.triangle_count})
    return {"box_lo": _rounded(lo, 6), "box_span": _rounded(span, 6),
            "centre_mm": _rounded(centre), "radius_mm": round(radius, 3), "parts": out}


def _rounded(v: np.ndarray, nd: int = 3) -> list[float]:
    return [round(float(x), nd) + 0.0 for x in v]


def preview_html(parts: Sequence[ViewPart], title: str) -> bytes:
    """A self-contained HTML page (no network) showing ``parts`` in 3-D: drag to turn,
    a slider to explode the set, a checkbox per part to hide it."""
    data = json.dumps(preview_data(parts), sort_keys=True, separators=(",", ":"))
    script = (resources.files(__package__) / PREVIEW_SCRIPT).read_text(encoding="utf-8")
    e = html.escape
    page = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(title)}: 3-D preview</title><style>{_PAGE_STYLE}</style></head><body>",
        f"<h1>{e(title)}: 3-D preview</h1>",
        "<p>Drag the picture to turn the set. The slider draws the parts apart along the "
        "directions they leave the cast; the boxes hide parts. Meshes are simplified for "
        "the screen: print from the STL files.</p>",
        '<div id="controls"><label>explode <input id="explode" type="range" min="0" '
        'max="100" value="100"></label><span id="parts"></span></div>',
        '<canvas id="view" width="900" height="600"></canvas>',
        # "</" cannot occur in JSON text but for strings; escaped so no name ends the tag
        '<script type="application/json" id="mold-data">'
        + data.replace("</", "<\\/") + "</script>",
        f"<script>\n{script}</script>", "</body></html>"]
    return ("\n".join(page) + "\n").encode("utf-8")


EXPLODED_PNG = "assembly-exploded.png"
CUTAWAY_PNG = "assembly-cutaway.png"
PREVIEW_HTML = "preview.html"


@dataclass(frozen=True)
class Picture:
    """A picture for the casting card: its file name, a caption and the PNG bytes."""

    file: str
    caption: str
    png: bytes


CAPTIONS = {
    EXPLODED_PNG: "Exploded: the shells drawn apart along their pull directions, the core "
                  "drawn out along its pull, the cast in place.",
    CUTAWAY_PNG: "Cut away: the assembled mold cut through the sprue, showing the core "
                 "inside the cavity and the sprue and vents reaching the top.",
}


def variant_pictures(man: Manifest, meshes: Mapping[str, TriMesh]
                     ) -> tuple[tuple[Picture, ...], bytes]:
    """The exploded and cut-away pictures of one variant and its preview page."""
    parts = view_parts(man, meshes)
    title = f"{man.recipe} {man.label}"
    pictures = (Picture(EXPLODED_PNG, CAPTIONS[EXPLODED_PNG], exploded_view(parts, title)),
                Picture(CUTAWAY_PNG, CAPTIONS[CUTAWAY_PNG],
                        cutaway_view(parts, view_openings(man), title)))
    return pictures, preview_html(parts, title)


def read_pictures(folder: Path, link: str = "") -> tuple[Picture, ...]:
    """The pictures a build wrote in ``folder`` (a variant's output folder), those that are
    there, each named ``link`` + its file name (how a card elsewhere links to it)."""
    out = []
    for name, caption in CAPTIONS.items():
        try:
            png = (folder / name).read_bytes()
        except OSError:
            continue
        out.append(Picture(link + name, caption, png))
    return tuple(out)
