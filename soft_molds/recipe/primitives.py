"""Pure-data solids that body and void kinds are made of.

A kind turns its recipe fields into a few primitives; the geometry stage knows how to
build each primitive as a BRep solid, and the recipe stage can reason about them with
exact signed distance functions (negative inside, mm) before any kernel call. A new
kind therefore needs one file and no kernel code, as long as it is made of these.

Frame: mm; +x is the body's long axis, pointing away from the inlet face at x = 0.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from .meshsolid import MeshSolid
from .outline import Outline, PlaneOutline

AXES = {"x": 0, "y": 1, "z": 2}


@dataclass(frozen=True)
class RoundedBox:
    """Axis-aligned box of full ``size_mm`` centred at ``center_mm``, every edge and
    corner rounded with ``radius_mm`` (the Minkowski sum of a smaller box and a ball)."""

    center_mm: tuple[float, float, float]
    size_mm: tuple[float, float, float]
    radius_mm: float = 0.0

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm) of points ``p`` (n, 3)."""
        half = np.asarray(self.size_mm) / 2.0 - self.radius_mm
        q = np.abs(p - np.asarray(self.center_mm)) - half
        outside = np.linalg.norm(np.maximum(q, 0.0), axis=1)
        inside = np.minimum(q.max(axis=1), 0.0)
        return outside + inside - self.radius_mm

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        c, s = np.asarray(self.center_mm), np.asarray(self.size_mm) / 2.0
        return c - s, c + s

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface, at most ``spacing_mm`` apart along each face."""
        return _project_to_surface(self, _box_shell_grid(*self.bounds(), spacing_mm))

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along axis ``v`` of the section by the plane ``coord[w] = t``,
        taken over the third axis (None: the plane misses). Exact: the section across a
        rounded edge narrows by r - sqrt(r^2 - d^2) at depth d into the rounding."""
        c, h, r = self.center_mm, np.asarray(self.size_mm) / 2.0, self.radius_mm
        off = abs(t - c[w])
        if off > h[w]:
            return None
        d = off - (h[w] - r)
        half = h[v] - (r - float(np.sqrt(max(r * r - d * d, 0.0))) if d > 0.0 else 0.0)
        return (c[v] - half, c[v] + half)


