"""How a mold part goes onto the bed of a fused-filament (FDM) printer.

Input is one closed part mesh (``TriMesh``, mm, world frame, outward-wound). The planner picks
the face the part stands on, the turn about the vertical that makes it fit the bed, and reports
what is hard to print in that pose: downward surfaces that need support and walls thinner than
the printer lays down watertight.

Frames. A *print frame* is the world frame rotated so that the chosen ``down`` (a world unit
vector: the outward normal of the face put on the bed) points to -z, then turned by
``turn_deg`` counter-clockwise seen from above (right-handed about +z). Bed x and y are the
print-frame x and y; the bed is ``bed_mm[0]`` along x by ``bed_mm[1]`` along y. The part may
be shifted freely on the bed, so only its extents matter, not where it sits.

Candidate poses are the planes of the part's convex hull: a part resting on a flat bed always
touches it along a supporting plane, and the supporting planes that carry a real face of the
part (at least ``FLAT_MIN_AREA_MM2`` of its own facets) are the stable ones.

Overhang rule (common practice, 45 deg limit measured from the vertical): a downward surface
needs support when it leans further than ``overhang_deg`` from vertical, i.e. when it is
flatter than ``90 - overhang_deg`` from horizontal. With the print-frame outward normal ``n``
a facet tilted ``a`` from horizontal and facing down has ``n_z = -cos(a)``, so it needs
support when ``-n_z > sin(overhang_deg)``. Hand example at 45 deg: a face 30 deg from
horizontal has ``-n_z = cos 30 = 0.866 > sin 45 = 0.707`` and needs support; a face 60 deg
from horizontal has ``-n_z = cos 60 = 0.5`` and does not. Facets lying on the bed are not
overhang; downward facets inside closed cavities (ceilings that must be bridged) are.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from soft_molds.meshdata import TriMesh

from .findings import Finding, Severity, finding
from .rays import thickness_along_normals
from .surface import Surface

FLAT_MIN_AREA_MM2 = 25.0
"""A hull plane is a face to stand on only if this much of the part's own surface lies in it
(mm2): smaller contact patches tip over or let go of the bed."""

PLANE_TOL_MM = 0.01
"""A part facet lies in a hull plane when all its corners are this close to it (mm)."""

PLANE_TOL_DEG = 1.0
"""... and its normal is within this angle of the plane's normal (deg)."""

MAX_CANDIDATES = 8
"""At most this many flat faces (the largest) are tried as the face on the bed."""

FIT_TOL_MM = 1e-6
"""Slack when comparing extents against the bed and the height (float noise only, mm)."""

TURN_STEP_DEG = 0.1
"""Grid step of the turn search (deg); the first fitting step is refined by bisection."""

MIN_FACET_AREA_MM2 = 1e-6
"""Facets smaller than this (mm2) are slivers whose centroid rays are unreliable; the wall
measurement skips them."""

_MERGE_DEG = 0.01
"""Hull planes whose normals differ by less than this (deg) are one plane split by noise: a
convex body has a single supporting plane per normal."""

_BISECT_STEPS = 50
_ROUND = 6  # decimals (mm, mm2) before comparing, so float noise falls through to the order


@dataclass(frozen=True)
class Printer:
    """FDM printer limits (mm, deg). Defaults: 220 x 220 bed, 250 height, 0.4 nozzle,
    4 perimeters (common practice for watertight FDM walls), 45 deg overhang limit from
    vertical (common practice)."""

    bed_mm: tuple[float, float] = (220.0, 220.0)
    height_mm: float = 250.0
    nozzle_mm: float = 0.4
    perimeters: int = 4
    overhang_deg: float = 45.0

    @property
    def min_wall_mm(self) -> float:
        """Thinnest wall printed watertight: ``perimeters`` extrusion lines of nozzle width (mm)."""
        return self.nozzle_mm * self.perimeters


DEFAULT_PRINTER = Printer()


