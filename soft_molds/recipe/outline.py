"""Closed plane outlines in the body's (y, z) cross-section plane (or a plate's x-y
plane), with exact geometry.

Three families: a polygon whose corners may each be rounded by a circular arc tangent to
both edges (rectangles, circles, D shapes and free polygons are all of this family), a
chain of lines and arcs (``PieceOutline``: a hub with arms), and an axis-aligned
ellipse. Each gives its area in closed form, its exact signed distance (negative inside,
mm), its bounds, and its chord along one axis at a given value of the other. Frame: mm,
first coordinate y (across), second z (up); a plate's outline: x, y.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

#: Lengths below this are float noise (mm): an edge that short between two roundings is
#: left out, and two roundings may meet within it.
OUTLINE_EPS_MM = 1e-9


@dataclass(frozen=True)
class Line2:
    """A straight piece of an outline from ``start`` to ``end`` (y, z), mm."""

    start: tuple[float, float]
    end: tuple[float, float]


@dataclass(frozen=True)
class Arc2:
    """A circular piece: ``center`` and ``radius`` (mm), from the angle ``start_rad``
    turning by ``sweep_rad`` (positive counter-clockwise, |sweep| < 2 pi)."""

    center: tuple[float, float]
    radius: float
    start_rad: float
    sweep_rad: float

    def point(self, f: float) -> tuple[float, float]:
        """The point a fraction ``f`` of the way along the arc."""
        a = self.start_rad + f * self.sweep_rad
        return (self.center[0] + self.radius * float(np.cos(a)),
                self.center[1] + self.radius * float(np.sin(a)))

    @property
    def start(self) -> tuple[float, float]:
        return self.point(0.0)

    @property
    def end(self) -> tuple[float, float]:
        return self.point(1.0)


Piece2 = Line2 | Arc2


def _unit(v: np.ndarray) -> np.ndarray:
    return v / float(np.linalg.norm(v))


def turn_rad(prev: np.ndarray, at: np.ndarray, nxt: np.ndarray) -> float:
    """Signed turn (rad) of the outline at ``at``: positive to the left (counter-clockwise)."""
    a, b = _unit(at - prev), _unit(nxt - at)
    return float(np.arctan2(a[0] * b[1] - a[1] * b[0], float(a @ b)))


def shoelace_mm2(pts: np.ndarray) -> float:
    """Signed area (mm2) of a polygon, positive when counter-clockwise (shoelace formula)."""
    y, z = pts[:, 0], pts[:, 1]
    return 0.5 * float(np.sum(y * np.roll(z, -1) - np.roll(y, -1) * z))


def segments_cross(p1: np.ndarray, p2: np.ndarray, q1: np.ndarray, q2: np.ndarray) -> bool:
    """Whether the closed segments p1-p2 and q1-q2 share a point."""
    def orient(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> float:
        return float((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]))

    def on(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> bool:
        return bool(min(a[0], b[0]) - 1e-12 <= c[0] <= max(a[0], b[0]) + 1e-12 and
                    min(a[1], b[1]) - 1e-12 <= c[1] <= max(a[1], b[1]) + 1e-12)

    d1, d2 = orient(q1, q2, p1), orient(q1, q2, p2)
    d3, d4 = orient(p1, p2, q1), orient(p1, p2, q2)
    if ((d1 > 0 > d2) or (d1 < 0 < d2)) and ((d3 > 0 > d4) or (d3 < 0 < d4)):
        return True
    return ((d1 == 0 and on(q1, q2, p1)) or (d2 == 0 and on(q1, q2, p2)) or
            (d3 == 0 and on(p1, p2, q1)) or (d4 == 0 and on(p1, p2, q2)))


def polygon_problems(points: tuple[tuple[float, float], ...], rounds: tuple[float, ...],
                     min_size_mm: float) -> list[tuple[int, str, str]]:
    """What makes a rounded polygon unusable, as (point index, what is wrong, what is
    allowed): fewer than three points, two points closer than ``min_size_mm``, edges that
    cross or touch (a self-intersecting outline), no area, and roundings that do not fit:
    the roundings of the two corners of every edge take radius x tan(turn/2) of it each,
    and together no more than its length."""
    n = len(points)
    if n < 3:
        return [(0, "has fewer than three points", "at least three points [y, z]")]
    v = np.asarray(points, dtype=np.float64)
    out: list[tuple[int, str, str]] = []
    for i in range(n):
        j = (i + 1) % n
        if float(np.linalg.norm(v[j] - v[i])) < min_size_mm:
            out.append((j, f"lies within {min_size_mm:g} mm of point {i}",
                        f"points at least {min_size_mm:g} mm apart"))
    if out:
        return out
    for i in range(n):
        for j in range(i + 1, n):
            if j == i + 1 or (i == 0 and j == n - 1):
                continue  # neighbours share a corner
            if segments_cross(v[i], v[(i + 1) % n], v[j], v[(j + 1) % n]):
                return [(j, f"starts an edge that crosses or touches the edge from point "
                            f"{i} to point {(i + 1) % n}",
                         "an outline that does not cross itself (points in order round it)")]
    for i in range(n):
        a, b = _unit(v[i] - v[i - 1]), _unit(v[(i + 1) % n] - v[i])
        if float(a @ b) < -1.0 + 1e-12:
            return [(i, "turns back on the edge it came along",
                     "an outline that does not cross itself")]
    if abs(shoelace_mm2(v)) < min_size_mm ** 2:
        return [(0, "encloses no area", "points that enclose an area")]
    ccw = v if shoelace_mm2(v) > 0 else v[::-1]
    rr = list(rounds) if shoelace_mm2(v) > 0 else list(rounds)[::-1]
    tan = [rr[i] * float(np.tan(abs(turn_rad(ccw[i - 1], ccw[i], ccw[(i + 1) % n])) / 2.0))
           for i in range(n)]
    for i in range(n):
        j = (i + 1) % n
        need, edge = tan[i] + tan[j], float(np.linalg.norm(ccw[j] - ccw[i]))
        if need > edge * (1.0 + 1e-9) + OUTLINE_EPS_MM:
            k = i if tan[i] >= tan[j] else j
            orig = k if shoelace_mm2(v) > 0 else n - 1 - k
            oi, oj = (i, j) if shoelace_mm2(v) > 0 else (n - 1 - i, n - 1 - j)
            out.append((orig, f"has a rounding that does not fit the edge from point "
                        f"{min(oi, oj)} to point {max(oi, oj)}: the two roundings need "
                        f"{need:.3f} mm of it, it is {edge:.3f} mm long",
                        "smaller roundings (each takes radius x tan(turn/2) of both edges)"))
    if out:
        return out
    crossing = _rounded_crossing(RoundedPolygon(points, rounds))
    if crossing is not None:
        near = int(np.argmin(np.linalg.norm(v - crossing, axis=1)))
        return [(near, "has a rounding that makes the outline cross itself near "
                 f"({crossing[0]:.2f}, {crossing[1]:.2f}) mm",
                 "smaller roundings there, or points farther apart")]
    return out


#: Angle (rad) between the points an arc is traced by when looking for crossings.
TRACE_STEP_RAD = np.pi / 36.0


def _rounded_crossing(poly: RoundedPolygon) -> np.ndarray | None:
    """A point where the rounded outline, traced as a polyline (arcs by their chords every
    TRACE_STEP_RAD), crosses itself, or None. The sharp polygon is known not to cross;
    a concave rounding can still bulge across another edge."""
    return chain_crossing(poly.pieces())


def chain_crossing(pieces: tuple[Piece2, ...]) -> np.ndarray | None:
    """A point where a closed chain of pieces, traced as a polyline (arcs by their chords
    every TRACE_STEP_RAD), crosses itself, or None."""
    pts: list[tuple[float, float]] = []
    for p in pieces:
        if isinstance(p, Line2):
            pts.append(p.start)
        else:
            k = max(2, int(np.ceil(abs(p.sweep_rad) / TRACE_STEP_RAD)))
            pts += [p.point(i / k) for i in range(k)]
    a = np.asarray(pts)
    b = np.roll(a, -1, axis=0)
    n = len(a)
    i, j = np.triu_indices(n, 2)
    keep = ~((i == 0) & (j == n - 1))
    i, j = i[keep], j[keep]

    def orient(p: np.ndarray, q: np.ndarray, r: np.ndarray) -> np.ndarray:
        return (q[:, 0] - p[:, 0]) * (r[:, 1] - p[:, 1]) - (q[:, 1] - p[:, 1]) * (r[:, 0] - p[:, 0])

    d1, d2 = orient(a[j], b[j], a[i]), orient(a[j], b[j], b[i])
    d3, d4 = orient(a[i], b[i], a[j]), orient(a[i], b[i], b[j])
    hit = (d1 * d2 < 0.0) & (d3 * d4 < 0.0)
    if not hit.any():
        return None
    k = int(np.flatnonzero(hit)[0])
    f = d1[k] / (d1[k] - d2[k])
    return a[i[k]] + f * (b[i[k]] - a[i[k]])


@functools.lru_cache(maxsize=256)
def _rounded_pieces(points: tuple[tuple[float, float], ...], rounds: tuple[float, ...]
                    ) -> tuple[Piece2, ...]:
    v = np.asarray(points, dtype=np.float64)
    n = len(v)
    raw: list[Piece2] = []
    t_in: list[np.ndarray] = []
    t_out: list[np.ndarray] = []
    arcs: list[Arc2 | None] = []
    for i in range(n):
        prev, at, nxt = v[i - 1], v[i], v[(i + 1) % n]
        turn = turn_rad(prev, at, nxt)
        r = rounds[i]
        if r <= 0.0 or abs(turn) < 1e-12:
            t_in.append(at)
            t_out.append(at)
            arcs.append(None)
            continue
        a, b = _unit(at - prev), _unit(nxt - at)
        t = r * float(np.tan(abs(turn) / 2.0))
        ti = prev if t >= np.linalg.norm(at - prev) - OUTLINE_EPS_MM else at - a * t
        to = nxt if t >= np.linalg.norm(nxt - at) - OUTLINE_EPS_MM else at + b * t
        left = np.array([-a[1], a[0]])
        c = ti + (left if turn > 0 else -left) * r
        start = float(np.arctan2(ti[1] - c[1], ti[0] - c[0]))
        t_in.append(ti)
        t_out.append(to)
        arcs.append(Arc2((float(c[0]), float(c[1])), r, start, turn))
    for i in range(n):
        arc = arcs[i]
        if arc is not None:
            raw.append(arc)
        a, b = t_out[i], t_in[(i + 1) % n]
        if float(np.linalg.norm(b - a)) > OUTLINE_EPS_MM:
            raw.append(Line2((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))))
    return _merge_arcs(raw)


def _merge_arcs(pieces: list[Piece2]) -> tuple[Piece2, ...]:
    """Neighbouring arcs of one circle joined (a D shape's two top roundings are one half
    circle), while the joined arc stays under a full turn."""
    out: list[Piece2] = []
    for p in pieces:
        last = out[-1] if out else None
        if (isinstance(p, Arc2) and isinstance(last, Arc2) and
                np.allclose(p.center, last.center, atol=1e-9) and
                abs(p.radius - last.radius) < 1e-9 and
                np.sign(p.sweep_rad) == np.sign(last.sweep_rad) and
                abs(last.sweep_rad + p.sweep_rad) < 1.5 * np.pi):
            out[-1] = Arc2(last.center, last.radius, last.start_rad,
                           last.sweep_rad + p.sweep_rad)
        else:
            out.append(p)
    if len(out) > 1:
        first, last = out[0], out[-1]
        if (isinstance(first, Arc2) and isinstance(last, Arc2) and
                np.allclose(first.center, last.center, atol=1e-9) and
                abs(first.radius - last.radius) < 1e-9 and
                np.sign(first.sweep_rad) == np.sign(last.sweep_rad) and
                abs(last.sweep_rad + first.sweep_rad) < 1.5 * np.pi):
            out = [Arc2(last.center, last.radius, last.start_rad,
                        last.sweep_rad + first.sweep_rad), *out[1:-1]]
    return tuple(out)


def _arc_distance(q: np.ndarray, arc: Arc2) -> np.ndarray:
    c = np.asarray(arc.center)
    d = q - c
    ang = np.arctan2(d[:, 1], d[:, 0])
    lo = arc.start_rad if arc.sweep_rad > 0 else arc.start_rad + arc.sweep_rad
    rel = np.mod(ang - lo, 2 * np.pi)
    on = rel <= abs(arc.sweep_rad)
    ends = np.minimum(np.linalg.norm(q - np.asarray(arc.start), axis=1),
                      np.linalg.norm(q - np.asarray(arc.end), axis=1))
    return np.where(on, np.abs(np.linalg.norm(d, axis=1) - arc.radius), ends)


def _segment_distance(q: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    ab = b - a
    t = np.clip(((q - a) @ ab) / float(ab @ ab), 0.0, 1.0)
    return np.linalg.norm(q - (a + t[:, None] * ab), axis=1)


def _inside_polygon(q: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Even-odd point-in-polygon test (crossings of a ray towards +y)."""
    inside = np.zeros(len(q), dtype=bool)
    y, z = q[:, 0], q[:, 1]
    for i in range(len(v)):
        (y0, z0), (y1, z1) = v[i - 1], v[i]
        if z0 == z1:
            continue
        cross = (z0 > z) != (z1 > z)
        yc = y0 + (z - z0) * (y1 - y0) / (z1 - z0)
        inside ^= cross & (y < yc)
    return inside


