"""A primitive backed by a closed triangle mesh: the body read from a CAD file.

The closed-form primitives answer distance, bounds, samples and sections exactly; this one
answers them from the imported solid's mesh (chord ``chord_mm`` to the BRep), so every
check that reasons about the body before the kernel runs works on a drawn body too. The
geometry stage builds it from the BRep itself (``geometry/stepbody.py``).

Frame: mm, world (placed) frame.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .imported import ImportedBody

#: Spacing (mm) of the points on the mesh whose nearest gives each query its first
#: bound (the nearer, the fewer tree nodes pass it).
SAMPLE_MM = 0.5
#: Most triangles in a leaf of the bounding-volume tree.
LEAF = 8
#: Points at most this far apart along a distance (mm) are ties: all triangles at the
#: closest distance vote on the sign (see :meth:`MeshIndex.sdf`).
TIE_MM = 1e-9
#: Points per chunk of a distance query (bounds the temporary arrays).
POINTS_PER_CHUNK = 4096


@dataclass(frozen=True, eq=False)
class MeshSolid:
    """The imported, placed solid (``body``): its mesh answers the primitive contract."""

    body: ImportedBody

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Signed distance (mm, negative inside), exact to the mesh (see
        :meth:`MeshIndex._exact`); the mesh lies within ``chord_mm`` of the BRep."""
        return _index(self.body).sdf(np.asarray(p, dtype=np.float64).reshape(-1, 3))

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        """The BRep's exact placed bounds."""
        return np.asarray(self.body.lo_mm, dtype=np.float64), \
            np.asarray(self.body.hi_mm, dtype=np.float64)

    def volume_mm3(self) -> float:
        """The BRep's volume (mm3), as the kernel measured it."""
        return self.body.volume_mm3

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the mesh, rows across each triangle at most ``spacing_mm`` apart and
        points along each row at most that apart (see :func:`_triangle_grids`)."""
        points, _ = _triangle_grids(self.body.mesh.triangles(), spacing_mm)
        return np.unique(np.round(points, 9), axis=0)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along ``v`` of the section by the plane ``coord[w] = t``, over the
        third axis (None: the plane misses): the mesh cut by the plane, its crossing
        edges' points and any vertex on it."""
        return _index(self.body).section_extent(v, w, t)


