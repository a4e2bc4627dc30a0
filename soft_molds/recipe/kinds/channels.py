"""Void kind ``channels``: a network of grooves along polylines in one horizontal plane,
with branches, and rows of box chambers along any of them.

A one-piece gripper of several arms needs one feed from the inlet to every arm: the first
path runs from the inlet on the body's outline inwards, every later path branches off a
point of an earlier one, and the chambers of each arm sit on its path. The network is
open on its floor plane: it is cast by the ``layered`` process, whose posts form every
groove and chamber on the bond face (a branched core could not leave through one socket,
so the one-shot process refuses it).

Frame (mm, deg): x from the inlet face x = 0, y across, z up; every path is a list of
(x, y) points in the plane z = ``z_mm`` (the channels' and chambers' floor). With
``origin: hub`` the recipe writes them from the hub's centre of a plate drawn with a hub
(x along +x, y along +y): :meth:`Channels.follow_body` moves them into the body's frame,
which every method below works in, and keeps the points as written for the echo and for
every message that names a point. A channel's
section across its path is a ``width_mm`` by ``height_mm`` rectangle with its four edges
rounded ``corner_radius_mm``; a chamber's along its path is ``length_mm`` by ``width_mm``
by ``height_mm``, turned with its path's segment.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from typing import Any, ClassVar

import numpy as np

from ...errors import Problem
from ..contracts import BodyKind, Entry
from ..fields import Field, Record, choice, integer, number, paths, records
from ..membranes import Membrane
from ..primitives import Primitive, RoundedRod, TurnedBar, union_sdf
from ..registry import void_kind

#: A point this close to a path (mm) lies on it: float noise in recipe numbers.
ON_PATH_MM = 1e-6
#: Surface samples of each piece when two pieces are measured against each other (mm).
SAMPLE_MM = 0.5
#: Overlap (mm) above which two pieces of the network are joined, not merely touching.
JOIN_MM = 1e-6
#: Where the recipe's path points are measured from: the body's frame, or the centre of a
#: plate's hub.
ORIGINS = ("body", "hub")
#: Decimals (of a mm) the points moved into the body's frame keep: the hub's centre is an
#: irrational sum, and its last bits would otherwise reach the output's bytes; 1e-12 mm is
#: far below anything printed, and a network written from the hub then has the same points
#: as the one written in the body's frame to 12 decimals.
MOVED_DECIMALS = 12
#: A mouth nearer the outline than this (mm) is on it already (the rounding above).
ON_OUTLINE_MM = 1e-12
#: Step (mm) of the central differences that find the outline's normal at the mouth.
NORMAL_STEP_MM = 1e-4

ROW_FIELDS: tuple[Field, ...] = (
    integer("path", "index of the path the row lies along (0: the first)", lo=0, hi=31),
    integer("count", "number of chambers", lo=1, hi=200),
    number("pitch_mm", "distance between neighbouring chamber starts along the path",
           None),
    number("start_mm", "distance along the path from its first point to the first "
           "chamber's near end", lo=0.0, lo_open=False),
    number("length_mm", "chamber extent along the path"),
    number("width_mm", "chamber extent across the path"),
    number("height_mm", "chamber extent along z, up from z_mm"),
    number("corner_radius_mm", "rounding of the chamber's edges", 0.5, lo=0.0,
           lo_open=False),
)


@dataclass(frozen=True)
class ChamberRow:
    """One row of a network (mm): ``count`` chambers along path ``path``, the k-th from
    ``start + k pitch`` to ``start + k pitch + length`` along it."""

    path: int
    count: int
    pitch_mm: float
    start_mm: float
    length_mm: float
    width_mm: float
    height_mm: float
    corner_radius_mm: float

    @staticmethod
    def of(rec: Mapping[str, Any]) -> ChamberRow:
        return ChamberRow(rec["path"], rec["count"], rec["pitch_mm"] or 0.0, rec["start_mm"],
                          rec["length_mm"], rec["width_mm"], rec["height_mm"],
                          rec["corner_radius_mm"])

    def spans_mm(self) -> tuple[tuple[float, float], ...]:
        """(near, far) distance along the path of every chamber."""
        return tuple((self.start_mm + k * self.pitch_mm,
                      self.start_mm + k * self.pitch_mm + self.length_mm)
                     for k in range(self.count))


@dataclass(frozen=True)
class Piece:
    """One solid of the network with the field it comes from (for located problems)."""

    field: str
    what: str
    prim: TurnedBar | RoundedRod
    #: The centreline of a channel piece (a joint's is its point); None for a chamber.
    line: tuple[tuple[float, float], tuple[float, float]] | None = None


@void_kind("channels")
@dataclass(frozen=True)
class Channels:
    """Grooves of a ``width_mm`` by ``height_mm`` section (edges rounded
    ``corner_radius_mm``) on the plane z = ``z_mm``, along the polylines ``paths`` ([[x, y],
    ...], mm): the first starts at the inlet, on the body's outline, and every later one
    starts on a point of an earlier one (a branch). A round joint closes every
    bend and branch point. Each of ``rows`` places ``count`` chambers along its ``path``
    from ``start_mm``, every ``pitch_mm``, each ``length_mm`` along the path, ``width_mm``
    across it and ``height_mm`` up from ``z_mm``. Cast by the layered process only."""

    #: Its chambers turn with their paths: no beam along x models the network (the
    #: motion models leave it out).
    LONG_AXIS: ClassVar[bool] = False
    #: Its mouth is the first path's first point, anywhere on the body's outline: the
    #: groove opens there and the tube is sealed into it, so it needs no tube socket (the
    #: reader leaves ``Recipe.inlets`` empty; a socket is accepted only on the x = 0 face).
    MOUTH_ON_OUTLINE: ClassVar[bool] = True

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("width_mm", "channel width across its path"),
        number("height_mm", "channel height along z, up from z_mm"),
        number("corner_radius_mm", "rounding of the channel's four long edges", 0.0,
               lo=0.0, lo_open=False),
        number("z_mm", "z of the channels' and chambers' floor (layered: the bond face)",
               lo=-1000.0),
        paths("paths", "polylines of the channels, [[x, y], ...]: the first from the inlet "
              "on the body's outline, each later one starting on an earlier one"),
        records("rows", "rows of chambers along the paths", ROW_FIELDS),
        choice("origin", "where the points of paths are measured from: body (the body's "
               "frame, x from the inlet face) or hub (the centre of a plate's hub, x along "
               "+x, y along +y)", ORIGINS, "body", echo_default=False),
    )
    width_mm: float
    height_mm: float
    corner_radius_mm: float
    z_mm: float
    paths: tuple[tuple[tuple[float, float], ...], ...]
    rows: tuple[Record, ...]
    origin: str = "body"

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        out: list[Problem] = []
        w, h, r = v["width_mm"], v["height_mm"], v["corner_radius_mm"]
        if r > 0.45 * min(w, h):
            out.append(Problem(f"{path}.corner_radius_mm", "is too large for the channel",
                               line, r, f"at most {0.45 * min(w, h):g} mm"))
        lines = v["paths"]
        for i, pts in enumerate(lines):
            for k in range(1, len(pts)):
                if math.dist(pts[k - 1], pts[k]) < w / 2.0:
                    out.append(Problem(f"{path}.paths[{i}][{k}]", "makes a segment shorter "
                                       "than half the channel width", line, list(pts[k]),
                                       f"at least {w / 2.0:g} mm from the point before"))
                    return out
        for i in range(1, len(lines)):
            start = lines[i][0]
            if not any(_distance_to_polyline(start, lines[j]) <= ON_PATH_MM
                       for j in range(i)):
                out.append(Problem(f"{path}.paths[{i}][0]", "is not on an earlier path: the "
                                   "branch is not joined to the network", line, list(start),
                                   f"a point of paths[0]..paths[{i - 1}]"))
        for j, rec in enumerate(v["rows"]):
            out += _row_problems(ChamberRow.of(rec), rec, lines, f"{path}.rows[{j}]", line)
        return out

    # ---- frame ----------------------------------------------------------------------

    def follow_body(self, body: BodyKind, path: str) -> tuple[Channels | None, list[Problem]]:
        """This network in the body's frame: as written with ``origin: body``; with
        ``origin: hub`` every point moved by the hub's centre (``hub_center_mm()`` of a
        plate drawn with a hub; rounded to ``MOVED_DECIMALS``), the mouth snapped onto the
        outline when it is within ``ON_PATH_MM`` of it (float noise), or None and the
        problem (line None: the reader locates it by path)."""
        if self.origin == "body" or self.__dict__.get("_written") is not None:
            return self, []
        centre_of = getattr(body, "hub_center_mm", None)
        centre = centre_of() if centre_of is not None else None
        if centre is None:
            has = (f"body.kind is {body.KIND}" if centre_of is None else
                   "the plate is drawn by outline_mm")
            return None, [Problem(f"{path}.origin", "measures paths from the hub's centre, "
                                  f"and the body has no hub ({has})", None, self.origin,
                                  "body (paths in the body's frame), or hub with a plate "
                                  "drawn with hub_diameter_mm")]
        cx, cy = centre
        moved = tuple(tuple((round(x + cx, MOVED_DECIMALS) + 0.0,
                             round(y + cy, MOVED_DECIMALS) + 0.0) for x, y in pts)
                      for pts in self.paths)
        fitted = replace(self, paths=moved)
        fitted = replace(fitted, paths=fitted._snapped_mouth(tuple(body.primitives())))
        object.__setattr__(fitted, "_written", self.paths)
        object.__setattr__(fitted, "_centre", (cx, cy))
        return fitted, []

    def _snapped_mouth(self, body: tuple[Primitive, ...]
                       ) -> tuple[tuple[tuple[float, float], ...], ...]:
        """The paths with the mouth (and every point equal to it) moved onto the outline
        along the outline's normal when it lies within ``ON_PATH_MM`` of it (beyond the rounding
        ``ON_OUTLINE_MM``): a mouth
        written on the hub's edge is on the outline by construction, and only float
        rounding of the hub's centre puts it a hair off. Farther off, unchanged (the wall
        check refuses it)."""
        off = self.mouth_offset_mm(body)
        if abs(off) <= ON_OUTLINE_MM or abs(off) > ON_PATH_MM:
            return self.paths
        x0, y0 = self.mouth_mm()
        h, z = NORMAL_STEP_MM, self._z_mid
        probe = np.array([[x0 + h, y0, z], [x0 - h, y0, z], [x0, y0 + h, z], [x0, y0 - h, z]])
        d = union_sdf(body, probe)
        gx, gy = (d[0] - d[1]) / (2.0 * h), (d[2] - d[3]) / (2.0 * h)
        norm = math.hypot(gx, gy)
        if norm == 0.0:
            return self.paths
        to = (x0 - off * gx / norm, y0 - off * gy / norm)
        return tuple(tuple(to if p == (x0, y0) else p for p in pts) for pts in self.paths)

    def written_paths(self) -> tuple[tuple[tuple[float, float], ...], ...]:
        """The paths as the recipe wrote them (from the hub's centre with ``origin: hub``)."""
        written = self.__dict__.get("_written")
        return written if written is not None else self.paths

    def echo_extra(self) -> dict[str, Any]:
        """The echo writes the paths as the recipe did, beside ``origin``."""
        return {"paths": self.written_paths()}

    def as_written(self, x: float, y: float) -> tuple[float, float]:
        """A point (x, y) of the body's frame in the frame the recipe writes (mm)."""
        cx, cy = self.__dict__.get("_centre", (0.0, 0.0))
        return (x - cx + 0.0, y - cy + 0.0)

    def frame_words(self) -> str:
        """What follows a point written in the recipe's frame in a message ("" for the
        body's frame)."""
        return " from the hub's centre" if self.__dict__.get("_centre") is not None else ""

    def mouth_written(self) -> str:
        """The mouth as the recipe wrote it, with its frame, for messages."""
        x0, y0 = self.written_paths()[0][0]
        if self.__dict__.get("_centre") is None:
            return f"[{x0:g}, {y0:g}]"
        bx, by = self.mouth_mm()
        return (f"[{x0:g}, {y0:g}] from the hub's centre, [{bx:g}, {by:g}] in the body's "
                "frame")

    def _fmt(self, p: np.ndarray) -> str:
        """A point of the body's frame (x, y, z) written in the recipe's frame."""
        x, y = self.as_written(float(p[0]), float(p[1]))
        return _fmt(np.array([x, y, float(p[2])])) + self.frame_words()

    # ---- geometry -------------------------------------------------------------------

    @property
    def _z_mid(self) -> float:
        return self.z_mm + self.height_mm / 2.0

    def row(self, j: int) -> ChamberRow:
        return ChamberRow.of(self.rows[j])

    def segments(self) -> tuple[tuple[int, int, tuple[float, float], tuple[float, float]], ...]:
        """(path, segment, start, end) of every channel segment, as written."""
        return tuple((i, k, pts[k], pts[k + 1]) for i, pts in enumerate(self.paths)
                     for k in range(len(pts) - 1))

    def joints(self) -> tuple[tuple[float, float], ...]:
        """Points where a round joint closes the network: every inner point of a path and
        every branch's first point (once each, in path order)."""
        out: list[tuple[float, float]] = []
        for i, pts in enumerate(self.paths):
            for p in (pts[1:-1] if i == 0 else pts[:-1]):
                if not any(math.dist(p, q) <= ON_PATH_MM for q in out):
                    out.append(p)
        return tuple(out)

    def chamber_frames(self) -> tuple[tuple[int, int, tuple[float, float], float], ...]:
        """(row, chamber, centre (x, y), direction deg) of every chamber."""
        out = []
        for j in range(len(self.rows)):
            row = self.row(j)
            for k, (s0, s1) in enumerate(row.spans_mm()):
                c, ang = point_along(self.paths[row.path], (s0 + s1) / 2.0)
                out.append((j, k, c, ang))
        return tuple(out)

    def pieces(self) -> tuple[Piece, ...]:
        """Every solid of the network, with the field that places it."""
        out = []
        for i, k, a, b in self.segments():
            out.append(Piece(f"paths[{i}][{k + 1}]", f"paths[{i}] segment {k + 1}",
                             self.segment_bar(a, b), (a, b)))
        for p in self.joints():
            jx, jy = self.as_written(*p)
            out.append(Piece("paths", f"joint at ({jx:g}, {jy:g}){self.frame_words()}",
                             RoundedRod("z", self.z_mm, self.height_mm, p, self.width_mm / 2.0,
                                        self.corner_radius_mm), (p, p)))
        for j, k, c, ang in self.chamber_frames():
            out.append(Piece(f"rows[{j}]", f"rows[{j}] chamber {k + 1}",
                             self.chamber_bar(j, c, ang)))
        return tuple(out)

    def segment_bar(self, a: tuple[float, float], b: tuple[float, float]) -> TurnedBar:
        return TurnedBar(((a[0] + b[0]) / 2.0, (a[1] + b[1]) / 2.0, self._z_mid),
                         math.dist(a, b), self.width_mm, self.height_mm, _angle_deg(a, b),
                         self.corner_radius_mm, round_ends=False)

    def chamber_bar(self, j: int, c: tuple[float, float], ang: float) -> TurnedBar:
        row = self.row(j)
        return TurnedBar((c[0], c[1], self.z_mm + row.height_mm / 2.0), row.length_mm,
                         row.width_mm, row.height_mm, ang, row.corner_radius_mm)

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        return tuple(p.prim for p in self.pieces())

    def section_area_mm2(self) -> float:
        """The channel's section: a rounded rectangle, w h - (4 - pi) r^2 (mm2)."""
        r = self.corner_radius_mm
        return self.width_mm * self.height_mm - (4.0 - math.pi) * r * r

    def half_width_square_integral_mm3(self) -> float:
        """K = integral over the height of h(z)^2, h the half width at height z (mm3):
        (w/2)^2 (H - 2r) straight, 2 (a^2 r + a pi r^2 / 2 + 2 r^3 / 3) over the two
        roundings, a = w/2 - r (h = a + sqrt(r^2 - t^2) there). A joint's round post is
        pi K; every overlap of grooves at a joint is a plane figure scaling with h^2."""
        r, a = self.corner_radius_mm, self.width_mm / 2.0 - self.corner_radius_mm
        return ((self.width_mm / 2.0) ** 2 * (self.height_mm - 2.0 * r)
                + 2.0 * (a * a * r + a * math.pi * r * r / 2.0 + 2.0 * r ** 3 / 3.0))

    def joint_directions(self) -> tuple[tuple[tuple[float, float], tuple[float, ...]], ...]:
        """Every joint and the directions (rad) of the grooves leaving it: a path through
        it gives two, a path starting or ending at it one."""
        out = []
        for j in self.joints():
            dirs: list[float] = []
            for _, _, a, b in self.segments():
                t = math.atan2(b[1] - a[1], b[0] - a[0])
                if math.dist(a, j) <= ON_PATH_MM:
                    dirs.append(t)
                elif math.dist(b, j) <= ON_PATH_MM:
                    dirs.append(t + math.pi)
                elif _distance_to_polyline(j, (a, b)) <= ON_PATH_MM:
                    dirs += [t, t + math.pi]
            out.append((j, tuple(dirs)))
        return tuple(out)

    def channel_volume_mm3(self) -> float:
        """Closed form of the grooves' union, chambers left out (mm3): the section area
        times every segment's length, plus at each joint K times the joint's plane figure
        for a unit half width: the round post's free sectors (half their angle) less the
        overlaps of the grooves leaving it (inclusion and exclusion of their half strips,
        plane polygons)."""
        total = self.section_area_mm2() * sum(
            math.dist(a, b) for _, _, a, b in self.segments())
        k = self.half_width_square_integral_mm3()
        for _, dirs in self.joint_directions():
            total += k * joint_figure(dirs)
        return total

    def entry(self) -> Entry:
        """The inlet: the first path's first point, the passage's centre (y, z) there, the
        radius of the circle round its section."""
        (x0, y0) = self.paths[0][0]
        r = self.corner_radius_mm
        reach = math.hypot(self.width_mm / 2.0 - r, self.height_mm / 2.0 - r) + r
        return Entry((y0, self._z_mid), reach, x0)

    def mouth_mm(self) -> tuple[float, float]:
        """The mouth (x, y): the first path's first point, on the body's outline."""
        x0, y0 = self.paths[0][0]
        return (x0, y0)

    def mouth_offset_mm(self, body: Sequence[Primitive]) -> float:
        """The body's signed distance at the mouth, on the channel's mid-height (mm; 0 on
        the outline, negative inside)."""
        x0, y0 = self.mouth_mm()
        return float(union_sdf(tuple(body), np.array([[x0, y0, self._z_mid]]))[0])

    def in_mouth(self, pts: np.ndarray, min_wall_mm: float) -> np.ndarray:
        """Which points (n, 3) lie in the open mouth, where the groove meets the outline on
        purpose: within the section's half diagonal + ``min_wall_mm`` of the mouth (mm,
        in plan). There the outline is nearer the groove than the least wall because the
        groove opens through it, as a socket's mouth opens through its face; beyond it a
        groove entering the outline at a slant is measured like any other wall."""
        reach = self.entry().radius_mm + min_wall_mm
        x0, y0 = self.mouth_mm()
        return np.hypot(pts[:, 0] - x0, pts[:, 1] - y0) < reach

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """Top, bottom and both side walls of every chamber, and the end walls of the first
        and last of each row (between chambers the walls are pressed from both sides)."""
        out = []
        for j, k, (cx, cy), ang in self.chamber_frames():
            row = self.row(j)
            t = math.radians(ang)
            along, across = (math.cos(t), math.sin(t)), (-math.sin(t), math.cos(t))
            cz = self.z_mm + row.height_mm / 2.0
            lx, ly, lz = row.length_mm, row.width_mm, row.height_mm
            faces = [("top wall", (0.0, 0.0, 1.0), lz / 2.0, min(lx, ly)),
                     ("bottom wall", (0.0, 0.0, -1.0), lz / 2.0, min(lx, ly))]
            for sgn in (1.0, -1.0):
                faces.append(("side wall", (sgn * across[0], sgn * across[1], 0.0), ly / 2.0,
                              min(lx, lz)))
            if k == 0:
                faces.append(("end wall", (-along[0], -along[1], 0.0), lx / 2.0, min(ly, lz)))
            if k == row.count - 1:
                faces.append(("end wall", (along[0], along[1], 0.0), lx / 2.0, min(ly, lz)))
            for group, n, off, span in faces:
                at = (cx + n[0] * off, cy + n[1] * off, cz + n[2] * off)
                out.append(Membrane(group, "bulge", span / 2.0, at, n))
        return tuple(out)

    def process_reason(self, process_kind: str) -> str | None:
        """Why ``process_kind`` cannot cast this void (None: it can)."""
        if process_kind == "layered":
            return None
        return ("is a branched network: its core could not be pulled out through one "
                "socket; posts on the bond face form it")

    # ---- checks against the body ----------------------------------------------------

    def wall_problems(self, body: tuple[Primitive, ...], sockets: tuple[Primitive, ...],
                      min_wall_mm: float, path: str) -> list[Problem]:
        """The network inside the body with ``min_wall_mm`` of silicone to its surface (the
        inlet's mouth, inside a socket, left out), the inlet on the outline, and
        pieces that do not join keeping ``min_wall_mm`` apart: one located line each."""
        out: list[Problem] = []
        x0, y0 = self.written_paths()[0][0]
        off = self.mouth_offset_mm(body)
        if abs(off) > ON_PATH_MM:
            where = "inside" if off < 0.0 else "outside"
            written = ", written from the hub's centre" if self.frame_words() else ""
            out.append(Problem(f"{path}.paths[0][0]", f"puts the inlet {where} the body",
                               None, [x0, y0], f"a point on the body's outline{written} "
                               "(the groove opens there, where the tube is sealed in)"))
            return out
        pieces = self.pieces()
        samples = [p.prim.surface_samples(SAMPLE_MM) for p in pieces]
        for p, pts in zip(pieces, samples):
            keep = pts
            if sockets:
                keep = pts[union_sdf(sockets, pts) >= 1e-6]
            else:
                keep = pts[~self.in_mouth(pts, min_wall_mm)]
            if len(keep) == 0:
                continue
            d = union_sdf(body, keep)
            worst = int(np.argmax(d))
            if d[worst] > -min_wall_mm + 1e-6:
                what = ("leaves the body" if d[worst] > -1e-6 else
                        f"comes {-d[worst]:.2f} mm from the body's surface")
                out.append(Problem(f"{path}.{p.field}", f"{what}: {p.what} at "
                                   f"{self._fmt(keep[worst])}", None, None,
                                   f"at least checks.min_wall_mm = {min_wall_mm:g} mm of "
                                   "silicone to the body's surface"))
                return out
        joints = self.joints()
        for b in range(len(pieces)):
            for a in range(b):
                if _meet_at_joint(pieces[a], pieces[b], joints):
                    continue
                gap = float(pieces[a].prim.sdf(samples[b]).min())
                if gap < -JOIN_MM:  # joined: one network, no wall between
                    continue
                back = float(pieces[b].prim.sdf(samples[a]).min())
                if back < -JOIN_MM:
                    continue
                gap = min(gap, back)
                if gap < min_wall_mm - 1e-6:
                    out.append(Problem(f"{path}.{pieces[b].field}", f"leaves {max(gap, 0.0):.2f}"
                                       f" mm of silicone between {pieces[b].what} and "
                                       f"{pieces[a].what}, which do not join", None, None,
                                       f"at least checks.min_wall_mm = {min_wall_mm:g} mm, "
                                       "or pieces that overlap"))
                    return out
        return out


#: Length of the half strips a joint's figure is worked out on (unit half width): longer
#: than any overlap of two grooves leaving one point at distinct angles.
STRIP_REACH = 1.0e4


def joint_figure(dirs: Sequence[float]) -> float:
    """For grooves of unit half width leaving one point in the directions ``dirs`` (rad),
    with a round post of unit radius there: the area the union adds to (or takes from) the
    half strips' own areas. The post adds its sectors no half strip covers (a half strip
    covers the half plane ahead of the point, so the free angle is the sum of the gaps
    between neighbouring directions beyond pi, and the sectors' area half of it); the
    strips' overlaps come off by inclusion and exclusion of their intersections (convex
    polygons, clipped and measured with the shoelace formula)."""
    ang = sorted(t % (2.0 * math.pi) for t in dirs)
    gaps = [b - a for a, b in zip(ang, ang[1:])] + [ang[0] + 2.0 * math.pi - ang[-1]]
    free = sum(max(g - math.pi, 0.0) for g in gaps)
    strips = [_half_strip(t) for t in ang]
    over = 0.0
    for n in range(2, len(strips) + 1):
        sign = -1.0 if n % 2 == 0 else 1.0
        for combo in _combinations(len(strips), n):
            poly = strips[combo[0]]
            for i in combo[1:]:
                poly = _clip(poly, strips[i])
                if len(poly) < 3:
                    break
            over += sign * _area(poly)
    return free / 2.0 + over


def _combinations(n: int, k: int) -> list[tuple[int, ...]]:
    return list(itertools.combinations(range(n), k))


def _half_strip(t: float) -> list[tuple[float, float]]:
    c, s = math.cos(t), math.sin(t)
    pts = [(0.0, -1.0), (STRIP_REACH, -1.0), (STRIP_REACH, 1.0), (0.0, 1.0)]
    return [(a * c - b * s, a * s + b * c) for a, b in pts]


def _area(poly: Sequence[tuple[float, float]]) -> float:
    if len(poly) < 3:
        return 0.0
    return 0.5 * abs(sum(poly[i][0] * poly[i - 1][1] - poly[i - 1][0] * poly[i][1]
                         for i in range(len(poly))))


def _clip(subject: list[tuple[float, float]], clip: list[tuple[float, float]]
          ) -> list[tuple[float, float]]:
    """Sutherland and Hodgman: ``subject`` cut by every edge of the convex
    counter-clockwise ``clip``."""
    out = subject
    for i in range(len(clip)):
        a, b = clip[i - 1], clip[i]
        src, out = out, []
        if not src:
            break
        for j in range(len(src)):
            p, q = src[j - 1], src[j]
            sp, sq = _side(a, b, p), _side(a, b, q)
            if sq >= 0.0:
                if sp < 0.0:
                    out.append(_cross_point(p, q, sp, sq))
                out.append(q)
            elif sp >= 0.0:
                out.append(_cross_point(p, q, sp, sq))
    return out


def _side(a: tuple[float, float], b: tuple[float, float], p: tuple[float, float]) -> float:
    """Twice the signed area of (a, b, p): positive with p left of a -> b."""
    return (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0])