def pieces_bounds(pieces: tuple[Piece2, ...]) -> tuple[tuple[float, float], tuple[float, float]]:
    """((lo, lo), (hi, hi)) of a chain of pieces, mm, exact (arc extremes included)."""
    pts: list[tuple[float, float]] = []
    for p in pieces:
        pts += [p.start, p.end]
        if isinstance(p, Arc2):
            for k in range(-5, 6):
                ang = k * np.pi / 2.0
                lo = min(p.start_rad, p.start_rad + p.sweep_rad)
                hi = max(p.start_rad, p.start_rad + p.sweep_rad)
                if lo <= ang <= hi:
                    pts.append((p.center[0] + p.radius * float(np.cos(ang)),
                                p.center[1] + p.radius * float(np.sin(ang))))
    a = np.asarray(pts)
    return ((float(a[:, 0].min()), float(a[:, 1].min())),
            (float(a[:, 0].max()), float(a[:, 1].max())))


def pieces_chords(pieces: tuple[Piece2, ...], v: int, t: np.ndarray
                  ) -> tuple[np.ndarray, np.ndarray]:
    """Extent (lo, hi) along coordinate ``v`` of the section of the closed chain by the
    lines ``coord[1 - v] = t`` (arrays; nan where a line misses). Exact: the least and
    greatest crossing of each line with the pieces."""
    w = 1 - v
    t = np.asarray(t, dtype=np.float64)
    lo = np.full(t.shape, np.inf)
    hi = np.full(t.shape, -np.inf)
    for p in pieces:
        if isinstance(p, Line2):
            a, b = np.asarray(p.start), np.asarray(p.end)
            if abs(b[w] - a[w]) < 1e-15:
                hit = np.abs(t - a[w]) <= 1e-12
                for val in (a[v], b[v]):
                    lo = np.where(hit, np.minimum(lo, val), lo)
                    hi = np.where(hit, np.maximum(hi, val), hi)
                continue
            f = (t - a[w]) / (b[w] - a[w])
            hit = (f >= -1e-12) & (f <= 1 + 1e-12)
            val = a[v] + np.clip(f, 0.0, 1.0) * (b[v] - a[v])
            lo = np.where(hit, np.minimum(lo, val), lo)
            hi = np.where(hit, np.maximum(hi, val), hi)
            continue
        c, r = p.center, p.radius
        off = t - c[w]
        h = np.sqrt(np.maximum(r * r - off * off, 0.0))
        ok = np.abs(off) <= r * (1 + 1e-12)
        for sgn in (-1.0, 1.0):
            pv = c[v] + sgn * h
            pt = np.stack([pv, t], axis=-1) if v == 0 else np.stack([t, pv], axis=-1)
            ang = np.arctan2(pt[..., 1] - c[1], pt[..., 0] - c[0])
            start = p.start_rad if p.sweep_rad > 0 else p.start_rad + p.sweep_rad
            on = np.mod(ang - start + 1e-12, 2 * np.pi) <= abs(p.sweep_rad) + 2e-12
            hit = ok & on
            lo = np.where(hit, np.minimum(lo, pv), lo)
            hi = np.where(hit, np.maximum(hi, pv), hi)
    miss = ~np.isfinite(lo)
    return np.where(miss, np.nan, lo), np.where(miss, np.nan, hi)