class MeshIndex:
    """The mesh prepared for distance queries: a bounding-volume tree over its triangles
    (boxes split at the median centroid along their longest side, at most ``LEAF``
    triangles a leaf) and points on every triangle in a k-d tree, for a first bound."""

    def __init__(self, body: ImportedBody) -> None:
        from scipy.spatial import cKDTree

        tri = body.mesh.triangles()
        self.mesh_tri = tri
        self.normals = _unit(np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0]))
        points, self.owner = _triangle_grids(tri, SAMPLE_MM)
        self.tree = cKDTree(points)
        self._build_tree(tri)

    def _build_tree(self, tri: np.ndarray) -> None:
        centroids = tri.mean(axis=1)
        lo_t, hi_t = tri.min(axis=1), tri.max(axis=1)
        order = np.arange(len(tri))
        nodes: list[list[int]] = []  # [start, end, left, right]
        stack = [(0, len(tri), -1, 0)]
        while stack:
            start, end, parent, side = stack.pop()
            k = len(nodes)
            nodes.append([start, end, -1, -1])
            if parent >= 0:
                nodes[parent][2 + side] = k
            if end - start <= LEAF:
                continue
            idx = order[start:end]
            c = centroids[idx]
            axis = int(np.argmax(c.max(axis=0) - c.min(axis=0)))
            mid = (end - start) // 2
            order[start:end] = idx[np.argpartition(c[:, axis], mid)]
            stack.append((start, start + mid, k, 0))
            stack.append((start + mid, end, k, 1))
        table = np.asarray(nodes, dtype=np.int64)
        self.order = order
        self.start, self.end = table[:, 0], table[:, 1]
        self.left, self.right = table[:, 2], table[:, 3]
        self.box_lo = np.array([lo_t[order[a:b]].min(axis=0) for a, b in table[:, :2]])
        self.box_hi = np.array([hi_t[order[a:b]].max(axis=0) for a, b in table[:, :2]])

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Signed distances of points ``p`` (n, 3), exact to the mesh, in chunks."""
        out = np.empty(len(p))
        for s0 in range(0, len(p), POINTS_PER_CHUNK):
            out[s0:s0 + POINTS_PER_CHUNK] = self._exact(p[s0:s0 + POINTS_PER_CHUNK])
        return out

    def _exact(self, p: np.ndarray) -> np.ndarray:
        """The nearest sample's triangle bounds the distance from above; the tree is then
        walked level by level over every (point, node) pair whose box lies within that
        bound, which each leaf's exact distances tighten, so no triangle that could be
        nearer is skipped."""
        if not len(p):
            return np.empty(0)
        _, first = self.tree.query(p, k=1)
        first = self.owner[first]
        upper = np.linalg.norm(p - _closest_points(p, self.mesh_tri[first]), axis=1)
        pt = np.arange(len(p))
        node = np.zeros(len(p), dtype=np.int64)
        found_pt, found_tri, found_d = [], [], []
        while len(pt):
            gap = np.maximum(self.box_lo[node] - p[pt], 0.0) + \
                np.maximum(p[pt] - self.box_hi[node], 0.0)
            keep = np.einsum("nc,nc->n", gap, gap) <= (upper[pt] + TIE_MM) ** 2
            pt, node = pt[keep], node[keep]
            leaf = self.left[node] < 0
            lp, ln = pt[leaf], node[leaf]
            if len(lp):
                counts = self.end[ln] - self.start[ln]
                owner = np.repeat(lp, counts)
                offset = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
                tris = self.order[np.repeat(self.start[ln], counts) + offset]
                dist = np.linalg.norm(p[owner] - _closest_points(p[owner], self.mesh_tri[tris]),
                                      axis=1)
                np.minimum.at(upper, owner, dist)
                found_pt.append(owner)
                found_tri.append(tris)
                found_d.append(dist)
            inner = ~leaf
            pt = np.concatenate([pt[inner], pt[inner]])
            node = np.concatenate([self.left[node[inner]], self.right[node[inner]]])
        owner = np.concatenate(found_pt)
        tris = np.concatenate(found_tri)
        dist = np.concatenate(found_d)
        # The sign: every triangle at the closest distance (ties: the closest point on an
        # edge or a corner) gives (p - closest) . normal; the largest in magnitude decides.
        # Near a convex edge or corner all of them are >= 0 outside, near a concave one
        # all are <= 0 inside, so on a closed, outward-wound mesh the largest never points
        # the wrong way (the pseudo-normal argument of Baerentzen and Aanaes, IEEE TVCG
        # 2005).
        tied = dist <= upper[owner] + TIE_MM
        owner, tris = owner[tied], tris[tied]
        diff = p[owner] - _closest_points(p[owner], self.mesh_tri[tris])
        score = np.einsum("nc,nc->n", diff, self.normals[tris])
        hi = np.full(len(p), -np.inf)
        lo = np.full(len(p), np.inf)
        np.maximum.at(hi, owner, score)
        np.minimum.at(lo, owner, score)
        side = np.where(hi >= -lo, hi, lo)
        return np.where(side < 0.0, -upper, upper)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        tri = self.mesh_tri
        s = tri[:, :, w] - t
        pts = [tri[np.abs(s) <= 1e-12][:, v]]
        for a, b in ((0, 1), (1, 2), (2, 0)):
            sa, sb = s[:, a], s[:, b]
            cross = sa * sb < 0.0
            f = sa[cross] / (sa[cross] - sb[cross])
            pts.append(tri[cross, a, v] + f * (tri[cross, b, v] - tri[cross, a, v]))
        vals = np.concatenate(pts)
        if not len(vals):
            return None
        return (float(vals.min()), float(vals.max()))


_INDEXES: dict[tuple[str, tuple, tuple], MeshIndex] = {}
#: Distance indexes kept per process (one per file and placement).
MAX_INDEXES = 8


def _index(body: ImportedBody) -> MeshIndex:
    """The body's distance index, built once per file and placement in a process."""
    key = (body.digest, body.translate_mm, body.rotate_deg)
    found = _INDEXES.get(key)
    if found is None:
        if len(_INDEXES) >= MAX_INDEXES:
            _INDEXES.pop(next(iter(_INDEXES)))
        found = _INDEXES[key] = MeshIndex(body)
    return found


def _unit(n: np.ndarray) -> np.ndarray:
    length = np.linalg.norm(n, axis=-1, keepdims=True)
    return n / np.where(length > 0.0, length, 1.0)