@dataclass(frozen=True)
class RoundedRod:
    """Cylinder along ``axis`` from ``start_mm`` for ``length_mm`` (along that axis), its
    two end rims rounded with ``end_radius_mm`` (0 = sharp, = radius gives hemispheres).
    ``center_mm`` is the position of the axis in the two other coordinates, in x-y-z order
    with the axis coordinate left out (for axis x: (y, z))."""

    axis: str
    start_mm: float
    length_mm: float
    center_mm: tuple[float, float]
    radius_mm: float
    end_radius_mm: float = 0.0

    def _split(self, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        a = AXES[self.axis]
        others = [i for i in range(3) if i != a]
        t = p[:, a] - (self.start_mm + self.length_mm / 2.0)
        rho = np.linalg.norm(p[:, others] - np.asarray(self.center_mm), axis=1)
        return t, rho

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the rounded rectangle (rho, t) revolved."""
        t, rho = self._split(p)
        f = self.end_radius_mm
        d = np.stack([rho - (self.radius_mm - f), np.abs(t) - (self.length_mm / 2.0 - f)], axis=1)
        outside = np.linalg.norm(np.maximum(d, 0.0), axis=1)
        inside = np.minimum(d.max(axis=1), 0.0)
        return outside + inside - f

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        a = AXES[self.axis]
        lo, hi = np.zeros(3), np.zeros(3)
        others = [i for i in range(3) if i != a]
        lo[a], hi[a] = self.start_mm, self.start_mm + self.length_mm
        for k, i in enumerate(others):
            lo[i] = self.center_mm[k] - self.radius_mm
            hi[i] = self.center_mm[k] + self.radius_mm
        return lo, hi

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        return _project_to_surface(self, _box_shell_grid(*self.bounds(), spacing_mm))

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along axis ``v`` of the section by the plane ``coord[w] = t``,
        taken over the third axis (None: the plane misses). Exact for the revolved rounded
        rectangle: across the axis a chord of the circle, along it the length less the end
        roundings' shortfall at that radius."""
        a = AXES[self.axis]
        others = [i for i in range(3) if i != a]
        big, f = self.radius_mm, self.end_radius_mm
        if w == a:  # a plane across the rod: a disc whose radius the end rounding trims
            s = t - self.start_mm
            if s < 0.0 or s > self.length_mm:
                return None
            e = max(f - s, s - (self.length_mm - f), 0.0)
            rho = big - (f - float(np.sqrt(max(f * f - e * e, 0.0))) if e > 0.0 else 0.0)
            cv = self.center_mm[others.index(v)]
            return (cv - rho, cv + rho)
        rho = abs(t - self.center_mm[others.index(w)])
        if rho > big:
            return None
        if v == a:  # along the axis at radial distance rho
            d = rho - (big - f)
            short = f - float(np.sqrt(max(f * f - d * d, 0.0))) if d > 0.0 else 0.0
            return (self.start_mm + short, self.start_mm + self.length_mm - short)
        half = float(np.sqrt(big * big - rho * rho))
        cv = self.center_mm[others.index(v)]
        return (cv - half, cv + half)


# ---- Revolved: a profile of (x, radius) points revolved about the x axis ------------------

#: Lengths below this are float noise in a profile (mm): a segment that short between two
#: roundings is left out, and two roundings may meet on an edge within it.
PROFILE_EPS_MM = 1e-9
#: A rounding that would stand off its corner by less than this is left out (mm): at a
#: point on, or all but on, the straight line through its neighbours the rounding arc
#: rises that little over its chord (its rise is about its standoff), and the kernel
#: cannot tell its three points from a line ("GC_MakeArcOfCircle: no result" for
#: collinear points). Ten times the kernel's confusion distance (1e-7 mm), far below what
#: a printer reproduces.
PROFILE_FLAT_MM = 1e-6


def least_radius_change_mm(dx_mm: float) -> float:
    """Least change of radius (mm) along an edge ``dx_mm`` long that the kernel still
    turns into a cone. Revolving an edge whose radius changes by less than about
    4.5e-4 * sqrt(dx) mm (measured with OCP 7.9 for edges 1 to 300 mm long) gives a
    cylinder instead, and the solid misses the profile's volume by up to 1.5e-4 of it;
    1e-3 * sqrt(dx) keeps twice that clear. Below it, give both points one radius."""
    return 1e-3 * float(np.sqrt(dx_mm))


@dataclass(frozen=True)
class ProfileArc:
    """A rounding of the profile in the (x, rho) half plane: centre, radius and its end
    points (mm), ``upper`` when the arc is the upper half of its circle (a convex corner;
    a concave one, seen from inside the solid, is the lower half)."""

    center: tuple[float, float]
    radius: float
    start: tuple[float, float]
    end: tuple[float, float]
    upper: bool

    def mid(self) -> tuple[float, float]:
        u = np.asarray(self.start) + np.asarray(self.end) - 2.0 * np.asarray(self.center)
        n = float(np.linalg.norm(u))
        u = u / n if n > 0 else np.array([0.0, 1.0 if self.upper else -1.0])
        return (self.center[0] + self.radius * float(u[0]),
                self.center[1] + self.radius * float(u[1]))


@dataclass(frozen=True)
class ProfileLine:
    """A straight piece of the profile from ``start`` to ``end`` in (x, rho), mm."""

    start: tuple[float, float]
    end: tuple[float, float]


ProfilePiece = ProfileLine | ProfileArc


def corner_tangent_mm(prev: np.ndarray, at: np.ndarray, nxt: np.ndarray, radius: float) -> float:
    """How far from the corner ``at`` a rounding of ``radius`` touches each of its two edges
    (mm): radius x tan(turn / 2), the turn being the angle between the edge directions."""
    a, b = at - prev, nxt - at
    a, b = a / np.linalg.norm(a), b / np.linalg.norm(b)
    turn = float(np.arctan2(abs(a[0] * b[1] - a[1] * b[0]), float(a @ b)))
    return radius * float(np.tan(turn / 2.0))


def _rounding_standoff_mm(prev: np.ndarray, at: np.ndarray, nxt: np.ndarray,
                          radius: float) -> float:
    """How far a rounding of ``radius`` passes from the corner ``at`` (mm): the corner lies
    radius / cos(turn / 2) from the arc's centre, the arc radius from it."""
    a, b = at - prev, nxt - at
    a, b = a / np.linalg.norm(a), b / np.linalg.norm(b)
    half_cos = float(np.sqrt(max(0.0, (1.0 + float(a @ b)) / 2.0)))  # cos(turn / 2)
    return radius * (1.0 / half_cos - 1.0) if half_cos > 0.0 else float("inf")


def profile_vertices(points: tuple[tuple[float, float], ...]) -> np.ndarray:
    """The closed profile's corners, clockwise in (x, rho): the axis point under the near
    face, the points, and the axis point under the far end (left out when the last point
    already lies on the axis)."""
    pts = [(points[0][0], 0.0), *points]
    if points[-1][1] > 0.0:
        pts.append((points[-1][0], 0.0))
    return np.asarray(pts, dtype=np.float64)


@functools.lru_cache(maxsize=256)
def profile_pieces(points: tuple[tuple[float, float], ...], rounds: tuple[float, ...]
                   ) -> tuple[ProfilePiece, ...]:
    """The profile's outline from the inlet face's axis point to the far end's, rounded
    (the axis itself is no surface and is left out). Assumes a valid profile
    (:func:`profile_problems` finds none)."""
    v = profile_vertices(points)
    radius = [0.0, *rounds] + [0.0] * (len(v) - 1 - len(rounds))
    out: list[ProfilePiece] = []
    cursor = v[0]
    for j in range(1, len(v) - 1):
        prev, at, nxt = v[j - 1], v[j], v[j + 1]
        rho = radius[j]
        if rho <= 0.0 or _rounding_standoff_mm(prev, at, nxt, rho) < PROFILE_FLAT_MM:
            _line(out, cursor, at)
            cursor = at
            continue
        t = corner_tangent_mm(prev, at, nxt, rho)
        a = (at - prev) / np.linalg.norm(at - prev)
        b = (nxt - at) / np.linalg.norm(nxt - at)
        # A rounding that takes a whole edge ends exactly on the next corner (no float
        # sliver of edge left, which would hide the corner's own x from radius_at).
        t_in = prev if t >= np.linalg.norm(at - prev) - PROFILE_EPS_MM else at - a * t
        t_out = nxt if t >= np.linalg.norm(nxt - at) - PROFILE_EPS_MM else at + b * t
        convex = a[0] * b[1] - a[1] * b[0] < 0.0  # a right turn of the clockwise outline
        n_in = np.array([a[1], -a[0]]) if convex else np.array([-a[1], a[0]])
        c = t_in + rho * n_in
        _line(out, cursor, t_in)
        out.append(ProfileArc((float(c[0]), float(c[1])), rho, _pt(t_in), _pt(t_out),
                              bool(convex)))
        cursor = t_out
    _line(out, cursor, v[-1])
    return tuple(out)


def _pt(p: np.ndarray) -> tuple[float, float]:
    return (float(p[0]) + 0.0, float(p[1]) + 0.0)


def _line(out: list[ProfilePiece], a: np.ndarray, b: np.ndarray) -> None:
    if float(np.linalg.norm(b - a)) > PROFILE_EPS_MM:
        out.append(ProfileLine(_pt(a), _pt(b)))


def profile_problems(points: tuple[tuple[float, float], ...], rounds: tuple[float, ...]
                     ) -> list[tuple[int, str, str]]:
    """What makes a profile unusable, as (point index, what is wrong, what is allowed):
    x rises strictly from point to point (the
    radius is a function of x: no overhang, so no self-intersection and no undercut
    against a parting plane through the axis), every radius is > 0 except that the last
    may be 0 (a tip closing on the axis; it takes no rounding), and the roundings of the
    two corners of every edge fit on it together."""
    out: list[tuple[int, str, str]] = []
    if len(points) < 2:
        return [(0, "has fewer than two points", "at least two (x, radius) points")]
    for i, (x, r) in enumerate(points):
        last = i == len(points) - 1
        if r < 0.0 or (r == 0.0 and not last):
            out.append((i, "has no positive radius",
                        "radius > 0 (only the last point may close on the axis, radius 0)"))
        if i and x <= points[i - 1][0]:
            out.append((i, f"does not lie beyond point {i - 1} along x",
                        f"x > {points[i - 1][0]:g} mm: x rises strictly (no overhanging "
                        "profile for now)"))
    for i in range(1, len(points)) if not out else ():
        (x0, r0), (x1, r1) = points[i - 1], points[i]
        least = least_radius_change_mm(x1 - x0)
        if r0 > 0.0 and r1 > 0.0 and 0.0 < abs(r1 - r0) < least:
            out.append((i, f"changes the radius of point {i - 1} by only {abs(r1 - r0):.3g} "
                        f"mm over {x1 - x0:g} mm (so slight a cone comes out a cylinder)",
                        f"the same radius as point {i - 1} ({r0:g} mm) or one that differs "
                        f"by at least {least:.3g} mm"))
    if points[-1][1] == 0.0 and rounds[-1] > 0.0:
        out.append((len(points) - 1, "rounds a tip on the axis",
                    "rounding 0 where the profile closes on the axis"))
    if out:
        return out
    v = profile_vertices(points)
    radius = [0.0, *rounds] + [0.0] * (len(v) - 1 - len(rounds))
    tan = [0.0] + [corner_tangent_mm(v[j - 1], v[j], v[j + 1], radius[j])
                   for j in range(1, len(v) - 1)] + [0.0]
    final = len(points) - 1
    for j in range(len(v) - 1):
        need = tan[j] + tan[j + 1]
        edge = float(np.linalg.norm(v[j + 1] - v[j]))
        if need > edge * (1.0 + 1e-9) + PROFILE_EPS_MM:
            # Vertex j is point j - 1; name the corner that takes more of the edge.
            i = min(max(j - 1 if tan[j] >= tan[j + 1] else j, 0), final)
            where = ("the inlet face" if j == 0 else "the far end face" if j > final
                     else f"the edge from point {j - 1} to point {j}")
            out.append((i, f"has roundings that do not fit {where}: they need {need:.3f} mm "
                        f"of it, it is {edge:.3f} mm long",
                        "smaller roundings (each takes radius x tan(turn/2) of both edges)"))
    return out


def _to_profile(p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return p[:, 0], np.hypot(p[:, 1], p[:, 2])


def _segment_distance(q: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    ab = b - a
    t = np.clip(((q - a) @ ab) / float(ab @ ab), 0.0, 1.0)
    return np.linalg.norm(q - (a + t[:, None] * ab), axis=1)


def _arc_distance(q: np.ndarray, arc: ProfileArc) -> np.ndarray:
    c = np.asarray(arc.center)
    u1, u2 = np.asarray(arc.start) - c, np.asarray(arc.end) - c
    s = np.sign(u1[0] * u2[1] - u1[1] * u2[0]) or 1.0
    d = q - c
    on = ((u1[0] * d[:, 1] - u1[1] * d[:, 0]) * s >= 0.0) & \
         ((d[:, 0] * u2[1] - d[:, 1] * u2[0]) * s >= 0.0)
    ends = np.minimum(np.linalg.norm(q - np.asarray(arc.start), axis=1),
                      np.linalg.norm(q - np.asarray(arc.end), axis=1))
    return np.where(on, np.abs(np.linalg.norm(d, axis=1) - arc.radius), ends)


def _radius_at(piece: ProfilePiece, x: np.ndarray) -> np.ndarray:
    """rho of ``piece`` at each x (-inf where the piece does not span x; vertical lines,
    the end faces, span none)."""
    (x0, r0), (x1, r1) = piece.start, piece.end
    lo, hi = min(x0, x1), max(x0, x1)
    inside = (x >= lo) & (x <= hi) & (hi > lo)
    if isinstance(piece, ProfileLine):
        rho = r0 + (r1 - r0) * (x - x0) / (x1 - x0) if x1 != x0 else np.zeros_like(x)
    else:
        cx, cy = piece.center
        h = np.sqrt(np.maximum(piece.radius ** 2 - (x - cx) ** 2, 0.0))
        rho = cy + h if piece.upper else cy - h
    return np.where(inside, rho, -np.inf)


def _spans_at_least(piece: ProfilePiece, a: float) -> list[tuple[float, float]]:
    """Sub-intervals of x over which ``piece`` stands at radius >= ``a`` (exact)."""
    (x0, r0), (x1, r1) = piece.start, piece.end
    lo, hi = min(x0, x1), max(x0, x1)
    if isinstance(piece, ProfileLine):
        if r0 >= a and r1 >= a:
            return [(lo, hi)]
        if r0 < a and r1 < a:
            return []
        xc = x0 + (a - r0) * (x1 - x0) / (r1 - r0)
        return [(xc, max(x0, x1))] if (r1 >= a) == (x1 >= x0) else [(min(x0, x1), xc)]
    cx, cy = piece.center
    rr = piece.radius
    if piece.upper:
        if a <= cy:
            return [(lo, hi)]
        if a > cy + rr:
            return []
        h = float(np.sqrt(rr * rr - (a - cy) ** 2))
        s0, s1 = max(lo, cx - h), min(hi, cx + h)
        return [(s0, s1)] if s0 <= s1 else []
    if a > cy:
        return []
    h = float(np.sqrt(max(rr * rr - (cy - a) ** 2, 0.0)))
    out = [(lo, min(hi, cx - h)), (max(lo, cx + h), hi)]
    return [s for s in out if s[0] <= s[1]]


@dataclass(frozen=True)
class Revolved:
    """A solid of revolution about the x axis: the region under the profile ``points``
    ((x, radius) in mm, x rising from the flat near face at the first point's x, 0 for a
    body's inlet face, to the far end, where a flat face closes it unless the last radius
    is 0) in the (x, rho) half plane, every point's corner rounded by ``rounds_mm`` (one
    per point, 0 = sharp). :func:`profile_problems` says what makes a profile invalid."""

    points: tuple[tuple[float, float], ...]
    rounds_mm: tuple[float, ...]

    def pieces(self) -> tuple[ProfilePiece, ...]:
        return profile_pieces(self.points, self.rounds_mm)

    @property
    def start_mm(self) -> float:
        return self.points[0][0]

    @property
    def length_mm(self) -> float:
        """x of the far end (mm)."""
        return self.points[-1][0]

    def max_radius_mm(self) -> float:
        best = 0.0
        for p in self.pieces():
            best = max(best, p.start[1], p.end[1])
            if isinstance(p, ProfileArc) and p.upper:
                lo, hi = sorted((p.start[0], p.end[0]))
                if lo <= p.center[0] <= hi:
                    best = max(best, p.center[1] + p.radius)
        return best

    def radius_at(self, x: np.ndarray) -> np.ndarray:
        """Outer radius (mm) at each x in [start, length]; -inf outside."""
        x = np.asarray(x, dtype=np.float64)
        out = np.full(x.shape, -np.inf)
        for p in self.pieces():
            np.maximum(out, _radius_at(p, x), out=out)
        return out

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the nearest surface point of a solid of revolution
        lies in the query point's own meridian half plane, so the 3-D distance is the 2-D
        distance in (x, rho) to the profile outline (the axis is no surface)."""
        x, rho = _to_profile(np.asarray(p, dtype=np.float64))
        q = np.stack([x, rho], axis=1)
        d = np.full(len(q), np.inf)
        for piece in self.pieces():
            if isinstance(piece, ProfileLine):
                e = _segment_distance(q, np.asarray(piece.start), np.asarray(piece.end))
            else:
                e = _arc_distance(q, piece)
            np.minimum(d, e, out=d)
        inside = (x > self.start_mm) & (x < self.length_mm) & (rho < self.radius_at(x))
        return np.where(inside, -d, d)

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        r = self.max_radius_mm()
        return np.array([self.start_mm, -r, -r]), np.array([self.length_mm, r, r])

    def volume_mm3(self) -> float:
        """Exact volume (mm3) by discs: pi times the integral of rho^2 dx along the outline
        (clockwise, so the top runs towards +x), each piece in closed form."""
        total = 0.0
        for p in self.pieces():
            (x0, r0), (x1, r1) = p.start, p.end
            if isinstance(p, ProfileLine):
                total += (x1 - x0) * (r0 * r0 + r0 * r1 + r1 * r1) / 3.0
                continue
            cx, cy = p.center
            a = p.radius
            t0 = float(np.arctan2(r0 - cy, x0 - cx))
            # The short way round from start to end: every rounding turns by < 180 deg.
            t1 = t0 + _wrap(float(np.arctan2(r1 - cy, x1 - cx)) - t0)
            total += _arc_rho2_dx(cy, a, t1) - _arc_rho2_dx(cy, a, t0)
        return float(np.pi * total)

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface: the outline sampled at most ``spacing_mm`` apart, each
        sample revolved with at most that spacing round the axis, and the end faces."""
        prof = []
        for p in self.pieces():
            n = max(2, int(np.ceil(_piece_length(p) / spacing_mm)) + 1)
            for t in np.linspace(0.0, 1.0, n):
                prof.append(_piece_point(p, float(t)))
        out = []
        for x, rho in prof:
            k = max(1, int(np.ceil(2 * np.pi * rho / spacing_mm)))
            ang = np.arange(k) * 2 * np.pi / k
            out.append(np.stack([np.full(k, x), rho * np.cos(ang), rho * np.sin(ang)], axis=1))
        return np.concatenate(out)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along ``v`` of the section by ``coord[w] = t`` (None: the plane
        misses). Exact: across the axis a disc of the profile's radius at x = t; along it,
        the hull of the x where the profile stands at radius >= |t|; between the two cross
        axes, the chord of the widest circle."""
        if w == 0:
            if t < self.start_mm or t > self.length_mm:
                return None
            r = max(float(self.radius_at(np.array([t]))[0]), 0.0)
            return (-r, r)
        a = abs(t)
        if v == 0:
            spans = [s for p in self.pieces() for s in _spans_at_least(p, a)]
            if not spans:
                return None
            return (min(s[0] for s in spans), max(s[1] for s in spans))
        big = self.max_radius_mm()
        if a > big:
            return None
        h = float(np.sqrt(big * big - a * a))
        return (-h, h)


def _arc_rho2_dx(cy: float, a: float, t: float) -> float:
    """Antiderivative in t of rho^2 dx/dt on the circle x = cx + a cos t, rho = cy + a sin t
    (dx = -a sin t dt), mm3."""
    c = float(np.cos(t))
    return -a * (cy * cy * (-c) + 2.0 * cy * a * (t / 2.0 - float(np.sin(2.0 * t)) / 4.0)
                 + a * a * (-c + c ** 3 / 3.0))


def _piece_length(p: ProfilePiece) -> float:
    if isinstance(p, ProfileLine):
        return float(np.hypot(p.end[0] - p.start[0], p.end[1] - p.start[1]))
    chord = float(np.hypot(p.end[0] - p.start[0], p.end[1] - p.start[1]))
    return 2.0 * p.radius * float(np.arcsin(min(1.0, chord / (2.0 * p.radius))))


def _piece_point(p: ProfilePiece, t: float) -> tuple[float, float]:
    s, e = np.asarray(p.start), np.asarray(p.end)
    if isinstance(p, ProfileLine):
        q = s + t * (e - s)
        return float(q[0]), max(float(q[1]), 0.0)
    c = np.asarray(p.center)
    a0 = float(np.arctan2(*(s - c)[::-1]))
    a1 = float(np.arctan2(*(e - c)[::-1]))
    d = _wrap(a1 - a0)  # the short way round (turns are < 180 deg)
    ang = a0 + t * d
    return (float(c[0] + p.radius * np.cos(ang)),
            max(float(c[1] + p.radius * np.sin(ang)), 0.0))


def _wrap(a: float) -> float:
    """``a`` (rad) wrapped into [-pi, pi)."""
    return float((a + np.pi) % (2 * np.pi) - np.pi)


# ---- Extruded: a plane outline in (y, z) swept along x, optionally scaled down -----------

#: Sections the tapered chord search tries per pass, and how many passes narrow it.
TAPER_SAMPLES = 129
TAPER_PASSES = 3


@dataclass(frozen=True)
class Extruded:
    """The ``outline`` (in the y-z plane, mm) swept along x from ``start_mm`` for
    ``length_mm``, scaled about the point ``scale_center_mm`` (y, z) by a factor that runs
    linearly from 1 at the start to ``tip_scale`` at the far end (1: a straight prism;
    below 1: a loft between two similar sections, every section in between similar too).
    The solid is part of a cone with its apex on the line through the scale centre."""

    outline: Outline
    length_mm: float
    tip_scale: float = 1.0
    scale_center_mm: tuple[float, float] = (0.0, 0.0)
    start_mm: float = 0.0

    def scale_at(self, x: np.ndarray) -> np.ndarray:
        """The section's scale at each x (held at the end values beyond the ends)."""
        f = np.clip((np.asarray(x, dtype=np.float64) - self.start_mm) / self.length_mm, 0.0, 1.0)
        return 1.0 + (self.tip_scale - 1.0) * f

    def _reach_mm(self) -> float:
        """An upper bound of the distance from the scale centre to the outline (mm): the
        farthest corner of its bounds."""
        (y0, z0), (y1, z1) = self.outline.bounds()
        cy, cz = self.scale_center_mm
        return max(float(np.hypot(y - cy, z - cz)) for y in (y0, y1) for z in (z0, z1))

    def slope_factor(self) -> float:
        """1 / sqrt(1 + k^2), k = |d scale / dx| x reach: the in-plane distance to the side
        surface times this is a lower bound of the 3-D distance (1 for a straight prism)."""
        k = abs(self.tip_scale - 1.0) / self.length_mm * self._reach_mm()
        return 1.0 / float(np.sqrt(1.0 + k * k))

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Signed distance (mm): exact for a straight prism (the plane outline's exact
        distance combined with the end planes'), and a bound never above the true distance
        when tapered. Between sections at x and x', homothetic about the scale centre, no
        point lies farther than |s(x) - s(x')| x reach from its image (the Hausdorff
        distance), so a surface point dx away along x is at least in-plane distance -
        k dx away across it; the least of sqrt(dx^2 + (d - k dx)^2) is d / sqrt(1 + k^2)."""
        p = np.asarray(p, dtype=np.float64).reshape(-1, 3)
        s = self.scale_at(p[:, 0])
        c = np.asarray(self.scale_center_mm)
        q = (p[:, 1:] - c) / s[:, None] + c
        lateral = s * self.outline.sdf(q) * self.slope_factor()
        axial = np.abs(p[:, 0] - (self.start_mm + self.length_mm / 2.0)) - self.length_mm / 2.0
        w = np.stack([lateral, axial], axis=1)
        outside = np.linalg.norm(np.maximum(w, 0.0), axis=1)
        inside = np.minimum(w.max(axis=1), 0.0)
        return outside + inside

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        """Exact: the start section's bounds and the tip's (scaled about the centre)."""
        (y0, z0), (y1, z1) = self.outline.bounds()
        cy, cz = self.scale_center_mm
        s = self.tip_scale
        ys = (y0, y1, cy + s * (y0 - cy), cy + s * (y1 - cy))
        zs = (z0, z1, cz + s * (z0 - cz), cz + s * (z1 - cz))
        return (np.array([self.start_mm, min(ys), min(zs)]),
                np.array([self.start_mm + self.length_mm, max(ys), max(zs)]))

    def volume_mm3(self) -> float:
        """Closed form: the area A0 times the length for a prism; a frustum of similar
        sections (area A0 s(x)^2, s linear in x) holds L A0 (1 + s + s^2) / 3."""
        s = self.tip_scale
        return self.length_mm * self.outline.area_mm2() * (1.0 + s + s * s) / 3.0

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface: the outline at stations along x at most ``spacing_mm``
        apart, scaled as there, and both end faces filled on a grid."""
        ring = self.outline.boundary(spacing_mm)
        c = np.asarray(self.scale_center_mm)
        k = max(1, int(np.ceil(self.length_mm / spacing_mm)))
        xs = self.start_mm + np.linspace(0.0, self.length_mm, k + 1)
        out = []
        for x in xs:
            s = float(self.scale_at(np.array([x]))[0])
            out.append(np.column_stack([np.full(len(ring), x), c + s * (ring - c)]))
        (y0, z0), (y1, z1) = self.outline.bounds()
        gy = np.linspace(y0, y1, max(2, int(np.ceil((y1 - y0) / spacing_mm)) + 1))
        gz = np.linspace(z0, z1, max(2, int(np.ceil((z1 - z0) / spacing_mm)) + 1))
        grid = np.stack(np.meshgrid(gy, gz, indexing="ij"), axis=-1).reshape(-1, 2)
        face = grid[self.outline.sdf(grid) < 0.0]
        for x, s in ((xs[0], 1.0), (xs[-1], self.tip_scale)):
            out.append(np.column_stack([np.full(len(face), x), c + s * (face - c)]))
        return np.concatenate(out)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along ``v`` of the section by ``coord[w] = t`` (None: the plane
        misses). Across x: the scaled outline's bounds. Along x at a cross plane: the x
        where the scaled outline reaches t, an interval (the bounds scale linearly).
        Between the cross axes: the outline's chord at t for a prism (exact); tapered, the
        extremes over the sections of the scaled chords, searched on a grid of sections
        narrowed TAPER_PASSES times (the chord ends move smoothly with the scale)."""
        c = self.scale_center_mm
        x0, x1 = self.start_mm, self.start_mm + self.length_mm
        lo2, hi2 = self.outline.bounds()
        if w == 0:
            if t < x0 or t > x1:
                return None
            s = float(self.scale_at(np.array([t]))[0])
            return (c[v - 1] + s * (lo2[v - 1] - c[v - 1]), c[v - 1] + s * (hi2[v - 1] - c[v - 1]))
        k = w - 1
        if v == 0:
            return _scale_interval(self, lo2[k] - c[k], hi2[k] - c[k], t - c[k])
        j = v - 1
        if self.tip_scale == 1.0:
            a, b = self.outline.chords(j, np.array([t]))
            return None if np.isnan(a[0]) else (float(a[0]), float(b[0]))
        best_lo, best_hi = np.inf, -np.inf
        for pick in (0, 1):
            s_lo, s_hi = self.tip_scale, 1.0
            for _ in range(TAPER_PASSES):
                ss = np.linspace(s_lo, s_hi, TAPER_SAMPLES)
                a, b = self.outline.chords(j, c[k] + (t - c[k]) / ss)
                vals = c[j] + ss * ((a if pick == 0 else b) - c[j])
                if np.all(np.isnan(vals)):
                    return None
                vals = np.where(np.isnan(vals), np.inf if pick == 0 else -np.inf, vals)
                i = int(np.argmin(vals) if pick == 0 else np.argmax(vals))
                if pick == 0:
                    best_lo = min(best_lo, float(vals[i]))
                else:
                    best_hi = max(best_hi, float(vals[i]))
                step = (s_hi - s_lo) / (TAPER_SAMPLES - 1)
                s_lo, s_hi = max(self.tip_scale, ss[i] - step), min(1.0, ss[i] + step)
        return (best_lo, best_hi)


def _scale_interval(e: Extruded, lo: float, hi: float, u: float) -> tuple[float, float] | None:
    """The x interval over which u (relative to the scale centre) lies in [s lo, s hi]:
    s runs linearly along x, so each bound is one linear inequality in x."""
    s0, s1 = 1.0, e.tip_scale
    f_lo, f_hi = 0.0, 1.0
    for bound, sign in ((lo, 1.0), (hi, -1.0)):
        # sign * (s(f) * bound - u) <= 0, s(f) = s0 + (s1 - s0) f
        a0 = sign * (s0 * bound - u)
        slope = sign * (s1 - s0) * bound
        if slope == 0.0:
            if a0 > 1e-12:
                return None
            continue
        f = -a0 / slope
        if slope > 0.0:
            f_hi = min(f_hi, f)
        else:
            f_lo = max(f_lo, f)
    if f_lo > f_hi:
        return None
    return (e.start_mm + f_lo * e.length_mm, e.start_mm + f_hi * e.length_mm)


# ---- RoundedRing: a rounded rectangle in (radius, z) turned about an axis along z --------

#: Distance from a rounding's centre to the centroid of the spandrel it removes (square
#: corner less the quarter disc), along each of the corner's two edges, as a fraction of
#: the rounding radius: 2 / (3 (4 - pi)) (the spandrel's first moment over its area).
SPANDREL_CENTROID = 2.0 / (3.0 * (4.0 - np.pi))


@dataclass(frozen=True)
class RoundedRing:
    """An annulus about an axis parallel to z through ``center_mm`` (x, y): at every
    angle its section is the rectangle radius in [inner_radius_mm, outer_radius_mm],
    z in [z0_mm, z0_mm + height_mm], its four corners rounded by ``round_mm`` (mm)."""

    center_mm: tuple[float, float]
    inner_radius_mm: float
    outer_radius_mm: float
    z0_mm: float
    height_mm: float
    round_mm: float = 0.0

    def _section(self, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(radius from the axis, z) of points ``p`` (n, 3)."""
        rho = np.hypot(p[:, 0] - self.center_mm[0], p[:, 1] - self.center_mm[1])
        return rho, p[:, 2]

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the nearest surface point of a solid of revolution
        lies in the query point's own meridian half plane, so it is the 2-D distance to the
        rounded rectangle in (radius, z)."""
        rho, z = self._section(np.asarray(p, dtype=np.float64).reshape(-1, 3))
        f = self.round_mm
        mid_r = (self.inner_radius_mm + self.outer_radius_mm) / 2.0
        half_r = (self.outer_radius_mm - self.inner_radius_mm) / 2.0
        d = np.stack([np.abs(rho - mid_r) - (half_r - f),
                      np.abs(z - (self.z0_mm + self.height_mm / 2.0))
                      - (self.height_mm / 2.0 - f)], axis=1)
        outside = np.linalg.norm(np.maximum(d, 0.0), axis=1)
        inside = np.minimum(d.max(axis=1), 0.0)
        return outside + inside - f

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        cx, cy = self.center_mm
        r = self.outer_radius_mm
        return (np.array([cx - r, cy - r, self.z0_mm]),
                np.array([cx + r, cy + r, self.z0_mm + self.height_mm]))

    def section_area_mm2(self) -> float:
        """Area of the rounded rectangle (mm2): each rounding removes (1 - pi/4) f^2."""
        f = self.round_mm
        return ((self.outer_radius_mm - self.inner_radius_mm) * self.height_mm
                - 4.0 * (1.0 - np.pi / 4.0) * f * f)

    def volume_mm3(self) -> float:
        """Closed form by Pappus's centroid theorem: pi (R^2 - r^2) h less, for each
        rounding, its spandrel's area (1 - pi/4) f^2 times 2 pi its centroid's radius (the
        outer two at R - f + c f, the inner two at r + f - c f, c = SPANDREL_CENTROID)."""
        f, big, small = self.round_mm, self.outer_radius_mm, self.inner_radius_mm
        spandrel = (1.0 - np.pi / 4.0) * f * f
        c = SPANDREL_CENTROID * f
        radii = 2.0 * ((big - f + c) + (small + f - c))
        return float(np.pi * (big * big - small * small) * self.height_mm
                     - 2.0 * np.pi * spandrel * radii)

    def _outline(self, spacing_mm: float) -> np.ndarray:
        """Points (radius, z) on the rounded rectangle, at most ``spacing_mm`` apart."""
        f = self.round_mm
        r0, r1 = self.inner_radius_mm, self.outer_radius_mm
        z0, z1 = self.z0_mm, self.z0_mm + self.height_mm
        corners = ((r1 - f, z1 - f, 0.0), (r0 + f, z1 - f, 0.5 * np.pi),
                   (r0 + f, z0 + f, np.pi), (r1 - f, z0 + f, 1.5 * np.pi))
        out = []
        for k, (cr, cz, a0) in enumerate(corners):
            n = max(2, int(np.ceil(0.5 * np.pi * f / spacing_mm)) + 1) if f > 0 else 1
            ang = a0 + np.linspace(0.0, 0.5 * np.pi, n)
            arc = np.stack([cr + f * np.cos(ang), cz + f * np.sin(ang)], axis=1)
            nr, nz, _ = corners[(k + 1) % 4]
            end = np.array([nr + f * np.cos(a0 + 0.5 * np.pi),
                            nz + f * np.sin(a0 + 0.5 * np.pi)])
            start = arc[-1]
            m = max(2, int(np.ceil(float(np.linalg.norm(end - start)) / spacing_mm)) + 1)
            line = start + np.linspace(0.0, 1.0, m)[:, None] * (end - start)
            out += [arc, line]
        return np.concatenate(out)

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface: the section's outline sampled at most ``spacing_mm``
        apart, each sample turned round the axis with at most that spacing."""
        cx, cy = self.center_mm
        out = []
        for rho, z in self._outline(spacing_mm):
            k = max(3, int(np.ceil(2 * np.pi * rho / spacing_mm)))
            ang = np.arange(k) * 2 * np.pi / k
            out.append(np.stack([cx + rho * np.cos(ang), cy + rho * np.sin(ang),
                                 np.full(k, z)], axis=1))
        return np.concatenate(out)

    def _outer_at(self, z: float) -> float:
        """Outer radius (mm) at height ``z`` (the roundings pull it in near the flat
        faces); -inf off the ring's height."""
        z0, h, f = self.z0_mm, self.height_mm, self.round_mm
        if z < z0 or z > z0 + h:
            return -np.inf
        e = max(z0 + f - z, z - (z0 + h - f), 0.0)
        return self.outer_radius_mm - (f - float(np.sqrt(max(f * f - e * e, 0.0)))
                                       if e > 0.0 else 0.0)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along ``v`` of the section by ``coord[w] = t`` (None: the plane
        misses), over the third axis. Exact: across the axis (w = z) the outer circle at
        that height; a plane along the axis at distance a from it reaches every z where the
        outer radius is at least a, and across, the chord of the outer circle."""
        if w == 2:
            big = self._outer_at(t)
            if big == -np.inf:
                return None
            c = self.center_mm[v]
            return (c - big, c + big)
        a = abs(t - self.center_mm[w])
        big, f = self.outer_radius_mm, self.round_mm
        if a > big:
            return None
        if v == 2:
            d = a - (big - f)
            short = f - float(np.sqrt(max(f * f - d * d, 0.0))) if d > 0.0 else 0.0
            return (self.z0_mm + short, self.z0_mm + self.height_mm - short)
        half = float(np.sqrt(big * big - a * a))
        c = self.center_mm[v]
        return (c - half, c + half)


# ---- TurnedBar: a bar turned about z (channel segments and chambers along a path) -------

@dataclass(frozen=True)
class TurnedBar:
    """A bar centred on ``center_mm``: ``length_mm`` along the horizontal direction at
    ``angle_deg`` from +x (counter-clockwise seen from +z), ``width_mm`` across it in the
    x-y plane and ``height_mm`` along z. With ``round_ends`` every edge and corner is
    rounded with ``radius_mm`` (a box grown by a ball, as :class:`RoundedBox`); without,
    only the four edges along its length are, and its ends are flat (the rounded rectangle
    section swept straight), so bars meeting end to end at a joint leave no notch. mm."""

    center_mm: tuple[float, float, float]
    length_mm: float
    width_mm: float
    height_mm: float
    angle_deg: float
    radius_mm: float = 0.0
    round_ends: bool = True

    @property
    def _cs(self) -> tuple[float, float]:
        t = np.radians(self.angle_deg)
        return float(np.cos(t)), float(np.sin(t))

    def local(self, p: np.ndarray) -> np.ndarray:
        """Points (n, 3) in the bar's frame: (along, across, up) from its centre (mm)."""
        c, s = self._cs
        d = p - np.asarray(self.center_mm)
        return np.stack([d[:, 0] * c + d[:, 1] * s, -d[:, 0] * s + d[:, 1] * c, d[:, 2]],
                        axis=1)

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): a rounded box in the bar's frame, or the exact
        distance of a straight extrusion of the rounded rectangle (b, z) section."""
        q = np.abs(self.local(p))
        r = self.radius_mm
        half = np.array([self.length_mm, self.width_mm, self.height_mm]) / 2.0
        if self.round_ends:
            d = q - (half - r)
            return (np.linalg.norm(np.maximum(d, 0.0), axis=1) + np.minimum(d.max(axis=1), 0.0)
                    - r)
        d2 = q[:, 1:] - (half[1:] - r)
        sec = (np.linalg.norm(np.maximum(d2, 0.0), axis=1) + np.minimum(d2.max(axis=1), 0.0)
               - r)
        da = q[:, 0] - half[0]
        w = np.stack([sec, da], axis=1)
        return np.linalg.norm(np.maximum(w, 0.0), axis=1) + np.minimum(w.max(axis=1), 0.0)

    def _plan_half(self) -> tuple[float, float, float]:
        """The plan view at its widest: the rectangle of half sizes (along, across) grown
        by the returned radius."""
        r = self.radius_mm
        if self.round_ends:
            return self.length_mm / 2.0 - r, self.width_mm / 2.0 - r, r
        return self.length_mm / 2.0, self.width_mm / 2.0, 0.0

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        c, s = self._cs
        ha, hb, g = self._plan_half()
        hx, hy = abs(c) * ha + abs(s) * hb + g, abs(s) * ha + abs(c) * hb + g
        half = np.array([hx, hy, self.height_mm / 2.0])
        return np.asarray(self.center_mm) - half, np.asarray(self.center_mm) + half

    def volume_mm3(self) -> float:
        """Closed form: Steiner's formula of the inner box grown by the ball (round ends),
        or the rounded rectangle's area times the length (flat ends)."""
        r, lx, ly, lz = self.radius_mm, self.length_mm, self.width_mm, self.height_mm
        if self.round_ends:
            a, b, c = lx - 2 * r, ly - 2 * r, lz - 2 * r
            return (a * b * c + 2 * r * (a * b + b * c + c * a) + np.pi * r * r * (a + b + c)
                    + 4.0 / 3.0 * np.pi * r ** 3)
        return lx * (ly * lz - (4.0 - np.pi) * r * r)

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        return _project_to_surface(self, _box_shell_grid(*self.bounds(), spacing_mm))

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along axis ``v`` of the section by the plane ``coord[w] = t``,
        taken over the third axis (None: the plane misses). Exact: across z the plan
        rectangle grown by the rounding left at that height; across x or y the line's
        chord of the widest plan (rectangle, or rectangle grown by a disc), or along z the
        height left where the line comes nearest the bar's axis."""
        r, cz, hz = self.radius_mm, self.center_mm[2], self.height_mm / 2.0
        c, s = self._cs
        ha, hb, g = self._plan_half()
        if w == 2:
            off = abs(t - cz)
            if off > hz:
                return None
            d = off - (hz - r)
            left = float(np.sqrt(max(r * r - d * d, 0.0))) if d > 0.0 else r
            if self.round_ends:
                g = left
            else:
                hb = self.width_mm / 2.0 - r + left
            half = (abs(c) * ha + abs(s) * hb if v == 0 else abs(s) * ha + abs(c) * hb) + g
            return (self.center_mm[v] - half, self.center_mm[v] + half)
        # A vertical plane: its line in plan, points (x, y) = o + u * k along axis k.
        k = 1 - w if v == 2 else v
        o = np.zeros(2)
        o[w] = t - self.center_mm[w]
        u = np.zeros(2)
        u[k] = 1.0
        a0, b0 = o[0] * c + o[1] * s, -o[0] * s + o[1] * c
        ka, kb = u[0] * c + u[1] * s, -u[0] * s + u[1] * c
        if v != 2:
            span = _line_in_grown_rect(a0, b0, ka, kb, ha, hb, g)
            if span is None:
                return None
            return (self.center_mm[v] + span[0], self.center_mm[v] + span[1])
        if self.round_ends:
            dist = _line_to_rect_distance(a0, b0, ka, kb, ha, hb)
            if dist > r:
                return None
            half = hz - r + float(np.sqrt(r * r - dist * dist))
            return (cz - half, cz + half)
        span = _line_in_grown_rect(a0, b0, ka, kb, ha, hb, 0.0)
        if span is None:
            return None
        bs = (b0 + kb * span[0], b0 + kb * span[1])
        nearest = 0.0 if bs[0] * bs[1] <= 0.0 else min(abs(bs[0]), abs(bs[1]))
        e = nearest - (self.width_mm / 2.0 - r)
        half = hz - r + float(np.sqrt(max(r * r - e * e, 0.0))) if e > 0.0 else hz
        return (cz - half, cz + half)


def _line_in_grown_rect(a0: float, b0: float, ka: float, kb: float, ha: float, hb: float,
                        g: float) -> tuple[float, float] | None:
    """Parameter interval of the line (a0 + s ka, b0 + s kb) (unit direction) inside the
    rectangle |a| <= ha, |b| <= hb grown by a disc of radius g (None: it misses). The grown
    rectangle is convex and the union of two rectangles and four discs, so its chord is
    the hull of theirs."""
    spans = [_line_in_rect(a0, b0, ka, kb, ha + g, hb), _line_in_rect(a0, b0, ka, kb, ha, hb + g)]
    if g > 0.0:
        for ca in (-ha, ha):
            for cb in (-hb, hb):
                pa, pb = a0 - ca, b0 - cb
                mid = -(pa * ka + pb * kb)
                disc = mid * mid - (pa * pa + pb * pb - g * g)
                if disc >= 0.0:
                    spans.append((mid - float(np.sqrt(disc)), mid + float(np.sqrt(disc))))
    found = [x for x in spans if x is not None]
    if not found:
        return None
    return (min(x[0] for x in found), max(x[1] for x in found))


def _line_in_rect(a0: float, b0: float, ka: float, kb: float, ha: float, hb: float
                  ) -> tuple[float, float] | None:
    lo, hi = -np.inf, np.inf
    for p0, k, h in ((a0, ka, ha), (b0, kb, hb)):
        if abs(k) < 1e-15:
            if abs(p0) > h:
                return None
            continue
        s0, s1 = sorted(((-h - p0) / k, (h - p0) / k))
        lo, hi = max(lo, s0), min(hi, s1)
    return (float(lo), float(hi)) if lo <= hi else None


def _line_to_rect_distance(a0: float, b0: float, ka: float, kb: float, ha: float,
                           hb: float) -> float:
    """Least distance (mm) from the line (a0 + s ka, b0 + s kb) to the rectangle |a| <= ha,
    |b| <= hb: 0 when it crosses; else the nearest of the corners to the line (a line
    missing a convex polygon comes nearest it at a vertex)."""
    if _line_in_rect(a0, b0, ka, kb, ha, hb) is not None:
        return 0.0
    return min(abs((ca - a0) * kb - (cb - b0) * ka) for ca in (-ha, ha) for cb in (-hb, hb))


# ---- Slab: a plane outline in (x, y) pushed along z ----------------------------------------


@dataclass(frozen=True)
class Slab:
    """The ``outline`` (in the x-y plane, mm: its first coordinate x, its second y) pushed
    along z from ``z0_mm`` to ``z0_mm + thickness_mm``: a straight prism with sharp edges
    round both flat faces (a plate)."""

    outline: PlaneOutline
    z0_mm: float
    thickness_mm: float

    def sdf(self, p: np.ndarray) -> np.ndarray:
        """Exact signed distance (mm): the outline's exact plane distance combined with
        the two face planes' (the distance to an intersection of a prism and a slab of
        space, as for a box)."""
        p = np.asarray(p, dtype=np.float64).reshape(-1, 3)
        lateral = self.outline.sdf(p[:, :2])
        axial = np.abs(p[:, 2] - (self.z0_mm + self.thickness_mm / 2.0)) - self.thickness_mm / 2.0
        w = np.stack([lateral, axial], axis=1)
        outside = np.linalg.norm(np.maximum(w, 0.0), axis=1)
        inside = np.minimum(w.max(axis=1), 0.0)
        return outside + inside

    def bounds(self) -> tuple[np.ndarray, np.ndarray]:
        """Exact: the outline's bounds and the two faces."""
        (x0, y0), (x1, y1) = self.outline.bounds()
        return (np.array([x0, y0, self.z0_mm]),
                np.array([x1, y1, self.z0_mm + self.thickness_mm]))

    def volume_mm3(self) -> float:
        """Closed form: the outline's exact area times the thickness."""
        return self.outline.area_mm2() * self.thickness_mm

    def surface_samples(self, spacing_mm: float) -> np.ndarray:
        """Points on the surface: the outline at heights at most ``spacing_mm`` apart, and
        both flat faces filled on a grid."""
        ring = self.outline.boundary(spacing_mm)
        k = max(1, int(np.ceil(self.thickness_mm / spacing_mm)))
        zs = self.z0_mm + np.linspace(0.0, self.thickness_mm, k + 1)
        out = [np.column_stack([ring, np.full(len(ring), z)]) for z in zs]
        (x0, y0), (x1, y1) = self.outline.bounds()
        gx = np.linspace(x0, x1, max(2, int(np.ceil((x1 - x0) / spacing_mm)) + 1))
        gy = np.linspace(y0, y1, max(2, int(np.ceil((y1 - y0) / spacing_mm)) + 1))
        grid = np.stack(np.meshgrid(gx, gy, indexing="ij"), axis=-1).reshape(-1, 2)
        face = grid[self.outline.sdf(grid) < 0.0]
        for z in (zs[0], zs[-1]):
            out.append(np.column_stack([face, np.full(len(face), z)]))
        return np.concatenate(out)

    def section_extent(self, v: int, w: int, t: float) -> tuple[float, float] | None:
        """Extent (lo, hi) along ``v`` of the section by ``coord[w] = t`` (None: the plane
        misses). Exact: across z the outline's bounds; along z the thickness wherever the
        outline meets the line; in-plane the outline's chord at t."""
        z0, z1 = self.z0_mm, self.z0_mm + self.thickness_mm
        lo2, hi2 = self.outline.bounds()
        if w == 2:
            if t < z0 or t > z1:
                return None
            return (lo2[v], hi2[v])
        a, b = self.outline.chords(1 - w, np.array([t]))
        if np.isnan(a[0]):
            return None
        if v == 2:
            return (z0, z1)
        return (float(a[0]), float(b[0]))


Primitive = (RoundedBox | RoundedRod | Revolved | Extruded | RoundedRing | Slab | MeshSolid
             | TurnedBar)


def union_sdf(prims: tuple[Primitive, ...], p: np.ndarray) -> np.ndarray:
    """Signed distance bound of a union (exact outside, a bound inside; min of members)."""
    # Running minimum, not a stacked array: a row of 200 chambers must not hold
    # 200 distance arrays at once.
    out = prims[0].sdf(p)
    for q in prims[1:]:
        np.minimum(out, q.sdf(p), out=out)
    return out


def _box_shell_grid(lo: np.ndarray, hi: np.ndarray, spacing: float) -> np.ndarray:
    """Grid points on the six faces of a box: starting points for projection."""
    counts = [max(2, int(np.ceil((h - a) / spacing)) + 1) for a, h in zip(lo, hi)]
    axes = [np.linspace(a, h, n) for a, h, n in zip(lo, hi, counts)]
    pts = []
    for a in range(3):
        b, c = [i for i in range(3) if i != a]
        gb, gc = np.meshgrid(axes[b], axes[c], indexing="ij")
        for val in (lo[a], hi[a]):
            q = np.empty((gb.size, 3))
            q[:, a], q[:, b], q[:, c] = val, gb.ravel(), gc.ravel()
            pts.append(q)
    return np.concatenate(pts)


def _project_to_surface(prim: Primitive, p: np.ndarray, iterations: int = 6) -> np.ndarray:
    """Move points onto the zero set along the numerical SDF gradient (sphere tracing)."""
    h = 1e-5
    for _ in range(iterations):
        d = prim.sdf(p)
        grad = np.stack([(prim.sdf(p + e) - prim.sdf(p - e)) / (2 * h)
                         for e in np.eye(3) * h], axis=1)
        norm = np.linalg.norm(grad, axis=1, keepdims=True)
        norm[norm == 0] = 1.0
        p = p - (d[:, None] * grad / norm)
    return p