def _cross_point(p: tuple[float, float], q: tuple[float, float], sp: float, sq: float
                 ) -> tuple[float, float]:
    t = sp / (sp - sq)
    return (p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1]))


def _meet_at_joint(a: Piece, b: Piece, joints: Sequence[tuple[float, float]]) -> bool:
    """Two channel pieces whose centrelines pass through one joint: the network joins
    them there (they may only touch each other, flat end to flat end)."""
    if a.line is None or b.line is None:
        return False
    return any(_distance_to_polyline(j, a.line) <= ON_PATH_MM
               and _distance_to_polyline(j, b.line) <= ON_PATH_MM for j in joints)


def _fmt(p: np.ndarray) -> str:
    return "(" + ", ".join(f"{c:.2f}" for c in p) + ") mm"


def _angle_deg(a: Sequence[float], b: Sequence[float]) -> float:
    return math.degrees(math.atan2(b[1] - a[1], b[0] - a[0]))


def path_length_mm(pts: Sequence[Sequence[float]]) -> float:
    return sum(math.dist(pts[k], pts[k + 1]) for k in range(len(pts) - 1))


def point_along(pts: Sequence[tuple[float, float]], s_mm: float
                 ) -> tuple[tuple[float, float], float]:
    """The point ``s_mm`` along the polyline and its segment's direction (deg); past the
    end, on the last segment's line."""
    for k in range(len(pts) - 1):
        a, b = pts[k], pts[k + 1]
        seg = math.dist(a, b)
        if s_mm <= seg or k == len(pts) - 2:
            t = s_mm / seg
            return (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])), _angle_deg(a, b)
        s_mm -= seg
    raise ValueError("a path has at least two points")


