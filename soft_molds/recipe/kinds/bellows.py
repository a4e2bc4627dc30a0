"""Void kind ``bellows``: a cavity that follows a revolved body's profile at one wall
thickness, from the inlet face's wall to the far end's.

The cavity is the body's profile moved inward by ``wall_mm`` (its inner offset): every
straight edge moves ``wall_mm`` towards the inside, a rounded outer corner keeps its
centre with its radius less the wall (a sharp one stays sharp), a rounded inner corner
(a pleat root) gets the radius plus the wall, so the silicone is ``wall_mm`` thick
everywhere: between the pleats, round the neck and the tip, in the inlet wall and the far
end. The tube socket enters the cavity through the inlet wall (its floor lies in the
cavity), and the core leaves the same way: the pleats are wider than the socket, so the
core-extraction check decides whether the inlet ring stretches round them without tearing.

The cavity is derived from the body, so the kind takes the body when the recipe is read
(:meth:`Bellows.follow_body`); a bellows in a body that is not ``revolved`` is refused.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any, ClassVar

import numpy as np

from ...errors import Problem
from ..contracts import BodyKind, Entry
from ..fields import Field, number
from ..membranes import Membrane
from ..primitives import Primitive, Revolved, corner_tangent_mm, profile_problems, profile_vertices
from ..registry import void_kind
from .revolved import RevolvedBody

#: The cavity must keep the wall everywhere to this (mm): far below any printed feature.
WALL_TOL_MM = 1e-6
#: Sample spacing (mm) for the check that no other part of the body comes nearer than the
#: wall (a narrow pleat's far flank, the far face near the last pleat).
CHECK_SPACING_MM = 0.25


def inward_offset(body: Revolved, wall_mm: float
                  ) -> tuple[Revolved | None, tuple[int, str] | None]:
    """``body``'s profile moved inward by ``wall_mm`` (the near and far faces too), with
    the roundings adjusted as the module says; or None and (the body's point index, what
    went wrong) when no such cavity exists: an edge vanishes or turns round (the wall is
    thicker than a pleat is wide), the cavity's roundings do not fit, or another part of
    the body comes nearer than the wall."""
    v = profile_vertices(body.points)
    n = len(body.points)
    tip = body.points[-1][1] == 0.0
    # Edge j runs from v[j] to v[j+1]: the near face, the profile's edges, the far face.
    d = np.diff(v, axis=0)
    d = d / np.linalg.norm(d, axis=1, keepdims=True)
    inward = np.stack([d[:, 1], -d[:, 0]], axis=1)  # right of a clockwise outline
    base = v[:-1] + wall_mm * inward
    pts: list[tuple[float, float]] = []
    rounds: list[float] = []
    for i in range(n):
        j = i + 1  # the corner of point i is between edges j - 1 and j
        if tip and i == n - 1:
            p = _meet(base[j - 1], d[j - 1], np.array([0.0, 0.0]), np.array([1.0, 0.0]))
            rounds.append(0.0)
        else:
            p = _meet(base[j - 1], d[j - 1], base[j], d[j])
            convex = d[j - 1][0] * d[j][1] - d[j - 1][1] * d[j][0] < 0.0
            rr = body.rounds_mm[i]
            rounds.append(max(rr - wall_mm, 0.0) if convex else rr + wall_mm if rr > 0 else 0.0)
        if p is None:
            return None, (i, "leaves two of its edges parallel")
        pts.append((float(p[0]) + 0.0, float(p[1]) + 0.0))
    cavity_v = profile_vertices(tuple(pts))
    for j in range(1, min(len(v), len(cavity_v))):
        if float((cavity_v[j] - cavity_v[j - 1]) @ (v[j] - v[j - 1])) <= 0.0:
            return None, (min(max(j - 1, 0), n - 1), "turns an edge round: the wall is "
                          "thicker than the body is wide there")
    if pts[0][1] <= 0.0 or any(r <= 0.0 for _, r in pts[:-1]):
        return None, (0, "leaves no room inside")
    bad = profile_problems(tuple(pts), tuple(rounds))
    if bad:
        return None, (bad[0][0], f"{bad[0][1]} in the cavity")
    cavity = Revolved(tuple(pts), tuple(rounds))
    samples = cavity.surface_samples(CHECK_SPACING_MM)
    gap = -body.sdf(samples)
    worst = int(np.argmin(gap))
    if gap[worst] < wall_mm - WALL_TOL_MM:
        x = float(samples[worst, 0])
        i = int(np.argmin([abs(px - x) for px, _ in body.points]))
        return None, (i, f"brings another part of the body within {gap[worst]:.2f} mm of the "
                      f"cavity at x = {x:.2f} mm")
    return cavity, None


def _meet(p: np.ndarray, d: np.ndarray, q: np.ndarray, e: np.ndarray) -> np.ndarray | None:
    """Where the lines p + s d and q + t e cross (None when parallel)."""
    den = d[0] * e[1] - d[1] * e[0]
    if abs(den) < 1e-12:
        return None
    s = ((q[0] - p[0]) * e[1] - (q[1] - p[1]) * e[0]) / den
    return p + s * d


@void_kind("bellows")
@dataclass(frozen=True)
class Bellows:
    """The body's profile moved inward by ``wall_mm``: a cavity with a silicone wall of
    that thickness everywhere, from the inlet face's wall (x = wall_mm, inside the tube
    socket, which opens into it) to the far end's. Only in a ``revolved`` body. Inflated,
    the pleat walls bulge and the straight parts swell like tubes."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("wall_mm", "silicone wall thickness all round the cavity (the inlet wall too: "
               "at most the socket depth)"),
    )
    wall_mm: float

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        return []

    def follow_body(self, body: BodyKind, path: str) -> tuple[Bellows | None, list[Problem]]:
        """This void fitted to ``body`` (it then knows its cavity), or None and the
        problems (line None: the reader locates them by path)."""
        if not isinstance(body, RevolvedBody):
            return None, [Problem(f"{path}.kind", "follows the body's profile, and only a "
                                  f"revolved body has one (body.kind is {body.KIND})", None,
                                  "bellows", "body.kind: revolved, or another void kind")]
        cavity, why = inward_offset(body.solid(), self.wall_mm)
        if cavity is None:
            i, what = why if why is not None else (0, "")
            at = (f"body.profile_mm[{i}]" if body.profile_mm is not None else
                  f"point {i} of the profile the bellows fields make")
            return None, [Problem(f"{path}.wall_mm", f"cannot follow the body: near {at} it "
                                  f"{what}", None, self.wall_mm,
                                  "a wall thinner than half the body's narrowest pleat or "
                                  "edge")]
        fitted = replace(self)
        object.__setattr__(fitted, "_cavity", cavity)
        object.__setattr__(fitted, "_pleated", body.pleats is not None)
        return fitted, []

    def cavity(self) -> Revolved:
        found = self.__dict__.get("_cavity")
        if not isinstance(found, Revolved):
            raise TypeError("a bellows void knows its cavity only after follow_body()")
        return found

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]:
        return (self.cavity(),)

    def entry(self) -> Entry:
        """The cavity is wider than any socket, so the socket's own section is the passage:
        the entry is the axis point of the cavity's near face (radius 0), reached when the
        socket is deeper than the inlet wall."""
        return Entry((0.0, 0.0), 0.0, self.cavity().start_mm)

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]:
        """Every wall of the cavity, probed at one azimuth (the body is the same all round):
        each sloped edge (a pleat wall) as a bulge of half its length, each straight
        cylindrical edge as a tube of its radius, and the inlet wall and far end as bulges
        of their face radius. The crests and roots, curved both ways, are stiffer than the
        walls either side and are not listed apart."""
        cav = self.cavity()
        v = profile_vertices(cav.points)
        rr = [0.0, *cav.rounds_mm] + [0.0] * (len(v) - 1 - len(cav.rounds_mm))
        tan = [0.0] + [corner_tangent_mm(v[j - 1], v[j], v[j + 1], rr[j])
                       for j in range(1, len(v) - 1)] + [0.0]
        sloped = "pleat wall" if self.__dict__.get("_pleated") else "sloped wall"
        out = []
        for j in range(len(v) - 1):
            a, b = v[j], v[j + 1]
            length = float(np.linalg.norm(b - a))
            d = (b - a) / length
            mid = (a + d * tan[j] + b - d * tan[j + 1]) / 2.0
            normal = (float(-d[1]), float(d[0]))  # out of the cavity, into the wall
            x, rho = float(mid[0]), float(mid[1])
            if abs(d[0]) < 1e-12:  # the near or the far face: a flat disc
                group = "inlet wall" if j == 0 else "end cap"
                corner = 1 if j == 0 else j
                # A face rounded away whole (a hemispherical end) is a spherical cap.
                span = max(float(max(a[1], b[1])) - tan[corner], rr[corner])
                out.append(Membrane(group, "bulge", span, (x, rho, 0.0), (normal[0], 0.0, 0.0)))
            elif abs(d[1]) < 1e-12:
                out.append(Membrane("tube wall", "tube", rho, (x, rho, 0.0), (0.0, 1.0, 0.0)))
            else:
                out.append(Membrane(sloped, "bulge", length / 2.0, (x, rho, 0.0),
                                    (normal[0], normal[1], 0.0)))
        return tuple(out)