def pieces_boundary(pieces: tuple[Piece2, ...], spacing_mm: float) -> np.ndarray:
    """Points on the chain at most ``spacing_mm`` apart, (n, 2)."""
    out = []
    for p in pieces:
        if isinstance(p, Line2):
            a, b = np.asarray(p.start), np.asarray(p.end)
            k = max(1, int(np.ceil(np.linalg.norm(b - a) / spacing_mm)))
            f = np.arange(k) / k
            out.append(a + f[:, None] * (b - a))
        else:
            k = max(2, int(np.ceil(abs(p.sweep_rad) * p.radius / spacing_mm)))
            out.append(np.asarray([p.point(i / k) for i in range(k)]))
    return np.concatenate(out)


@dataclass(frozen=True)
class RoundedPolygon:
    """A polygon through ``points`` (y, z), mm, in either order round it, each corner
    rounded by ``rounds_mm`` (one per point, 0 = sharp) with an arc tangent to both of
    its edges. :func:`polygon_problems` says what makes one invalid."""

    points: tuple[tuple[float, float], ...]
    rounds_mm: tuple[float, ...]

    def _ccw(self) -> tuple[tuple[tuple[float, float], ...], tuple[float, ...]]:
        if shoelace_mm2(np.asarray(self.points)) > 0:
            return self.points, self.rounds_mm
        return self.points[::-1], self.rounds_mm[::-1]

    def pieces(self) -> tuple[Piece2, ...]:
        """The outline counter-clockwise: lines and rounding arcs."""
        return _rounded_pieces(*self._ccw())

    def _fillets(self) -> list[tuple[np.ndarray, float, float]]:
        """(kite corners corner, t_in, centre, t_out; radius; turn) of every rounding."""
        pts, rr = self._ccw()
        v = np.asarray(pts, dtype=np.float64)
        out = []
        for i in range(len(v)):
            turn = turn_rad(v[i - 1], v[i], v[(i + 1) % len(v)])
            if rr[i] <= 0.0 or abs(turn) < 1e-12:
                continue
            a, b = _unit(v[i] - v[i - 1]), _unit(v[(i + 1) % len(v)] - v[i])
            t = rr[i] * float(np.tan(abs(turn) / 2.0))
            ti, to = v[i] - a * t, v[i] + b * t
            left = np.array([-a[1], a[0]])
            c = ti + (left if turn > 0 else -left) * rr[i]
            out.append((np.stack([v[i], ti, c, to]), rr[i], turn))
        return out

    def area_mm2(self) -> float:
        """Closed form: the shoelace area of the sharp polygon, less r^2 (tan(phi/2) - phi/2)
        for every convex rounding of turn phi (the kite corner-tangent-centre-tangent less
        the circular sector), plus that for every concave one."""
        pts, rr = self._ccw()
        v = np.asarray(pts, dtype=np.float64)
        area = shoelace_mm2(v)
        for i in range(len(v)):
            phi = turn_rad(v[i - 1], v[i], v[(i + 1) % len(v)])
            piece = rr[i] ** 2 * (float(np.tan(abs(phi) / 2.0)) - abs(phi) / 2.0)
            area += -piece if phi > 0 else piece
        return area

    def sdf(self, q: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm) of points ``q`` (n, 2): the least distance to a
        piece, negative inside. Inside is inside the sharp polygon, except in the corner
        left outside a convex rounding, and also in the one a concave rounding adds (each
        such corner region: the kite corner-tangent-centre-tangent outside the circle)."""
        q = np.asarray(q, dtype=np.float64).reshape(-1, 2)
        d = np.full(len(q), np.inf)
        for p in self.pieces():
            if isinstance(p, Line2):
                e = _segment_distance(q, np.asarray(p.start), np.asarray(p.end))
            else:
                e = _arc_distance(q, p)
            np.minimum(d, e, out=d)
        pts, _ = self._ccw()
        inside = _inside_polygon(q, np.asarray(pts, dtype=np.float64))
        for kite, r, _turn in self._fillets():
            in_kite = _inside_polygon(q, kite)
            beyond = np.linalg.norm(q - kite[2], axis=1) > r
            inside ^= in_kite & beyond
        return np.where(inside, -d, d)

    def bounds(self) -> tuple[tuple[float, float], tuple[float, float]]:
        """((y_lo, z_lo), (y_hi, z_hi)), mm, exact (arc extremes included)."""
        return pieces_bounds(self.pieces())

    def chords(self, v: int, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Extent (lo, hi) along coordinate ``v`` (0 = y, 1 = z) of the outline's section
        by the lines ``coord[1 - v] = t`` (arrays; nan where a line misses). Exact: the
        least and greatest crossing of each line with the pieces."""
        return pieces_chords(self.pieces(), v, t)

    def boundary(self, spacing_mm: float) -> np.ndarray:
        """Points on the outline at most ``spacing_mm`` apart, (n, 2)."""
        return pieces_boundary(self.pieces(), spacing_mm)


