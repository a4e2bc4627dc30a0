"""Where air collects when liquid silicone is poured into a mold, and where to open it.

Input is the *cast part* mesh: the silicone body including its internal voids (the spaces the
core occupies), wound so that normals point out of the silicone. Frame: millimetres; ``up`` is
the unit pour direction (default +z), heights are ``vertex · up``.

Model. A facet whose outward normal points upward (``n·up > 0``) is a ceiling for the liquid
beneath it. A rising bubble slides along the surface, upward; where a ceiling turns into a
wall and then a floor (the rim of a core, the top edge of a chamber) the bubble rounds the
corner and goes on rising, so every facet is part of the path and air is trapped only at a
local maximum of height on the surface graph. Small bumps of the tessellation are ignored by
0-dimensional persistence (a maximum counts only if it stands at least ``persistence_mm``
above the saddle where its region joins a higher one), and a maximum counts only if the
region around it (its *plateau*, within ``plateau_mm`` of the peak) faces up on average
(area-weighted), because the top of a core seen from the silicone is a floor: the bubble
leaves it and rises on through the liquid.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from soft_molds.constants import AIR_PERSISTENCE_MM, AIR_PLATEAU_MM
from soft_molds.meshdata import TriMesh
from soft_molds.plan.model import Opening, OpeningKind

from .rays import Vec3

CEILING_MIN_UP = 0.1
"""A plateau whose area-weighted mean normal has ``n·up`` above this holds a bubble."""

MAX_EXTRA_VENTS = 12
"""At most this many coverage vents on one flat high region."""

SERVE_RADIAL_SLACK_MM = 0.05
"""Extra radius when deciding whether an opening reaches a plateau vertex (float noise)."""

FLAT_MOUTH_TOL_MM = 0.01
#: Least band of flat ceiling kept between a mouth and the ceiling's rim (mm): a mouth that
#: only touches the rim leaves a face of zero width between them, which the mesher cannot
#: triangulate (and the mold a knife edge there).
MOUTH_RIM_BAND_MM = 0.1
"""A mouth whose lowest ceiling lies within this of its centre's height (mm) sits wholly on
a flat top (float and chord noise)."""

FIT_STEP = 0.9
"""Each try of a sprue narrowed to fit its plateau is this fraction of the one before."""

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
    plateau_triangles_mm: np.ndarray = field(compare=False, repr=False,
                                             default_factory=lambda: np.empty((0, 3, 3)))
    #: True for a ring-shaped plateau (a ring's top face), whose centroid lies off it:
    #: ``position_mm`` is then the vertex nearest that centroid, on the plateau's inner rim.
    ring_shaped: bool = field(default=False, compare=False)


def _unit(up: Vec3) -> np.ndarray:
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


@dataclass(frozen=True)
class _Surface:
    """The bubble-traversable surface as a graph in rank space (rank 0 = highest vertex)."""

    pos: np.ndarray  # (n, 3) vertex positions, mm, in rank order
    h: np.ndarray  # (n,) heights along up, mm, descending
    hi: np.ndarray  # (e,) rank of each edge's earlier (higher) endpoint
    lo: np.ndarray  # (e,) rank of each edge's entering (lower) endpoint; edges sorted by lo
    faces: np.ndarray  # (m, 3) facets in rank space
    area_up: np.ndarray  # (m,) facet area times n·up, mm^2
    area: np.ndarray  # (m,) facet area, mm^2


def _surface(mesh: TriMesh, up: np.ndarray) -> _Surface:
    v, f = _weld(mesh)
    n = len(v)
    t = v[f]
    cross = np.cross(t[:, 1] - t[:, 0], t[:, 2] - t[:, 0])
    area = 0.5 * np.linalg.norm(cross, axis=1)
    h = v @ up
    # Descending height, ties by index: a total, reproducible order.
    order = np.lexsort((np.arange(n), -h))
    rank = np.empty(n, dtype=np.int64)
    rank[order] = np.arange(n)

    fr = rank[f]
    e = fr[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2)
    hi = e.min(axis=1)
    lo = e.max(axis=1)
    # One sort of (lo, hi) keys both removes shared edges and orders edges by entering vertex.
    key = np.sort(lo[lo != hi] * np.int64(n) + hi[lo != hi])
    key = key[np.r_[True, key[1:] != key[:-1]]] if len(key) else key
    return _Surface(pos=v[order], h=h[order], hi=key % n, lo=key // n, faces=fr,
                    area_up=0.5 * (cross @ up), area=area)


def _plateau_facets(s: _Surface, ranks: np.ndarray) -> tuple[np.ndarray, bool]:
    """Indices of facets with every corner on the plateau, and True; or, for a pointed peak
    with no such facet, the facets around the peak vertex, and False."""
    member = np.zeros(len(s.h), dtype=bool)
    member[ranks] = True
    inside = member[s.faces].all(axis=1)
    if inside.any():
        return np.flatnonzero(inside), True
    return np.flatnonzero((s.faces == ranks[0]).any(axis=1)), False


def _centre_on(s: _Surface, facets: np.ndarray, up: np.ndarray) -> np.ndarray | None:
    """The plateau's area-weighted centroid moved along ``up`` onto the plateau facet whose
    shadow contains it, or None when no facet lies under it (a ring-shaped plateau)."""
    tri = s.pos[s.faces[facets]]
    a = s.area[facets]
    if a.sum() <= 0:
        return None
    c = (tri.mean(axis=1) * a[:, None]).sum(axis=0) / a.sum()
    inside, b1, b2 = _shadow_coords(tri, c, up)
    hit = np.flatnonzero(inside)
    if len(hit) == 0:
        return None
    k = int(hit[np.argmax((tri[hit].mean(axis=1)) @ up)])  # the highest facet above/below c
    return tri[k, 0] + b1[k] * (tri[k, 1] - tri[k, 0]) + b2[k] * (tri[k, 2] - tri[k, 0])


def _shadow_coords(tris: np.ndarray, point: np.ndarray, up: np.ndarray
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Barycentric coordinates of ``point`` projected along ``up`` onto each of ``tris``
    (k, 3, 3), and whether it falls inside each (edges included)."""
    e1 = np.cross(up, [1.0, 0.0, 0.0])
    if np.linalg.norm(e1) < 1e-6:
        e1 = np.cross(up, [0.0, 1.0, 0.0])
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(up, e1)
    a = np.stack([tris @ e1, tris @ e2], axis=2)  # (k, 3, 2)
    v0, v1 = a[:, 1] - a[:, 0], a[:, 2] - a[:, 0]
    w = np.array([point @ e1, point @ e2]) - a[:, 0]
    den = v0[:, 0] * v1[:, 1] - v0[:, 1] * v1[:, 0]
    ok = np.abs(den) > 1e-12
    safe = np.where(ok, den, 1.0)
    b1 = (w[:, 0] * v1[:, 1] - w[:, 1] * v1[:, 0]) / safe
    b2 = (v0[:, 0] * w[:, 1] - v0[:, 1] * w[:, 0]) / safe
    return ok & (b1 >= -1e-9) & (b2 >= -1e-9) & (b1 + b2 <= 1 + 1e-9), b1, b2


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
    up: Vec3 = (0.0, 0.0, 1.0),
    persistence_mm: float = AIR_PERSISTENCE_MM,
    plateau_mm: float = AIR_PLATEAU_MM,
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
        facets, flat = _plateau_facets(s, ranks)
        if s.area_up[facets].sum() <= CEILING_MIN_UP * s.area[facets].sum():
            continue
        pts = s.pos[ranks]
        # A plateau with area: its centroid, on its surface. A pointed peak: the peak itself.
        centre = _centre_on(s, facets, u) if flat else s.pos[peak]
        ring_shaped = centre is None
        if centre is None:
            i = _pick(pts, np.linalg.norm(pts - pts.mean(axis=0), axis=1), largest=False)
            centre = pts[i]
        elif flat:
            # Summation order follows the input's vertex order; round off that float noise
            # so the same part always gives the same position.
            centre = np.round(centre, 6) + 0.0
        tris = np.ascontiguousarray(s.pos[s.faces[facets]]) if flat else np.empty((0, 3, 3))
        tris.flags.writeable = False
        plateau = np.ascontiguousarray(pts)
        plateau.flags.writeable = False
        found.append(
            HighPoint(
                position_mm=(float(centre[0]), float(centre[1]), float(centre[2])),
                height_mm=top,
                plateau_mm=plateau,
                persistence_mm=persistence,
                plateau_triangles_mm=tris,
                ring_shaped=ring_shaped,
            )
        )
    found.sort(key=lambda hp: (-hp.height_mm, hp.position_mm))
    return tuple(found)