@dataclass(frozen=True)
class PrintPlan:
    """The chosen pose of one part on the bed and what it costs to print (mm, mm2, deg).

    ``down``: world-frame unit vector, the outward normal of the face put on the bed.
    ``turn_deg``: counter-clockwise turn about the print vertical applied after ``down`` is
    brought to -z; 0.0 when the axis-aligned footprint fits, otherwise the smallest angle in
    [0, 90) (square bed) or [0, 180) (non-square bed) that fits; when nothing fits, the turn
    that overflows the bed least. ``size_mm``: extents along bed x, bed y and height after the
    turn. ``contact_area_mm2``: area of part facets lying on the bed plane.
    ``overhang_area_mm2``: area of downward facets leaning further than ``overhang_deg`` from
    vertical (``-n_z > sin(overhang_deg)``, see the module docstring), bed facets excluded.
    ``min_wall_mm`` / ``min_wall_where_mm``: thinnest wall measured along facet normals on the
    world-frame mesh (independent of the pose) and the world-frame centroid of that facet;
    ``inf`` (and the bounding-box centre) when no ray hits. ``thin_wall_area_mm2``: facet
    area whose wall is below the printer's minimum wall.
    ``candidates``: every pose evaluated, in evaluation order, as plain dicts.
    """

    part: str
    down: tuple[float, float, float]
    turn_deg: float
    size_mm: tuple[float, float, float]
    fits: bool
    contact_area_mm2: float
    overhang_area_mm2: float
    min_wall_mm: float
    min_wall_where_mm: tuple[float, float, float]
    thin_wall_area_mm2: float
    candidates: tuple[dict, ...]


# --------------------------------------------------------------------------- 2-D fitting