def arc_segment_mm2(arc: Arc2) -> float:
    """Signed area (mm2) between an arc and its chord: r^2 (t - sin t) / 2 for the turn
    t = |sweep| (the sector less the triangle centre-start-end), positive for a
    counter-clockwise arc (it adds to a counter-clockwise outline)."""
    t = abs(arc.sweep_rad)
    return float(np.sign(arc.sweep_rad)) * arc.radius ** 2 * (t - float(np.sin(t))) / 2.0


def _in_segment(q: np.ndarray, arc: Arc2) -> np.ndarray:
    """Points inside the circular segment between ``arc`` and its chord: in the disc and
    on the chord's side where the arc's middle lies (any sweep below a full turn)."""
    c = np.asarray(arc.center)
    a, b, m = np.asarray(arc.start), np.asarray(arc.end), np.asarray(arc.point(0.5))
    e = b - a

    def side(p: np.ndarray) -> np.ndarray:
        return e[0] * (p[..., 1] - a[1]) - e[1] * (p[..., 0] - a[0])

    in_disc = np.linalg.norm(q - c, axis=1) < arc.radius
    return in_disc & (np.sign(side(q)) == np.sign(side(m)))


@dataclass(frozen=True)
class PieceOutline:
    """A closed outline given as its ``chain`` of pieces (lines and arcs, mm), each
    starting where the one before ends, the last ending where the first starts, either
    way round; it must not cross itself (its maker checks). Same protocol as
    :class:`RoundedPolygon`: exact area, signed distance, bounds, chords and boundary."""

    chain: tuple[Piece2, ...]

    def pieces(self) -> tuple[Piece2, ...]:
        return self.chain

    def area_mm2(self) -> float:
        """Exact, by Green's theorem: (1/2) closed integral of (x dy - y dx). A line from a
        to b gives (a_x b_y - b_x a_y) / 2; an arc of centre c, radius r from angle a0 to a1
        gives (r^2 (a1 - a0) + r c_x (sin a1 - sin a0) - r c_y (cos a1 - cos a0)) / 2.
        Positive whichever way round the pieces run."""
        return abs(self._signed_area_mm2())

    def _signed_area_mm2(self) -> float:
        total = 0.0
        for p in self.chain:
            if isinstance(p, Line2):
                (ax, ay), (bx, by) = p.start, p.end
                total += ax * by - bx * ay
            else:
                a0, a1 = p.start_rad, p.start_rad + p.sweep_rad
                (cx, cy), r = p.center, p.radius
                total += (r * r * p.sweep_rad + r * cx * (np.sin(a1) - np.sin(a0))
                          - r * cy * (np.cos(a1) - np.cos(a0)))
        return 0.5 * float(total)

    def chord_polygon(self) -> np.ndarray:
        """The corners of the polygon that joins every piece's start to its end (n, 2)."""
        return np.asarray([p.start for p in self.chain], dtype=np.float64)

    def sdf(self, q: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm), negative inside: the least distance to a piece.
        Inside by the even-odd rule of the closed chain, which is the chord polygon's rule
        toggled by every circular segment between an arc and its chord (the chain is the
        chord polygon plus, for each arc, the closed loop arc + chord back)."""
        q = np.asarray(q, dtype=np.float64).reshape(-1, 2)
        d = np.full(len(q), np.inf)
        for p in self.chain:
            if isinstance(p, Line2):
                e = _segment_distance(q, np.asarray(p.start), np.asarray(p.end))
            else:
                e = _arc_distance(q, p)
            np.minimum(d, e, out=d)
        inside = _inside_polygon(q, self.chord_polygon())
        for p in self.chain:
            if isinstance(p, Arc2):
                inside ^= _in_segment(q, p)
        return np.where(inside, -d, d)

    def bounds(self) -> tuple[tuple[float, float], tuple[float, float]]:
        """((x_lo, y_lo), (x_hi, y_hi)), mm, exact (arc extremes included)."""
        return pieces_bounds(self.chain)

    def chords(self, v: int, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Extent (lo, hi) along coordinate ``v`` of the section by ``coord[1 - v] = t``."""
        return pieces_chords(self.chain, v, t)

    def boundary(self, spacing_mm: float) -> np.ndarray:
        """Points on the outline at most ``spacing_mm`` apart, (n, 2)."""
        return pieces_boundary(self.chain, spacing_mm)

    def moved(self, dx: float, dy: float) -> PieceOutline:
        """The same outline moved by (dx, dy) mm."""
        out: list[Piece2] = []
        for p in self.chain:
            if isinstance(p, Line2):
                out.append(Line2((p.start[0] + dx, p.start[1] + dy),
                                 (p.end[0] + dx, p.end[1] + dy)))
            else:
                out.append(Arc2((p.center[0] + dx, p.center[1] + dy), p.radius, p.start_rad,
                                p.sweep_rad))
        return PieceOutline(tuple(out))