def _reaching(
    hp: HighPoint, centres: np.ndarray, radii: np.ndarray, u: np.ndarray, plateau_mm: float
) -> np.ndarray:
    """For each opening (centres (k, 3), radii (k,)), whether it reaches the plateau of ``hp``:
    a plateau vertex within its radius of its axis, or its axis through a plateau facet;
    either within the plateau's height band.

    Openings outside the plateau's height band are dropped first (cheap), so a cavity with
    hundreds of high points does not cost hundreds squared distance matrices.
    """
    pts = np.asarray(hp.plateau_mm, dtype=np.float64)
    out = np.zeros(len(centres), dtype=bool)
    if len(centres) == 0 or len(pts) == 0:
        return out
    band = plateau_mm + SERVE_HEIGHT_SLACK_MM
    ph = pts @ u
    ch = centres @ u
    cand = np.flatnonzero((ch >= ph.min() - band) & (ch <= ph.max() + band))
    # Chunks keep the (plateau x openings) matrices small on big plateaus.
    step = max(1, 2_000_000 // (3 * len(pts)))
    for s0 in range(0, len(cand), step):
        j = cand[s0 : s0 + step]
        d = pts[:, None, :] - centres[None, j, :]
        along = d @ u
        radial = np.linalg.norm(d - along[..., None] * u, axis=2)
        near = (radial <= radii[j] + SERVE_RADIAL_SLACK_MM) & (np.abs(along) <= band)
        out[j] = near.any(axis=0)
    rest = cand[~out[cand]]
    if len(rest) and len(hp.plateau_triangles_mm):
        out[rest] = _in_shadow(hp.plateau_triangles_mm, centres[rest], u)
    return out


def _in_shadow(tris: np.ndarray, points: np.ndarray, u: np.ndarray) -> np.ndarray:
    """Whether each point's projection along ``u`` falls inside one of ``tris`` (k, 3, 3)."""
    return np.array([bool(_shadow_coords(tris, p, u)[0].any()) for p in points], dtype=bool)


def _arrays(openings: Sequence[Opening]) -> tuple[np.ndarray, np.ndarray]:
    centres = np.array([o.center_mm for o in openings], dtype=np.float64).reshape(-1, 3)
    radii = np.array([o.radius_mm for o in openings], dtype=np.float64)
    return centres, radii


def serves(
    opening: Opening, hp: HighPoint, up: Vec3 = (0.0, 0.0, 1.0),
    plateau_mm: float = AIR_PLATEAU_MM,
) -> bool:
    """True when ``opening`` reaches the plateau of ``hp`` (mm, world frame).

    Some plateau vertex must lie within ``opening.radius_mm`` (+0.05 mm) of the opening's axis
    (the line through its centre along ``up``), or that axis must pass through a plateau
    facet; and the opening's centre must lie within ``plateau_mm`` + 0.5 mm in height of the
    plateau.
    """
    centres, radii = _arrays([opening])
    return bool(_reaching(hp, centres, radii, _unit(up), plateau_mm)[0])


def plan_openings(
    mesh: TriMesh,
    up: Vec3,
    sprue_radius_mm: float,
    vent_radius_mm: float,
    far_vent_min_mm: float = 15.0,
    persistence_mm: float = AIR_PERSISTENCE_MM,
    plateau_mm: float = AIR_PLATEAU_MM,
    narrow_sprue: bool = False,
) -> tuple[Opening, ...]:
    """Sprue and vents for the cavity of ``mesh`` (mm, world frame); sprue first.

    The sprue goes at the highest high point, a vent at every other high point no opening
    serves yet, and then, since a flat ceiling sends air to wherever the liquid arrives last
    (common practice: vent the far end from the sprue), vents at the plateau vertices
    farthest from every opening until no plateau vertex is farther than ``far_vent_min_mm``
    from one (straight-line distances in mm; at most MAX_EXTRA_VENTS per high point).
    Returns () when the cavity has no high point.

    ``narrow_sprue``: when the highest plateau is too narrow for a mouth of
    ``sprue_radius_mm`` lying wholly on its flat top (a ring channel's top, 2 mm across),
    the sprue narrows (down to ``vent_radius_mm`` at least) to the widest mouth that does,
    at the plateau's most central point (see :func:`_fitted_sprue`).
    """
    for name, value in (("sprue_radius_mm", sprue_radius_mm), ("vent_radius_mm", vent_radius_mm)):
        if not (np.isfinite(value) and value > 0.0):
            raise ValueError(f"{name} must be > 0, got {value!r}")
    u = _unit(up)
    hps = find_high_points(mesh, u, persistence_mm, plateau_mm)
    if not hps:
        return ()
    sprue_at = hps[0].position_mm
    if hps[0].ring_shaped:
        # On a ring-shaped plateau the high point lies on the inner rim: a sprue mouth
        # there would hang over the edge (a knife edge of mold), so move it onto the plateau.
        q = np.round(_mouth_point(hps[0], np.asarray(sprue_at), sprue_radius_mm, u), 6) + 0.0
        sprue_at = (float(q[0]), float(q[1]), float(q[2]))
    if narrow_sprue:
        sprue_at, sprue_radius_mm = _fitted_sprue(mesh, hps[0], sprue_at, sprue_radius_mm,
                                                  vent_radius_mm, u)
    openings = [Opening(OpeningKind.SPRUE, sprue_at, float(sprue_radius_mm))]
    # At most one vent per high point from the first pass and MAX_EXTRA_VENTS from the second:
    # preallocate the arrays the reach tests run on instead of rebuilding them every time.
    centres = np.empty(((MAX_EXTRA_VENTS + 1) * len(hps) + 1, 3))
    radii = np.empty((MAX_EXTRA_VENTS + 1) * len(hps) + 1)
    centres[0], radii[0] = sprue_at, sprue_radius_mm

    def add(where: tuple[float, float, float]) -> None:
        centres[len(openings)], radii[len(openings)] = where, vent_radius_mm
        openings.append(Opening(OpeningKind.VENT, where, float(vent_radius_mm)))

    for hp in hps[1:]:
        k = len(openings)
        if not _reaching(hp, centres[:k], radii[:k], u, plateau_mm).any():
            add(hp.position_mm)
    for hp in hps:
        k = len(openings)
        on_it = centres[:k][_reaching(hp, centres[:k], radii[:k], u, plateau_mm)]
        if len(on_it) == 0:  # cannot happen (each high point got an opening above); be safe
            continue
        pts = hp.plateau_mm
        gap = np.linalg.norm(pts[:, None, :] - on_it[None, :, :], axis=2).min(axis=1)
        # Farthest-point coverage: a flat ceiling pushes air to wherever the liquid front
        # reaches last, so keep adding vents until no part of it is far from an opening.
        for _ in range(MAX_EXTRA_VENTS):
            if gap.max() <= far_vent_min_mm:
                break
            i = _pick(pts, gap, largest=True)
            q = np.round(_mouth_point(hp, pts[i], vent_radius_mm, u), 6) + 0.0
            add((float(q[0]), float(q[1]), float(q[2])))
            gap = np.minimum(gap, np.linalg.norm(pts - q, axis=1))
    return _with_floors(mesh, u, openings)


MOUTH_RAYS = 24


def _sits_flat(mesh: TriMesh, u: np.ndarray, at: tuple[float, float, float],
               radius_mm: float) -> bool:
    """Whether a mouth of ``radius_mm`` at ``at`` lies wholly over a flat top: every ray sent
    down onto the cast (a ring at the mouth's radius and its centre, as for the floors)
    meets it at the centre's own height."""
    from .rays import RayCaster

    c = np.asarray(at, dtype=np.float64)
    e1, e2 = _plan_axes(u)
    ang = np.linspace(0.0, 2.0 * np.pi, MOUTH_RAYS, endpoint=False)
    ring = np.concatenate([[np.zeros(3)], radius_mm * (
        np.cos(ang)[:, None] * e1 + np.sin(ang)[:, None] * e2)])
    top = float((mesh.vertices @ u).max()) + 1.0
    o = c + ring + (top - c @ u) * u
    t, _ = RayCaster(mesh).first_hit(o, -u)
    return bool(np.all(np.isfinite(t))
                and np.all(np.abs(o @ u - t - c @ u) <= FLAT_MOUTH_TOL_MM))


def _fitted_sprue(mesh: TriMesh, hp: HighPoint, at: tuple[float, float, float],
                  radius_mm: float, least_mm: float, u: np.ndarray
                  ) -> tuple[tuple[float, float, float], float]:
    """The sprue mouth (centre, radius mm) for plateau ``hp``: ``at`` and ``radius_mm`` when
    that mouth lies wholly over the flat top; else, at the plateau point (corner, edge
    midpoint or centroid of its triangles) farthest from its rim in plan, the widest radius
    (from that rim distance down by FIT_STEP, not under ``least_mm``) that does; else ``at``
    and ``radius_mm`` unchanged.

    A mouth reaching over the rounded edge of a narrow top leaves a knife edge of mold
    between the sprue's floor and the cavity, too thin to print and apt to break into the
    cast; a narrower sprue under the funnel pours a low-viscosity melt as well."""
    if _sits_flat(mesh, u, at, radius_mm):
        return at, radius_mm
    tris = hp.plateau_triangles_mm
    # Candidates on the plateau's surface: its corners, edge midpoints and centroids (a
    # narrow flat top has corners only on its rims).
    pts = np.concatenate([tris.reshape(-1, 3), 0.5 * (tris + np.roll(tris, 1, axis=1))
                          .reshape(-1, 3), tris.mean(axis=1)]) if len(tris) else tris
    clear = _rim_clearance(hp, pts, u)
    if clear is None or len(pts) == 0:
        return at, radius_mm
    i = _pick(pts, clear, largest=True)
    centre = (float(pts[i][0]), float(pts[i][1]), float(pts[i][2]))
    r = min(radius_mm, float(clear[i]))
    while r >= least_mm - 1e-9:
        if _sits_flat(mesh, u, centre, r):
            return centre, float(np.round(r, 6))
        r *= FIT_STEP
    return at, radius_mm


def _with_floors(mesh: TriMesh, u: np.ndarray, openings: list[Opening]) -> tuple[Opening, ...]:
    """Each opening with the lowest ceiling height under its mouth, found by rays sent down
    onto the cast from above it (a ring at the mouth's radius and its centre)."""
    from .rays import RayCaster

    caster = RayCaster(mesh)
    top = float((mesh.vertices @ u).max()) + 1.0
    a = np.array([1.0, 0.0, 0.0]) if abs(u[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(u, a)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(u, e1)
    ang = np.linspace(0.0, 2.0 * np.pi, MOUTH_RAYS, endpoint=False)
    out = []
    for op in openings:
        c = np.asarray(op.center_mm)
        ring = np.concatenate([[np.zeros(3)], op.radius_mm * (
            np.cos(ang)[:, None] * e1 + np.sin(ang)[:, None] * e2)])
        o = c + ring + (top - c @ u) * u
        t, _ = caster.first_hit(o, -u)
        hit = np.isfinite(t)
        floor = float(np.round((o[hit] @ u - t[hit]).min(), 6)) if hit.any() else None
        h = float(c @ u)
        out.append(Opening(op.kind, op.center_mm, op.radius_mm,
                           None if floor is None else min(floor, h)))
    return tuple(out)


def _plan_axes(u: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Two unit vectors spanning the plane normal to ``u`` (the plan)."""
    a = np.array([1.0, 0.0, 0.0]) if abs(u[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(u, a)
    e1 /= np.linalg.norm(e1)
    return e1, np.cross(u, e1)


def _rim_clearance(hp: HighPoint, q: np.ndarray, u: np.ndarray) -> np.ndarray | None:
    """Plan distance (mm) of each point of ``q`` to the rim of ``hp``'s plateau (its edges
    used by one plateau triangle, corners matched to 1e-6 mm); None without a rim."""
    tris = hp.plateau_triangles_mm
    if len(tris) == 0:
        return None
    e1, e2 = _plan_axes(u)
    ends = tris[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2, 3)
    keys = np.round(ends * 1e6).astype(np.int64)
    k0, k1 = keys[:, 0], keys[:, 1]
    swap = _lex_less(k1, k0)[:, None]
    pair = np.concatenate([np.where(swap, k1, k0), np.where(swap, k0, k1)], axis=1)
    _, inv, cnt = np.unique(pair, axis=0, return_inverse=True, return_counts=True)
    rim = ends[cnt[inv.reshape(-1)] == 1]
    if len(rim) == 0:
        return None
    s0 = np.stack([rim[:, 0] @ e1, rim[:, 0] @ e2], axis=1)
    seg = np.stack([rim[:, 1] @ e1, rim[:, 1] @ e2], axis=1) - s0
    ll = np.maximum((seg * seg).sum(axis=1), 1e-18)
    q2 = np.stack([q @ e1, q @ e2], axis=1)
    rel = q2[:, None, :] - s0[None]
    t = np.clip((rel * seg[None]).sum(axis=2) / ll[None], 0.0, 1.0)
    return np.linalg.norm(rel - t[..., None] * seg[None], axis=2).min(axis=1)


def _mouth_point(hp: HighPoint, p: np.ndarray, radius_mm: float, u: np.ndarray) -> np.ndarray:
    """A point near ``p`` (the nearest on a quarter-radius grid within three radii, else
    the nearest on the way to the plateau's centre) whose whole vent mouth (a disc of
    ``radius_mm`` seen along ``u``) lies over the plateau, i.e. at least ``radius_mm`` +
    MOUTH_RIM_BAND_MM from the plateau's rim in plan; ``p`` itself when there is none.

    A mouth hanging over the rounded edge of a flat ceiling would leave a knife edge of
    mold between the vent and the cavity, too thin to print and apt to break into the cast.
    """
    tris = hp.plateau_triangles_mm
    if len(tris) == 0:
        return p
    e1, e2 = _plan_axes(u)
    centre = np.asarray(hp.position_mm)
    # Candidates: a plan grid around p (step a quarter radius, out to three radii), nearest
    # first, then the straight way to the plateau's centre.
    g = np.arange(-12, 13) * (radius_mm / 4.0)
    gu, gv = np.meshgrid(g, g, indexing="ij")
    grid = p[None, :] + gu.reshape(-1, 1) * e1 + gv.reshape(-1, 1) * e2
    near = np.lexsort((gv.reshape(-1), gu.reshape(-1), np.round(np.hypot(gu, gv).reshape(-1), 9)))
    steps = np.linspace(0.0, 1.0, 41)
    q = np.concatenate([grid[near], p[None, :] + steps[:, None] * (centre - p)[None, :]])
    clear = _rim_clearance(hp, q, u)
    if clear is None:
        return p
    for k in np.flatnonzero(clear >= radius_mm + MOUTH_RIM_BAND_MM).tolist():
        inside, b1, b2 = _shadow_coords(tris, q[k], u)
        if inside.any():
            j = int(np.flatnonzero(inside)[0])
            tri = tris[j]
            on = tri[0] + b1[j] * (tri[1] - tri[0]) + b2[j] * (tri[2] - tri[0])
            return q[k] + ((on - q[k]) @ u) * u  # on the plateau surface
    return p


def _lex_less(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Row-wise lexicographic a < b for (n, 3) integer arrays."""
    lt = a < b
    gt = a > b
    out = np.zeros(len(a), dtype=bool)
    decided = np.zeros(len(a), dtype=bool)
    for c in range(a.shape[1]):
        out |= ~decided & lt[:, c]
        decided |= lt[:, c] | gt[:, c]
    return out


def unserved(
    mesh: TriMesh,
    up: Vec3,
    openings: Sequence[Opening],
    persistence_mm: float = AIR_PERSISTENCE_MM,
    plateau_mm: float = AIR_PLATEAU_MM,
) -> tuple[HighPoint, ...]:
    """High points of ``mesh`` that none of ``openings`` serves (see :func:`serves`)."""
    u = _unit(up)
    centres, radii = _arrays(list(openings))
    return tuple(
        hp
        for hp in find_high_points(mesh, u, persistence_mm, plateau_mm)
        if not _reaching(hp, centres, radii, u, plateau_mm).any()
    )
