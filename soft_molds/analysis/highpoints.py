"""Where air collects when liquid silicone is poured into a mold, and where to open it.

Input is the *cast part* mesh: the silicone body including its internal voids (the spaces the
core occupies), wound so that normals point out of the silicone. Frame: millimetres; ``up`` is
the unit pour direction (default +z), heights are ``vertex · up``.

Model. A facet whose outward normal points upward (``n·up > 0.1``) is a ceiling for the liquid
beneath it; a facet with ``n·up > -0.1`` (ceilings and walls) is one a rising bubble can slide
along. Facets facing down (floors, where silicone lies above) are not traversable: a bubble
leaves the surface there and rises freely through the liquid. Air is trapped where the
traversable surface offers no way up: a local maximum of height on the graph of traversable
edges. Small bumps of the tessellation are ignored by 0-dimensional persistence (a maximum
counts only if it stands at least ``persistence_mm`` above the saddle where its region joins a
higher one), and a maximum counts only if the flat-ish region around it (its *plateau*, within
``plateau_mm`` of the peak) touches a genuine ceiling, because the top rim of a wall with
nothing over it (e.g. the upper edge of a core's side wall) lets the bubble go on rising.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from soft_molds.meshdata import TriMesh

TRAVERSABLE_MIN_UP = -0.1
"""Facets with ``n·up`` above this guide a rising bubble (ceilings and walls)."""

CEILING_MIN_UP = 0.1
"""Facets with ``n·up`` above this hold a bubble against them (ceilings)."""

SERVE_RADIAL_SLACK_MM = 0.05
"""Extra radius when deciding whether an opening reaches a plateau vertex (float noise)."""

SERVE_HEIGHT_SLACK_MM = 0.5
"""Extra height band, beyond ``plateau_mm``, within which an opening reaches a plateau."""

# Distances are rounded to this before tie-breaking, so that mirror-symmetric candidates that
# differ only by float noise fall back to the coordinate order instead of noise.
_TIE_MM = 1e-9


@dataclass(frozen=True)
class HighPoint:
    """A place where air gathers under a ceiling of the cavity (mm, world frame).

    ``position_mm`` is the plateau vertex nearest the plateau's centroid, ``height_mm`` the
    peak height along ``up``, ``plateau_mm`` the (k, 3) read-only positions of the plateau
    vertices, ``persistence_mm`` the peak's height above the saddle where its region joins a
    higher one (``inf`` for the highest point of a connected surface).
    """

    position_mm: tuple[float, float, float]
    height_mm: float
    plateau_mm: np.ndarray = field(compare=False, repr=False)
    persistence_mm: float


@dataclass(frozen=True)
class Opening:
    """A sprue (pour inlet) or vent where it meets the cavity (mm, world frame)."""

    kind: str
    center_mm: tuple[float, float, float]
    radius_mm: float


def _unit(up: Sequence[float]) -> np.ndarray:
    u = np.asarray(up, dtype=np.float64).reshape(-1)
    if u.shape != (3,) or not np.isfinite(u).all():
        raise ValueError(f"up must be a finite 3-vector, got {up!r}")
    n = float(np.linalg.norm(u))
    if n < 1e-12:
        raise ValueError("up must not be the zero vector")
    return u / n


def _check_params(persistence_mm: float, plateau_mm: float) -> None:
    if not (np.isfinite(persistence_mm) and persistence_mm > 0.0):
        raise ValueError(f"persistence_mm must be > 0, got {persistence_mm!r}")
    if not (np.isfinite(plateau_mm) and plateau_mm >= 0.0):
        raise ValueError(f"plateau_mm must be >= 0, got {plateau_mm!r}")


def _weld(mesh: TriMesh) -> tuple[np.ndarray, np.ndarray]:
    """Vertices and faces with exactly coincident vertices shared.

    A triangle soup (every facet with its own corners, as read from STL) or a tessellation
    with separate vertices per CAD face would otherwise split the surface along every seam,
    making each piece its own summit. Positions are unchanged, so nothing is repaired.
    """
    v = mesh.vertices
    f = mesh.faces
    if len(v) < 2:
        return v, f
    # One lexsort and a diff: several times faster than np.unique(axis=0) on float rows.
    order = np.lexsort((v[:, 2], v[:, 1], v[:, 0]))
    sv = v[order]
    new = np.empty(len(v), dtype=bool)
    new[0] = True
    np.any(sv[1:] != sv[:-1], axis=1, out=new[1:])
    if new.all():
        return v, f
    inverse = np.empty(len(v), dtype=np.int64)
    inverse[order] = np.cumsum(new) - 1
    return sv[new], inverse[f]


def _face_up(v: np.ndarray, f: np.ndarray, up: np.ndarray) -> np.ndarray:
    t = v[f]
    n = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    length = np.linalg.norm(n, axis=1)
    out = np.zeros(len(f))
    good = length > 0.0
    # Zero-area facets have no direction; 0 makes them walls, which only joins vertices that
    # already lie on the surface.
    out[good] = (n[good] @ up) / length[good]
    return out


@dataclass(frozen=True)
class _Surface:
    """The bubble-traversable surface as a graph in rank space (rank 0 = highest vertex)."""

    pos: np.ndarray  # (n, 3) vertex positions, mm, in rank order
    h: np.ndarray  # (n,) heights along up, mm, descending
    hi: np.ndarray  # (e,) rank of each edge's earlier (higher) endpoint
    lo: np.ndarray  # (e,) rank of each edge's entering (lower) endpoint; edges sorted by lo
    ceiling: np.ndarray  # (n,) bool: the vertex is a corner of a ceiling facet


def _surface(mesh: TriMesh, up: np.ndarray) -> _Surface:
    v, f = _weld(mesh)
    n = len(v)
    nu = _face_up(v, f, up)
    h = v @ up
    # Descending height, ties by index: a total, reproducible order.
    order = np.lexsort((np.arange(n), -h))
    rank = np.empty(n, dtype=np.int64)
    rank[order] = np.arange(n)

    fr = rank[f[nu > TRAVERSABLE_MIN_UP]]
    e = fr[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2)
    hi = e.min(axis=1)
    lo = e.max(axis=1)
    # One sort of (lo, hi) keys both removes shared edges and orders edges by entering vertex.
    key = np.sort(lo[lo != hi] * np.int64(n) + hi[lo != hi])
    key = key[np.r_[True, key[1:] != key[:-1]]] if len(key) else key

    ceiling = np.zeros(n, dtype=bool)
    ceiling[rank[f[nu > CEILING_MIN_UP].ravel()]] = True
    return _Surface(pos=v[order], h=h[order], hi=key % n, lo=key // n, ceiling=ceiling)


def _persistence(s: _Surface) -> tuple[np.ndarray, np.ndarray]:
    """Local maxima of height on the graph and the rank where each one's region dies.

    Union-find over edges in order of their entering vertex, which is the same as adding
    vertices in descending height. Each root is kept equal to its component's peak: when two
    components meet, the one whose peak is lower (larger rank) dies at the entering vertex and
    is hung under the other.

    A vertex that has an earlier neighbour is no maximum: its first edge only hangs it under
    that neighbour. Those links are set up front in bulk (the neighbour has a smaller rank, so
    every later find sees the same sets as the one-by-one order would); only the remaining
    edges, which may join two regions, go through the Python loop.

    Returns (peak ranks ascending, death rank per peak with -1 for "never dies").
    """
    n = len(s.h)
    lo, hi = s.lo, s.hi
    first = np.ones(len(lo), dtype=bool)
    first[1:] = lo[1:] != lo[:-1]
    parent_arr = np.arange(n, dtype=np.int64)
    parent_arr[lo[first]] = hi[first]
    parent = parent_arr.tolist()
    death = [-1] * n
    rest = ~first
    # Plain Python ints: indexing lists is several times faster than numpy scalars here.
    for a, b in zip(hi[rest].tolist(), lo[rest].tolist(), strict=True):
        entry = b
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        while parent[b] != b:
            parent[b] = parent[parent[b]]
            b = parent[b]
        if a == b:
            continue
        if a < b:
            parent[b] = a
            death[b] = entry
        else:
            parent[a] = b
            death[a] = entry
    in_graph = np.zeros(n, dtype=bool)
    in_graph[hi] = True
    in_graph[lo] = True
    # Maxima: on the graph and never the entering end of an edge.
    in_graph[lo] = False
    peaks = np.flatnonzero(in_graph)
    return peaks, np.asarray(death, dtype=np.int64)[peaks]


class _Adjacency:
    """Neighbour lists of the rank-space graph as plain Python lists (CSR layout)."""

    def __init__(self, s: _Surface) -> None:
        n = len(s.h)
        src = np.concatenate([s.hi, s.lo])
        dst = np.concatenate([s.lo, s.hi])
        order = np.argsort(src, kind="stable")
        self.indptr: list[int] = np.concatenate(
            [[0], np.cumsum(np.bincount(src, minlength=n))]
        ).tolist()
        self.indices: list[int] = dst[order].tolist()


def _plateau(adj: _Adjacency, peak: int, cut: int) -> np.ndarray:
    """Ranks reachable from ``peak`` through vertices with rank in [peak, cut], sorted.

    Every vertex of a peak's region ranks at or after the peak (the peak is its highest), so
    the walk stays inside that rank band; it only touches the plateau and its rim, so its cost
    follows the plateau's size, not the mesh's.
    """
    indptr, indices = adj.indptr, adj.indices
    seen = {peak}
    stack = [peak]
    while stack:
        x = stack.pop()
        for w in indices[indptr[x] : indptr[x + 1]]:
            if peak <= w <= cut and w not in seen:
                seen.add(w)
                stack.append(w)
    return np.array(sorted(seen), dtype=np.int64)


def _pick(points: np.ndarray, dist: np.ndarray, largest: bool) -> int:
    """Index of the nearest (or farthest) point, ties broken by x, then y, then z."""
    d = np.round(dist / _TIE_MM)
    idx = np.lexsort((points[:, 2], points[:, 1], points[:, 0], -d if largest else d))
    return int(idx[0])


def find_high_points(
    mesh: TriMesh,
    up: Sequence[float] = (0.0, 0.0, 1.0),
    persistence_mm: float = 0.5,
    plateau_mm: float = 0.25,
) -> tuple[HighPoint, ...]:
    """Places where air gathers in the cavity when the part is poured with ``up`` upward.

    ``mesh`` is the cast part in mm with outward (out of the silicone) winding; exactly
    coincident vertices are treated as one. A maximum counts if it stands at least
    ``persistence_mm`` above the saddle joining it to higher ground (the highest point of each
    connected surface always counts) and its plateau (vertices within ``plateau_mm`` below
    the peak, connected to it) touches a ceiling facet. Sorted by height descending, then by
    position (x, y, z).
    """
    _check_params(persistence_mm, plateau_mm)
    u = _unit(up)
    if mesh.triangle_count == 0:
        return ()
    s = _surface(mesh, u)
    peaks, deaths = _persistence(s)
    found: list[HighPoint] = []
    adj: _Adjacency | None = None
    for peak, death in zip(peaks.tolist(), deaths.tolist(), strict=True):
        top = float(s.h[peak])
        if death < 0:
            persistence = float("inf")
        else:
            persistence = top - float(s.h[death])
            if persistence < persistence_mm:
                continue
        # Last rank still within plateau_mm of the peak, and, for a region that merges into
        # higher ground, before the merge vertex (the plateau never spills into the other).
        cut = int(np.searchsorted(-s.h, -(top - plateau_mm), side="right")) - 1
        if death >= 0:
            cut = min(cut, death - 1)
        if adj is None:
            adj = _Adjacency(s)
        ranks = _plateau(adj, peak, cut)
        if not s.ceiling[ranks].any():
            continue
        pts = s.pos[ranks]
        centre = pts.mean(axis=0)
        i = _pick(pts, np.linalg.norm(pts - centre, axis=1), largest=False)
        plateau = np.ascontiguousarray(pts)
        plateau.flags.writeable = False
        found.append(
            HighPoint(
                position_mm=(float(pts[i, 0]), float(pts[i, 1]), float(pts[i, 2])),
                height_mm=top,
                plateau_mm=plateau,
                persistence_mm=persistence,
            )
        )
    found.sort(key=lambda hp: (-hp.height_mm, hp.position_mm))
    return tuple(found)


def serves(
    opening: Opening, hp: HighPoint, up: Sequence[float] = (0.0, 0.0, 1.0),
    plateau_mm: float = 0.25,
) -> bool:
    """True when ``opening`` reaches the plateau of ``hp`` (mm, world frame).

    Some plateau vertex must lie within ``opening.radius_mm`` (+0.05 mm) of the opening's axis
    (the line through its centre along ``up``) and within ``plateau_mm`` + 0.5 mm in height of
    the opening's centre.
    """
    u = _unit(up)
    d = np.asarray(hp.plateau_mm, dtype=np.float64) - np.asarray(opening.center_mm)
    along = d @ u
    radial = np.linalg.norm(d - along[:, None] * u, axis=1)
    near = (radial <= opening.radius_mm + SERVE_RADIAL_SLACK_MM) & (
        np.abs(along) <= plateau_mm + SERVE_HEIGHT_SLACK_MM
    )
    return bool(near.any())


def plan_openings(
    mesh: TriMesh,
    up: Sequence[float],
    sprue_radius_mm: float,
    vent_radius_mm: float,
    far_vent_min_mm: float = 15.0,
    persistence_mm: float = 0.5,
    plateau_mm: float = 0.25,
) -> tuple[Opening, ...]:
    """Sprue and vents for the cavity of ``mesh`` (mm, world frame); sprue first.

    The sprue goes at the highest high point, a vent at every other high point no opening
    serves yet, and then, filling at one end and venting at the other (common practice), one
    more vent on every high point whose plateau reaches farther than ``far_vent_min_mm`` from
    the nearest opening on it, at the plateau vertex farthest from those openings. Returns ()
    when the cavity has no high point.
    """
    for name, value in (("sprue_radius_mm", sprue_radius_mm), ("vent_radius_mm", vent_radius_mm)):
        if not (np.isfinite(value) and value > 0.0):
            raise ValueError(f"{name} must be > 0, got {value!r}")
    u = _unit(up)
    hps = find_high_points(mesh, u, persistence_mm, plateau_mm)
    if not hps:
        return ()
    openings = [Opening("sprue", hps[0].position_mm, float(sprue_radius_mm))]
    for hp in hps[1:]:
        if not any(serves(o, hp, u, plateau_mm) for o in openings):
            openings.append(Opening("vent", hp.position_mm, float(vent_radius_mm)))
    for hp in hps:
        on_it = [o for o in openings if serves(o, hp, u, plateau_mm)]
        pts = hp.plateau_mm
        centres = np.array([o.center_mm for o in on_it], dtype=np.float64)
        gap = np.linalg.norm(pts[:, None, :] - centres[None, :, :], axis=2).min(axis=1)
        if gap.max() > far_vent_min_mm:
            i = _pick(pts, gap, largest=True)
            where = (float(pts[i, 0]), float(pts[i, 1]), float(pts[i, 2]))
            openings.append(Opening("vent", where, float(vent_radius_mm)))
    return tuple(openings)


def unserved(
    mesh: TriMesh,
    up: Sequence[float],
    openings: Sequence[Opening],
    persistence_mm: float = 0.5,
    plateau_mm: float = 0.25,
) -> tuple[HighPoint, ...]:
    """High points of ``mesh`` that none of ``openings`` serves (see :func:`serves`)."""
    u = _unit(up)
    return tuple(
        hp
        for hp in find_high_points(mesh, u, persistence_mm, plateau_mm)
        if not any(serves(o, hp, u, plateau_mm) for o in openings)
    )