def _piece_tangent(p: Piece2, at_end: bool) -> np.ndarray:
    """Unit direction of travel of ``p`` at its start or end."""
    if isinstance(p, Line2):
        return _unit(np.asarray(p.end) - np.asarray(p.start))
    a = p.start_rad + (p.sweep_rad if at_end else 0.0)
    return float(np.sign(p.sweep_rad)) * np.array([-np.sin(a), np.cos(a)])


def _reversed(p: Piece2) -> Piece2:
    if isinstance(p, Line2):
        return Line2(p.end, p.start)
    return Arc2(p.center, p.radius, p.start_rad + p.sweep_rad, -p.sweep_rad)


def _signed_turn(t1: np.ndarray, t2: np.ndarray) -> float:
    return float(np.arctan2(t1[0] * t2[1] - t1[1] * t2[0], float(t1 @ t2)))


def _meet(a: list, b: list, near: np.ndarray) -> np.ndarray | None:
    """The point nearest ``near`` where the offset pieces ``a`` and ``b`` (each ["line",
    p, q] or ["arc", centre, radius, a0, a1], taken as the whole line or circle) meet."""
    def as_line(x: list) -> tuple[np.ndarray, np.ndarray]:
        return x[1], _unit(x[2] - x[1])

    found: list[np.ndarray] = []
    if a[0] == "line" and b[0] == "line":
        (p, u), (q, v) = as_line(a), as_line(b)
        den = u[0] * v[1] - u[1] * v[0]
        if abs(den) < 1e-15:
            return None
        t = ((q[0] - p[0]) * v[1] - (q[1] - p[1]) * v[0]) / den
        return p + t * u
    if a[0] == "arc" and b[0] == "arc":
        c1, r1, c2, r2 = a[1], a[2], b[1], b[2]
        e = c2 - c1
        dist = float(np.linalg.norm(e))
        if dist < 1e-15:
            return None
        x = (dist * dist + r1 * r1 - r2 * r2) / (2.0 * dist)
        h2 = r1 * r1 - x * x
        if h2 < -1e-12:
            return None
        h = float(np.sqrt(max(h2, 0.0)))
        u = e / dist
        n = np.array([-u[1], u[0]])
        found = [c1 + x * u + h * n, c1 + x * u - h * n]
    else:
        line, arc = (a, b) if a[0] == "line" else (b, a)
        p, u = as_line(line)
        c, r = arc[1], arc[2]
        f = p - c
        bq = float(f @ u)
        disc = bq * bq - (float(f @ f) - r * r)
        if disc < -1e-12:
            return None
        root = float(np.sqrt(max(disc, 0.0)))
        found = [p + (-bq + root) * u, p + (-bq - root) * u]
    return min(found, key=lambda x: float(np.linalg.norm(x - near)))