def _hull_2d(points_xy: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Hull corner points (k, 2) and hull edge direction angles (deg) of 2-D points."""
    from scipy.spatial import ConvexHull, QhullError

    pts = np.asarray(points_xy, dtype=np.float64).reshape(-1, 2)
    if len(pts) == 0:
        raise ValueError("fit_turn_deg needs at least one point")
    try:
        ring = pts[ConvexHull(pts).vertices]
    except (QhullError, ValueError):
        # Collinear or coincident points: the extreme points along the line carry the
        # extents, and the line itself is the only edge direction.
        ring = pts
    e = np.roll(ring, -1, axis=0) - ring
    keep = np.hypot(e[:, 0], e[:, 1]) > 0
    ang = np.degrees(np.arctan2(e[keep, 1], e[keep, 0]))
    return ring, ang


def _extents(pts: np.ndarray, turns_deg: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Footprint widths along x and y (mm) of ``pts`` turned counter-clockwise by each angle."""
    t = np.radians(np.asarray(turns_deg, dtype=np.float64))
    c, s = np.cos(t)[:, None], np.sin(t)[:, None]
    x = pts[None, :, 0] * c - pts[None, :, 1] * s
    y = pts[None, :, 0] * s + pts[None, :, 1] * c
    return x.max(axis=1) - x.min(axis=1), y.max(axis=1) - y.min(axis=1)


def _period_deg(bed_mm: tuple[float, float]) -> float:
    # Extents repeat every 180 deg (a half turn only mirrors the footprint); a quarter turn
    # swaps them, which a square bed cannot tell apart.
    return 90.0 if abs(bed_mm[0] - bed_mm[1]) <= FIT_TOL_MM else 180.0


def _test_turns(edge_deg: np.ndarray, period: float) -> np.ndarray:
    """0 first, then the turns that square a hull edge with a bed side, then the grid."""
    grid = np.arange(0.0, period, TURN_STEP_DEG)
    edge = np.concatenate([-edge_deg, 90.0 - edge_deg]) % period
    edge = edge[edge < period]  # % can round up to the period itself
    return np.unique(np.concatenate([[0.0], edge, grid]))


def _fits(pts: np.ndarray, turns: np.ndarray, bed_mm: tuple[float, float]) -> np.ndarray:
    wx, wy = _extents(pts, turns)
    return (wx <= bed_mm[0] + FIT_TOL_MM) & (wy <= bed_mm[1] + FIT_TOL_MM)


def fit_turn_deg(points_xy: np.ndarray, bed_mm: tuple[float, float]) -> float | None:
    """Smallest rotation (deg, in [0, 90)) about the vertical that fits the 2-D points inside the bed rectangle, None if no rotation fits.

    ``points_xy`` (n, 2) mm in the print frame, turned counter-clockwise; the bed is
    ``bed_mm[0]`` along x by ``bed_mm[1]`` along y and the points may be shifted anywhere, so
    only their extents count (slack ``FIT_TOL_MM``). For a non-square bed a quarter turn is a
    different fit, so the search covers [0, 180) there. Tested turns: 0 first, then every turn
    that squares a hull edge with a bed side, then a ``TURN_STEP_DEG`` grid; the first fitting
    grid step is refined by bisection against the step before it.
    """  # noqa: E501
    ring, edge = _hull_2d(points_xy)
    bed = (float(bed_mm[0]), float(bed_mm[1]))
    turns = _test_turns(edge, _period_deg(bed))
    ok = _fits(ring, turns, bed)
    if not ok.any():
        return None
    first = int(np.argmax(ok))
    if first == 0:
        return float(turns[0])
    lo, hi = float(turns[first - 1]), float(turns[first])
    for _ in range(_BISECT_STEPS):
        mid = 0.5 * (lo + hi)
        if _fits(ring, np.array([mid]), bed)[0]:
            hi = mid
        else:
            lo = mid
    return hi


def _least_overflow_turn(points_xy: np.ndarray, bed_mm: tuple[float, float]
                         ) -> tuple[float, float]:
    """The tested turn (deg) whose footprint overflows the bed least, and that overflow (mm)."""
    ring, edge = _hull_2d(points_xy)
    turns = _test_turns(edge, _period_deg(bed_mm))
    wx, wy = _extents(ring, turns)
    over = np.round(np.maximum(wx - bed_mm[0], wy - bed_mm[1]), _ROUND)
    k = int(np.argmin(over))  # first minimum: the smallest such turn
    return float(turns[k]), float(over[k])


# --------------------------------------------------------------------------- 3-D poses


def _down_to_minus_z(down: np.ndarray) -> np.ndarray:
    """A deterministic rotation matrix (3, 3) taking unit vector ``down`` to (0, 0, -1)."""
    d = np.asarray(down, dtype=np.float64)
    d = d / np.linalg.norm(d)
    pre = np.eye(3)
    if d[2] > 0.0:
        # Near +z the shortest-arc formula divides by ~0; a half turn about x first brings
        # d into the lower half-space, where it is well conditioned.
        pre = np.diag([1.0, -1.0, -1.0])
        d = pre @ d
    t = np.array([0.0, 0.0, -1.0])
    v = np.cross(d, t)
    c = float(d @ t)  # >= 0 here
    k = np.array([[0.0, -v[2], v[1]], [v[2], 0.0, -v[0]], [-v[1], v[0], 0.0]])
    rot = np.eye(3) + k + (k @ k) / (1.0 + c)  # Rodrigues, shortest arc d -> t
    return rot @ pre


def print_rotation(down, turn_deg: float) -> np.ndarray:
    """The rotation matrix (3, 3) from the world frame to the print frame of a pose: ``down``
    (world unit vector, normalised here) brought to -z, then turned ``turn_deg``
    counter-clockwise about +z (see the module docstring). Apply as ``vertices @ R.T``."""
    t = math.radians(float(turn_deg))
    c, s = math.cos(t), math.sin(t)
    turn = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
    return turn @ _down_to_minus_z(np.asarray(down, dtype=np.float64))


def _hull_planes(hull) -> list[tuple[np.ndarray, float]]:
    """(unit outward normal, area mm2) of each plane of a convex hull, largest first."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components
    from scipy.spatial import cKDTree

    fn = np.asarray(hull.face_normals, dtype=np.float64)
    fa = np.asarray(hull.area_faces, dtype=np.float64)
    label = np.full(len(fn), -1, dtype=np.int64)
    for i, g in enumerate(hull.facets):
        label[np.asarray(g, dtype=np.int64)] = i
    single = np.flatnonzero(label < 0)
    label[single] = len(hull.facets) + np.arange(len(single))
    k = int(label.max()) + 1

    def weighted(lab: np.ndarray, count: int) -> tuple[np.ndarray, np.ndarray]:
        n = np.zeros((count, 3))
        np.add.at(n, lab, fn * fa[:, None])
        return n, np.bincount(lab, weights=fa, minlength=count)

    n, _ = weighted(label, k)
    n /= np.maximum(np.linalg.norm(n, axis=1, keepdims=True), 1e-300)
    # Join groups whose normals are within _MERGE_DEG (chord length on the unit sphere).
    pairs = cKDTree(n).query_pairs(2.0 * math.sin(math.radians(_MERGE_DEG) / 2.0),
                                   output_type="ndarray")
    adj = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(k, k))
    count, comp = connected_components(adj, directed=False)
    n, area = weighted(comp[label], count)
    ln = np.linalg.norm(n, axis=1)
    planes = [(n[i] / ln[i] + 0.0, float(area[i])) for i in range(count) if ln[i] > 0]
    planes.sort(key=lambda p: (-round(p[1], _ROUND), *np.round(p[0], 9)))
    return planes


def _on_plane(mesh: TriMesh, normals: np.ndarray, down: np.ndarray) -> np.ndarray:
    """Facets lying in the supporting plane whose outward normal is ``down`` (bool mask)."""
    offset = float((mesh.vertices @ down).max())
    gap = offset - mesh.triangles() @ down  # (m, 3) corner distances below the plane
    return ((normals @ down >= math.cos(math.radians(PLANE_TOL_DEG)))
            & (gap.max(axis=1) <= PLANE_TOL_MM))


def _evaluate(mesh: TriMesh, hull_vertices: np.ndarray, normals: np.ndarray,
              areas: np.ndarray, down: np.ndarray, printer: Printer) -> dict:
    rot = _down_to_minus_z(down)
    hv = hull_vertices @ rot.T
    height = float(hv[:, 2].max() - hv[:, 2].min())
    bed = (float(printer.bed_mm[0]), float(printer.bed_mm[1]))
    turn = fit_turn_deg(hv[:, :2], bed)
    footprint_ok = turn is not None
    if turn is None:
        turn, overflow = _least_overflow_turn(hv[:, :2], bed)
    else:
        overflow = 0.0
    wx, wy = _extents(hv[:, :2], np.array([turn]))
    contact = _on_plane(mesh, normals, down)
    # Print-frame n_z is n . (-down); a downward facet needs support when -n_z > sin(limit).
    steep = normals @ down > math.sin(math.radians(printer.overhang_deg)) + 1e-9
    overhang = steep & ~contact
    return {
        "down": [float(x) + 0.0 for x in down],
        "fits": bool(footprint_ok and height <= printer.height_mm + FIT_TOL_MM),
        "turn_deg": float(turn),
        "overhang_area_mm2": float(areas[overhang].sum()),
        "contact_area_mm2": float(areas[contact].sum()),
        "_size": (float(wx[0]), float(wy[0]), height),
        "_excess": max(height - printer.height_mm, overflow, 0.0),
    }


def _walls(surface: Surface, min_wall: float,
           ignore_boxes: Sequence[tuple[Sequence[float], Sequence[float]]] = ()
           ) -> tuple[float, tuple[float, float, float], float]:
    mesh, centroids, normals, areas = (surface.mesh, surface.centroids, surface.normals,
                                       surface.areas)
    keep = areas >= MIN_FACET_AREA_MM2
    for lo, hi in ignore_boxes:
        keep &= ~np.all((centroids >= np.asarray(lo)) & (centroids <= np.asarray(hi)), axis=1)
    th, _ = thickness_along_normals(surface.caster, centroids[keep], normals[keep])
    finite = np.isfinite(th)
    if not finite.any():
        lo, hi = mesh.bbox_mm()
        centre = tuple(0.5 * (a + b) for a, b in zip(lo, hi))
        return math.inf, centre, 0.0  # type: ignore[return-value]
    th_f = np.where(finite, th, np.inf)
    k = int(np.argmin(th_f))
    where = tuple(float(c) for c in centroids[keep][k])
    thin = float(areas[keep][th_f < min_wall].sum())
    return float(th_f[k]), where, thin  # type: ignore[return-value]


def plan_print(mesh: TriMesh, part: str, printer: Printer = DEFAULT_PRINTER,
               ignore_boxes: Sequence[tuple[Sequence[float], Sequence[float]]] = (),
               surface: Surface | None = None) -> PrintPlan:
    """Choose how ``part`` lies on the bed of ``printer`` (mesh in mm, world frame).

    ``ignore_boxes`` are world boxes (lo, hi) whose facets the wall check skips: the label
    cut into a face leaves thin ribs between its strokes that hold nothing back.
    ``surface``: ``mesh`` already prepared (facet data and ray index), to reuse; built here
    when not given.

    Candidates are the convex-hull planes carrying at least ``FLAT_MIN_AREA_MM2`` of the part's
    own facets (the ``MAX_CANDIDATES`` largest, largest contact first, ties by normal); if
    none does, the largest hull plane alone. Among fitting candidates the least overhang area
    wins, then the largest contact area, then candidate order; if none fits, the smallest
    overflow of the build volume (mm), then the least overhang, then order, with ``fits``
    False. Walls are measured once on the world-frame mesh.
    """
    if mesh.triangle_count == 0:
        raise ValueError(f"part {part!r} has no facets")
    hull = mesh.to_trimesh().convex_hull
    hull_vertices = np.asarray(hull.vertices, dtype=np.float64)
    if surface is None:
        surface = Surface(mesh)
    elif surface.mesh is not mesh:
        raise ValueError(f"part {part!r}: the surface given was prepared from another mesh")
    normals, areas = surface.normals, surface.areas

    planes = _hull_planes(hull)
    flat = []
    for n, a in planes:
        if a < FLAT_MIN_AREA_MM2:  # part facets in a hull plane cannot outweigh the plane
            continue
        ca = float(areas[_on_plane(mesh, normals, n)].sum())
        if ca >= FLAT_MIN_AREA_MM2:
            flat.append((n, ca))
    # Ties go to the pose closest to the part as modelled (down = world -z), then by normal.
    flat.sort(key=lambda p: (-round(p[1], _ROUND), round(float(p[0][2]), 9),
                             *np.round(p[0], 9)))
    downs = [n for n, _ in flat[:MAX_CANDIDATES]] or [planes[0][0]]

    evaluated = [_evaluate(mesh, hull_vertices, normals, areas, d, printer) for d in downs]
    fitting = [i for i, c in enumerate(evaluated) if c["fits"]]
    if fitting:
        best = min(fitting, key=lambda i: (round(evaluated[i]["overhang_area_mm2"], _ROUND),
                                           -round(evaluated[i]["contact_area_mm2"], _ROUND), i))
    else:
        best = min(range(len(evaluated)),
                   key=lambda i: (round(evaluated[i]["_excess"], _ROUND),
                                  round(evaluated[i]["overhang_area_mm2"], _ROUND), i))
    b = evaluated[best]
    wall, where, thin = _walls(surface, printer.min_wall_mm, ignore_boxes)
    public = ("down", "fits", "turn_deg", "overhang_area_mm2", "contact_area_mm2")
    return PrintPlan(
        part=part,
        down=tuple(b["down"]),
        turn_deg=b["turn_deg"],
        size_mm=b["_size"],
        fits=b["fits"],
        contact_area_mm2=b["contact_area_mm2"],
        overhang_area_mm2=b["overhang_area_mm2"],
        min_wall_mm=wall,
        min_wall_where_mm=where,
        thin_wall_area_mm2=thin,
        candidates=tuple({k: c[k] for k in public} for c in evaluated),
    )


# --------------------------------------------------------------------------- findings


def _vec(v) -> str:
    return "(" + ", ".join(f"{x:.3g}" for x in v) + ")"


def print_findings(plan: PrintPlan, printer: Printer) -> list[Finding]:
    """Findings for one print plan: build volume, flat face, wall thickness, overhang.

    ``build-volume`` error when no pose fits (value: the extent that overflows most, mm, limit:
    that axis' limit, mm) or info when it fits only turned (value: turn, deg); ``flat-face``
    warning when the bed contact is under ``FLAT_MIN_AREA_MM2`` (mm2); ``print-wall`` warning
    when the thinnest wall is under ``printer.min_wall_mm`` (mm, at a world-frame point);
    ``overhang`` info with the supported area (mm2).
    """
    out: list[Finding] = []
    bx, by = printer.bed_mm
    sx, sy, sz = plan.size_mm
    bed = f"{bx:g} x {by:g} mm bed"
    if not plan.fits:
        limits = (bx, by, printer.height_mm)
        k = int(np.argmax([s - lim for s, lim in zip(plan.size_mm, limits)]))
        out.append(finding(
            "build-volume", Severity.ERROR, plan.part,
            f"fits in none of {len(plan.candidates)} poses on a {bed}, {printer.height_mm:g} mm"
            f" high; the closest (down {_vec(plan.down)}, turned {plan.turn_deg:.1f} deg)"
            f" needs {sx:.1f} x {sy:.1f} x {sz:.1f} mm",
            value=plan.size_mm[k], limit=limits[k]))
    elif plan.turn_deg > 0.0:
        out.append(finding(
            "build-volume", Severity.INFO, plan.part,
            f"fits the {bed} only turned {plan.turn_deg:.1f} deg about the vertical"
            f" (footprint {sx:.1f} x {sy:.1f} mm, height {sz:.1f} mm)",
            value=plan.turn_deg))
    if plan.contact_area_mm2 < FLAT_MIN_AREA_MM2:
        out.append(finding(
            "flat-face", Severity.WARNING, plan.part,
            f"no face of {FLAT_MIN_AREA_MM2:g} mm2 or more to stand on; the largest hull plane"
            f" (down {_vec(plan.down)}) touches the bed over {plan.contact_area_mm2:.1f} mm2",
            value=plan.contact_area_mm2, limit=FLAT_MIN_AREA_MM2))
    if plan.min_wall_mm < printer.min_wall_mm:
        out.append(finding(
            "print-wall", Severity.WARNING, plan.part,
            f"thinnest wall {plan.min_wall_mm:.2f} mm is under {printer.min_wall_mm:.2f} mm"
            f" ({printer.perimeters} x {printer.nozzle_mm:g} mm perimeters) over"
            f" {plan.thin_wall_area_mm2:.1f} mm2 of surface",
            value=plan.min_wall_mm, limit=printer.min_wall_mm, where=plan.min_wall_where_mm))
    if plan.overhang_area_mm2 > 0.0:
        out.append(finding(
            "overhang", Severity.INFO, plan.part,
            f"{plan.overhang_area_mm2:.1f} mm2 of downward surface is flatter than"
            f" {90.0 - printer.overhang_deg:g} deg from horizontal and needs support or bridging",
            value=plan.overhang_area_mm2))
    return out
