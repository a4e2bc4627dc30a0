"""Print plates as files: one 3MF per bed (:mod:`soft_molds.export.threemf`) and a top-view
PNG of it beside, named ``plate-<n>.3mf`` and ``plate-<n>.png`` (n from 1).

The parts come posed and packed by :mod:`soft_molds.analysis.plates`; each object is named
after its part and variant label (``shell-upper B``). The picture shows the bed (mm, bed
frame: origin at the lower-left corner, seen from above) with each part's footprint outline
(the convex hull of its vertices) and its name. It is drawn on a private matplotlib Figure
through the Agg canvas with the built-in default style and no date or software stamp, so
the same plate gives the same bytes.
"""

from __future__ import annotations

import io
from collections.abc import Mapping, Sequence

import matplotlib as mpl
import matplotlib.style
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.patches import Polygon, Rectangle
from matplotlib.typing import RcKeyType

from ..analysis.plates import PlateItem, PlateSet, pack_plates, placed_vertices, posed_vertices
from ..meshdata import TriMesh
from .manifest import Manifest
from .threemf import PlacedMesh, encode_3mf

PICTURE_IN = 6.0  # longer side of the picture (inches)
PICTURE_DPI = 100
_RC: dict[RcKeyType, object] = {
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans"],  # bundled with matplotlib
    "text.parse_math": False,
    "text.usetex": False,
    "path.simplify": False,
}


def plate_name(plate: int, suffix: str, stem: str = "plate") -> str:
    """File name of plate ``plate`` (0-based) with ``suffix`` (``3mf``, ``png``)."""
    return f"{stem}-{plate + 1}.{suffix}"


def variant_items(man: Manifest, meshes: Mapping[str, TriMesh]) -> list[PlateItem]:
    """The printable parts of one variant in their print pose (manifest ``print`` records),
    in manifest part order; parts without a print record are not printed."""
    out = []
    for rec in man.parts:
        pose = man.prints.get(rec.name)
        if not rec.printable or pose is None:
            continue
        out.append(PlateItem(man.label, rec.name,
                             posed_vertices(meshes[rec.name].vertices, pose.down,
                                            pose.turn_deg)))
    return out


def plate_files(groups: Sequence[Sequence[PlateItem]], faces: Mapping[tuple[str, str],
                np.ndarray], bed_mm: tuple[float, float], title: str, stem: str = "plate"
                ) -> tuple[PlateSet, dict[str, bytes]]:
    """Pack ``groups`` onto beds of ``bed_mm`` and encode every plate as 3MF and PNG, named
    ``<stem>-<n>``. ``faces`` maps (group, part) to the part's triangle indices into its
    vertices."""
    plates = pack_plates(groups, bed_mm)
    items = {(it.group, it.part): it for g in groups for it in g}
    files: dict[str, bytes] = {}
    for k in range(plates.plate_count):
        placed = []
        for p in plates.on_plate(k):
            key = (p.group, p.part)
            placed.append(PlacedMesh(f"{p.part} {p.group}", placed_vertices(items[key], p),
                                     faces[key]))
        head = f"{title} plate {k + 1} of {plates.plate_count}"
        files[plate_name(k, "3mf", stem)] = encode_3mf(placed, head)
        files[plate_name(k, "png", stem)] = plate_picture(placed, plates.bed_mm, head)
    return plates, files


def variant_plate_files(man: Manifest, meshes: Mapping[str, TriMesh],
                        bed_mm: tuple[float, float]) -> dict[str, bytes]:
    """The plates of one variant: its printable parts, together where they fit one bed."""
    items = variant_items(man, meshes)
    faces = {(man.label, it.part): meshes[it.part].faces for it in items}
    _, files = plate_files([items], faces, bed_mm, f"{man.recipe} {man.label}")
    return files


def family_plate_files(members: Sequence[tuple[Manifest, Mapping[str, TriMesh]]],
                       title: str, stem: str) -> tuple[PlateSet | None, dict[str, bytes]]:
    """The plates of a family: every member's (manifest, part meshes) printable parts,
    members in the order given and each on one bed where it fits. Members are packed on
    the first member's bed; a family whose members name different beds gets no plates
    (None), as does one with no member."""
    if not members:
        return None, {}
    beds = {m.params.bed_mm for m, _ in members}
    if len(beds) != 1:
        return None, {}
    groups = [variant_items(m, meshes) for m, meshes in members]
    faces = {(m.label, it.part): meshes[it.part].faces
             for (m, meshes), g in zip(members, groups) for it in g}
    return plate_files(groups, faces, beds.pop(), title, stem)


def indexed_mesh(soup: TriMesh) -> TriMesh:
    """A triangle soup (as read from STL) with equal corners joined into shared vertices
    (sorted), so each 3MF object is one connected mesh; corners are compared exactly.
    A facet whose corners join into fewer than three vertices has no area and is kept
    (its count must stay the STL's)."""
    verts, inverse = np.unique(soup.vertices, axis=0, return_inverse=True)
    return TriMesh(verts, inverse.reshape(-1)[soup.faces])


def plate_picture(meshes: Sequence[PlacedMesh], bed_mm: tuple[float, float],
                  title: str) -> bytes:
    """PNG of one plate seen from above: the bed, each footprint outline and its name."""
    bx, by = bed_mm
    scale = PICTURE_IN / max(bx, by)
    with matplotlib.style.context("default"), mpl.rc_context(_RC):
        fig = Figure(figsize=(bx * scale + 0.6, by * scale + 0.9))
        ax = fig.add_axes((0.3 / (bx * scale + 0.6), 0.3 / (by * scale + 0.9),
                           bx * scale / (bx * scale + 0.6), by * scale / (by * scale + 0.9)))
        ax.add_patch(Rectangle((0.0, 0.0), bx, by, fill=False, lw=1.2, ec="black"))
        for m in meshes:
            ring = _outline(np.asarray(m.vertices)[:, :2])
            ax.add_patch(Polygon(ring, closed=True, fc="#cfd8dc", ec="#37474f", lw=0.8))
            cx, cy = ring.mean(axis=0)
            w, h = ring.max(axis=0) - ring.min(axis=0)
            ax.text(cx, cy, m.name, ha="center", va="center", fontsize=8,
                    rotation=90.0 if h > 1.5 * w else 0.0)
        ax.set_xlim(0.0, bx)
        ax.set_ylim(0.0, by)
        ax.set_aspect("equal")
        ax.tick_params(labelsize=7)
        fig.suptitle(f"{title} ({bx:g} x {by:g} mm bed, seen from above)", fontsize=9)
        png = io.BytesIO()
        FigureCanvasAgg(fig).print_figure(png, format="png", dpi=PICTURE_DPI,
                                          metadata={"Software": None})
    return png.getvalue()


def _outline(xy: np.ndarray) -> np.ndarray:
    """Convex hull corners (k, 2) of 2-D points, counter-clockwise."""
    from scipy.spatial import ConvexHull

    return xy[ConvexHull(xy).vertices]