def _unwrap_near(a: float, ref: float) -> float:
    return ref + float((a - ref + np.pi) % (2.0 * np.pi) - np.pi)


def offset_outline(outline: RoundedPolygon | PieceOutline, d_mm: float
                   ) -> PieceOutline | None:
    """The outline's parallel curve ``d_mm`` inside it (outside when negative), exact: every
    line moves along its normal, every arc keeps its centre and gains or loses ``d_mm`` of
    radius, and at a corner the moved pieces are cut back to where they meet (the corner
    turning away from the offset) or joined by an arc of radius |d| about the corner (a
    corner turning towards it: a concave corner moved in, a convex one moved out). A
    rounding that would shrink to nothing is first replaced by the sharp corner of its
    tangents. None when the offset changes the outline's topology: an edge shrinks past
    nothing, or the result crosses itself (the margin does not fit)."""
    pieces = list(outline.pieces())
    if PieceOutline(tuple(pieces))._signed_area_mm2() < 0.0:
        pieces = [_reversed(p) for p in reversed(pieces)]
    if d_mm == 0.0:
        return PieceOutline(tuple(pieces))
    # Arcs of one circle in a row are one rounding (a round tip drawn as two quarters).
    pieces = list(_merge_arcs(pieces))
    flat: list[Piece2] = []
    n = len(pieces)
    for i, p in enumerate(pieces):
        if isinstance(p, Arc2) and p.sweep_rad * d_mm > 0.0 and \
                p.radius <= abs(d_mm) + OUTLINE_EPS_MM:
            prev, nxt = pieces[i - 1], pieces[(i + 1) % n]
            smooth = (abs(_signed_turn(_piece_tangent(prev, True), _piece_tangent(p, False)))
                      < 1e-9 and abs(_signed_turn(_piece_tangent(p, True),
                                                  _piece_tangent(nxt, False))) < 1e-9)
            if not smooth or abs(p.sweep_rad) >= np.pi - 1e-9:
                return None  # not a rounding of a corner: the outline vanishes there
            corner = _meet(["line", np.asarray(p.start),
                            np.asarray(p.start) + _piece_tangent(p, False)],
                           ["line", np.asarray(p.end),
                            np.asarray(p.end) + _piece_tangent(p, True)], np.asarray(p.start))
            if corner is None:
                return None
            flat += [Line2(p.start, (float(corner[0]), float(corner[1]))),
                     Line2((float(corner[0]), float(corner[1])), p.end)]
        else:
            flat.append(p)
    flat = _joined_lines(flat)
    moved: list[list] = []
    for p in flat:
        if isinstance(p, Line2):
            t = _piece_tangent(p, False)
            shift = d_mm * np.array([-t[1], t[0]])  # the left normal: inside, counter-clockwise
            moved.append(["line", np.asarray(p.start) + shift, np.asarray(p.end) + shift, p])
        else:
            r = p.radius - d_mm * float(np.sign(p.sweep_rad))
            if r <= OUTLINE_EPS_MM:
                return None
            moved.append(["arc", np.asarray(p.center), r, p.start_rad,
                          p.start_rad + p.sweep_rad, p])
    out: list[list] = []
    m = len(flat)
    for i in range(m):
        out.append(moved[i])
        j = (i + 1) % m
        corner = np.asarray(flat[i].end)
        turn = _signed_turn(_piece_tangent(flat[i], True), _piece_tangent(flat[j], False))
        if abs(turn) < 1e-9:
            continue
        if turn * d_mm > 0.0:  # the moved pieces overlap: cut both back to their meeting
            x = _meet(moved[i], moved[j], corner)
            if x is None:
                return None
            _set_end(moved[i], x, True)
            _set_end(moved[j], x, False)
        else:
            a_end = _end_of(moved[i], True)
            start = float(np.arctan2(a_end[1] - corner[1], a_end[0] - corner[0]))
            out.append(["arc", corner, abs(d_mm), start, start + turn, None])
    chain: list[Piece2] = []
    for item in out:
        if item[0] == "line":
            a, b, orig = item[1], item[2], item[3]
            length = float(np.linalg.norm(b - a))
            if length < OUTLINE_EPS_MM:
                continue
            if float((b - a) @ (np.asarray(orig.end) - np.asarray(orig.start))) <= 0.0:
                return None  # the edge turned round: shorter than the offset eats
            chain.append(Line2((float(a[0]), float(a[1])), (float(b[0]), float(b[1]))))
        else:
            c, r, a0, a1, orig = item[1], item[2], item[3], item[4], item[5]
            sweep = a1 - a0
            if orig is not None and (np.sign(sweep) != np.sign(orig.sweep_rad)
                                     or abs(sweep) > abs(orig.sweep_rad) + 1e-9):
                return None
            if abs(sweep) * r < OUTLINE_EPS_MM:
                continue
            chain.append(Arc2((float(c[0]), float(c[1])), float(r), _wrapped(a0), float(sweep)))
    if len(chain) < 2 or chain_crossing(tuple(chain)) is not None:
        return None
    result = PieceOutline(tuple(chain))
    # Squeezed flat (two edges meeting face to face) is no outline either.
    return result if result._signed_area_mm2() > OUTLINE_EPS_MM else None