def _segment_of(pts: Sequence[Sequence[float]], s0: float, s1: float) -> int | None:
    """The segment holding the span [s0, s1] along the polyline (None: it crosses a bend
    or runs past an end)."""
    at = 0.0
    for k in range(len(pts) - 1):
        seg = math.dist(pts[k], pts[k + 1])
        if at - ON_PATH_MM <= s0 and s1 <= at + seg + ON_PATH_MM:
            return k
        at += seg
    return None


def _distance_to_polyline(p: Sequence[float], pts: Sequence[Sequence[float]]) -> float:
    q = np.asarray(p, dtype=float)
    best = math.inf
    for k in range(len(pts) - 1):
        a, b = np.asarray(pts[k], dtype=float), np.asarray(pts[k + 1], dtype=float)
        ab = float(np.dot(b - a, b - a))
        t = float(np.clip(np.dot(q - a, b - a) / ab, 0.0, 1.0)) if ab > 0.0 else 0.0
        best = min(best, float(np.linalg.norm(q - (a + t * (b - a)))))
    return best


def _row_problems(row: ChamberRow, rec: Mapping[str, Any], lines: Sequence[Sequence[Any]],
                  at: str, line: int | None) -> list[Problem]:
    """A row on a path that exists, chambers that do not overlap and each on one straight
    segment of the path, corners that fit the chamber."""
    if row.path >= len(lines):
        return [Problem(f"{at}.path", "names no path", line, row.path,
                        f"0 to {len(lines) - 1} (an index into paths)")]
    if row.count > 1 and rec["pitch_mm"] is None:
        return [Problem(f"{at}.pitch_mm", f"is required for a row of {row.count} chambers",
                        line, None, "a number, 0.05 <= value <= 1000 mm")]
    if row.count > 1 and row.length_mm >= row.pitch_mm:
        return [Problem(f"{at}.length_mm", "makes neighbouring chambers of the row overlap",
                        line, row.length_mm, f"less than pitch_mm ({row.pitch_mm:g} mm)")]
    smallest = min(row.length_mm, row.width_mm, row.height_mm)
    if row.corner_radius_mm > 0.45 * smallest:
        return [Problem(f"{at}.corner_radius_mm", "is too large for the chamber", line,
                        row.corner_radius_mm, f"at most {0.45 * smallest:g} mm")]
    pts = lines[row.path]
    total = path_length_mm(pts)
    for k, (s0, s1) in enumerate(row.spans_mm()):
        if _segment_of(pts, s0, s1) is None:
            field = "start_mm" if k == 0 else "count"
            got = row.start_mm if k == 0 else row.count
            return [Problem(f"{at}.{field}", f"puts chamber {k + 1} ({s0:g} to {s1:g} mm "
                            f"along paths[{row.path}]) across a bend or past its end", line,
                            got, f"every chamber on one straight segment of the path "
                            f"(0 to {total:g} mm along it)")]
    return []