def _triangle_grids(tri: np.ndarray, spacing: float) -> tuple[np.ndarray, np.ndarray]:
    """Points on each triangle and each point's triangle. From the corner A opposite the
    shortest edge BC, rows A + t (B - A) to A + t (C - A) at steps of t no longer than
    ``spacing`` along AB and AC, row t sampled with ceil(t |BC| / spacing) + 1 points
    from end to end: a sliver gets a line of points, not a square grid. Every point of a
    triangle lies within one ``spacing`` of one of its own samples: half a step along AB
    or AC to the nearer row, then half a step along it."""
    e = np.linalg.norm(tri[:, [1, 2, 0]] - tri[:, [2, 0, 1]], axis=2)  # edge opposite i
    apex = np.argmin(e, axis=1)
    rows = np.arange(len(tri))
    a = tri[rows, apex]
    b = tri[rows, (apex + 1) % 3]
    c = tri[rows, (apex + 2) % 3]
    longest = np.maximum(np.linalg.norm(b - a, axis=1), np.linalg.norm(c - a, axis=1))
    n_rows = np.maximum(1, np.ceil(longest / spacing)).astype(np.int64)
    n_base = np.ceil(e[rows, apex] / spacing).astype(np.int64)
    points, owner = [], []
    for k, m in np.unique(np.stack([n_rows, n_base], axis=1), axis=0):
        which = np.flatnonzero((n_rows == k) & (n_base == m))
        wb, wc = _row_pattern(int(k), int(m))
        aa, bb, cc = a[which], b[which], c[which]
        pts = (aa[:, None, :] + wb[None, :, None] * (bb - aa)[:, None, :]
               + wc[None, :, None] * (cc - aa)[:, None, :])
        points.append(pts.reshape(-1, 3))
        owner.append(np.repeat(which, len(wb)))
    return np.concatenate(points), np.concatenate(owner)


def _row_pattern(k: int, m: int) -> tuple[np.ndarray, np.ndarray]:
    """Weights of B - A and C - A of the samples of a triangle with ``k`` row steps and
    ``m`` steps along its base: row i at t = i / k with ceil(t m) + 1 points."""
    wb, wc = [], []
    for i in range(k + 1):
        t = i / k
        u = np.linspace(0.0, 1.0, int(np.ceil(t * m - 1e-9)) + 1) if i else np.zeros(1)
        wb.append(t * (1.0 - u))
        wc.append(t * u)
    return np.concatenate(wb), np.concatenate(wc)


def _closest_points(p: np.ndarray, tri: np.ndarray) -> np.ndarray:
    """Closest point of each triangle to each point, vectorised over any leading shape
    (the Voronoi-region walk of Ericson, Real-Time Collision Detection, 5.1.5)."""
    a, b, c = tri[..., 0, :], tri[..., 1, :], tri[..., 2, :]
    ab, ac, ap = b - a, c - a, p - a
    d1, d2 = _dot(ab, ap), _dot(ac, ap)
    bp = p - b
    d3, d4 = _dot(ab, bp), _dot(ac, bp)
    cp = p - c
    d5, d6 = _dot(ab, cp), _dot(ac, cp)
    va = d3 * d6 - d5 * d4
    vb = d5 * d2 - d1 * d6
    vc = d1 * d4 - d3 * d2
    # Inside the face: barycentric projection.
    denom = va + vb + vc
    denom = np.where(np.abs(denom) > 0.0, denom, 1.0)
    v = vb / denom
    w = vc / denom
    out = a + ab * v[..., None] + ac * w[..., None]
    # Edges (checked before vertices, which override them).
    bc_w = np.where((d4 - d3) + (d5 - d6) != 0.0, (d4 - d3) / _nz((d4 - d3) + (d5 - d6)), 0.0)
    on_bc = (va <= 0.0) & (d4 - d3 >= 0.0) & (d5 - d6 >= 0.0)
    out = np.where(on_bc[..., None], b + (c - b) * bc_w[..., None], out)
    ac_w = d2 / _nz(d2 - d6)
    on_ac = (vb <= 0.0) & (d2 >= 0.0) & (d6 <= 0.0)
    out = np.where(on_ac[..., None], a + ac * ac_w[..., None], out)
    ab_w = d1 / _nz(d1 - d3)
    on_ab = (vc <= 0.0) & (d1 >= 0.0) & (d3 <= 0.0)
    out = np.where(on_ab[..., None], a + ab * ab_w[..., None], out)
    out = np.where(((d6 >= 0.0) & (d5 <= d6))[..., None], c, out)
    out = np.where(((d3 >= 0.0) & (d4 <= d3))[..., None], b, out)
    out = np.where(((d1 <= 0.0) & (d2 <= 0.0))[..., None], a, out)
    return out


def _dot(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    return np.einsum("...c,...c->...", x, y)


def _nz(x: np.ndarray) -> np.ndarray:
    return np.where(x != 0.0, x, 1.0)