def _joined_lines(pieces: list[Piece2]) -> list[Piece2]:
    """Neighbouring lines that run straight on joined into one (a rounding replaced by its
    sharp corner leaves its two tangent pieces in line with the edges)."""
    out: list[Piece2] = []
    for p in pieces:
        last = out[-1] if out else None
        if (isinstance(p, Line2) and isinstance(last, Line2) and
                abs(_signed_turn(_piece_tangent(last, True), _piece_tangent(p, False))) < 1e-9):
            out[-1] = Line2(last.start, p.end)
        else:
            out.append(p)
    first, last = out[0], out[-1]
    if (len(out) > 2 and isinstance(first, Line2) and isinstance(last, Line2) and
            abs(_signed_turn(_piece_tangent(last, True), _piece_tangent(first, False))) < 1e-9):
        out = [Line2(last.start, first.end), *out[1:-1]]
    return out


def _end_of(x: list, at_end: bool) -> np.ndarray:
    if x[0] == "line":
        return x[2] if at_end else x[1]
    a = x[4] if at_end else x[3]
    return x[1] + x[2] * np.array([np.cos(a), np.sin(a)])


def _set_end(x: list, point: np.ndarray, at_end: bool) -> None:
    """Move an end of the offset piece ``x`` to ``point`` (on its line or circle)."""
    if x[0] == "line":
        x[2 if at_end else 1] = point
        return
    k = 4 if at_end else 3
    x[k] = _unwrap_near(float(np.arctan2(point[1] - x[1][1], point[0] - x[1][0])), x[k])


def _wrapped(a: float) -> float:
    """An angle (rad) brought into [-pi, pi)."""
    return float((a + np.pi) % (2.0 * np.pi) - np.pi)


def hub_pieces(center: tuple[float, float], radius_mm: float, angles_rad: tuple[float, ...],
               length_mm: float, width_mm: float, tip_round_mm: float) -> tuple[Piece2, ...]:
    """Counter-clockwise outline of a hub disc of ``radius_mm`` about ``center`` with
    straight arms of ``width_mm`` pointing along ``angles_rad`` (ascending, each arm's
    tip ``length_mm`` from the centre, its two tip corners rounded by ``tip_round_mm``,
    half the width giving a round tip): hub arcs between the arms, each arm's sides from
    the hub circle (where they meet it at sqrt(R^2 - (w/2)^2) along the arm) to the tip.
    The caller has checked the arms clear each other and the hub (see the plate kind)."""
    cx, cy = center
    h, rho = width_mm / 2.0, tip_round_mm
    reach = float(np.sqrt(radius_mm ** 2 - h * h))
    half_gap = float(np.arcsin(h / radius_mm))
    out: list[Piece2] = []

    def at(u: np.ndarray, n: np.ndarray, s: float, o: float) -> tuple[float, float]:
        return (cx + s * float(u[0]) + o * float(n[0]), cy + s * float(u[1]) + o * float(n[1]))

    n_arms = len(angles_rad)
    for i, th in enumerate(angles_rad):
        u = np.array([np.cos(th), np.sin(th)])
        n = np.array([-u[1], u[0]])
        side_end = length_mm - rho
        out.append(Line2(at(u, n, reach, -h), at(u, n, side_end, -h)))
        if rho > 0.0:
            out.append(Arc2(at(u, n, side_end, -(h - rho)), rho, _wrapped(th - np.pi / 2.0),
                            np.pi / 2.0))
        if h - rho > OUTLINE_EPS_MM:
            out.append(Line2(at(u, n, length_mm, -(h - rho)), at(u, n, length_mm, h - rho)))
        if rho > 0.0:
            out.append(Arc2(at(u, n, side_end, h - rho), rho, _wrapped(th), np.pi / 2.0))
        out.append(Line2(at(u, n, side_end, h), at(u, n, reach, h)))
        nxt = angles_rad[(i + 1) % n_arms] + (2.0 * np.pi if i + 1 == n_arms else 0.0)
        sweep = (nxt - half_gap) - (th + half_gap)
        out.append(Arc2((cx, cy), radius_mm, _wrapped(th + half_gap), sweep))
    return tuple(out)


@dataclass(frozen=True)
class Ellipse:
    """An axis-aligned ellipse: centre (y, z) and semi-axes along y and z, mm."""

    center: tuple[float, float]
    semi_y_mm: float
    semi_z_mm: float

    def area_mm2(self) -> float:
        """pi a b."""
        return float(np.pi * self.semi_y_mm * self.semi_z_mm)

    def sdf(self, q: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the foot point on the ellipse found by bisection on
        the parameter of the normal line (D. Eberly, "Distance from a point to an
        ellipse", Geometric Tools, 2013), converged to float precision."""
        q = np.asarray(q, dtype=np.float64).reshape(-1, 2) - np.asarray(self.center)
        a, b = self.semi_y_mm, self.semi_z_mm
        swap = a < b
        e0, e1 = (b, a) if swap else (a, b)
        y0 = np.abs(q[:, 1] if swap else q[:, 0])
        y1 = np.abs(q[:, 0] if swap else q[:, 1])
        inside = (y0 / e0) ** 2 + (y1 / e1) ** 2 < 1.0
        if e0 == e1:
            return np.hypot(y0, y1) - e0
        dist = np.empty(len(q))
        # General case y1 > 0: bisection for s in g(s) = (r0 z0/(s+r0))^2 + (z1/(s+1))^2 - 1.
        r0 = (e0 / e1) ** 2
        z0, z1 = y0 / e0, y1 / e1
        g = z0 * z0 + z1 * z1 - 1.0
        n0 = r0 * z0
        s0 = z1 - 1.0
        s1 = np.where(g < 0.0, 0.0, np.hypot(n0, z1) - 1.0)
        for _ in range(160):
            s = 0.5 * (s0 + s1)
            val = (n0 / (s + r0)) ** 2 + (z1 / (s + 1.0)) ** 2 - 1.0
            s0 = np.where(val > 0.0, s, s0)
            s1 = np.where(val > 0.0, s1, s)
        s = 0.5 * (s0 + s1)
        with np.errstate(divide="ignore", invalid="ignore"):
            x0 = r0 * y0 / (s + r0)
            x1 = y1 / (s + 1.0)
        general = np.hypot(x0 - y0, x1 - y1)
        # y1 = 0: the foot is on the major axis's end or off the axis (Eberly's cases).
        numer = e0 * y0
        denom = e0 * e0 - e1 * e1
        xde = np.minimum(numer / denom, 1.0)
        axis = np.where(numer < denom,
                        np.hypot(e0 * xde - y0, e1 * np.sqrt(np.maximum(1 - xde * xde, 0.0))),
                        np.abs(y0 - e0))
        dist = np.where(y1 > 0.0, np.where(y0 > 0.0, general, np.abs(y1 - e1)), axis)
        return np.where(inside, -dist, dist)

    def bounds(self) -> tuple[tuple[float, float], tuple[float, float]]:
        (cy, cz), a, b = self.center, self.semi_y_mm, self.semi_z_mm
        return ((cy - a, cz - b), (cy + a, cz + b))

    def chords(self, v: int, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Extent along ``v`` of the section by ``coord[1 - v] = t``: centre +- the half
        chord semi_v sqrt(1 - (t / semi_w)^2); nan where the line misses."""
        semi = (self.semi_y_mm, self.semi_z_mm)
        u = (np.asarray(t, dtype=np.float64) - self.center[1 - v]) / semi[1 - v]
        h = semi[v] * np.sqrt(np.where(np.abs(u) <= 1.0, 1.0 - u * u, np.nan))
        return self.center[v] - h, self.center[v] + h

    def boundary(self, spacing_mm: float) -> np.ndarray:
        perimeter = np.pi * (3 * (self.semi_y_mm + self.semi_z_mm)
                             - np.sqrt((3 * self.semi_y_mm + self.semi_z_mm)
                                       * (self.semi_y_mm + 3 * self.semi_z_mm)))
        k = max(8, int(np.ceil(perimeter / spacing_mm)))
        ang = np.arange(k) * 2 * np.pi / k
        return np.stack([self.center[0] + self.semi_y_mm * np.cos(ang),
                         self.center[1] + self.semi_z_mm * np.sin(ang)], axis=1)


Outline = RoundedPolygon | Ellipse
#: An outline with straight and circular pieces only (what a plate is drawn with).
PlaneOutline = RoundedPolygon | PieceOutline
