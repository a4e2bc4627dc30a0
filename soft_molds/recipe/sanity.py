"""Geometric sanity of a validated recipe, checked with exact distance functions before
any kernel call: voids inside the body with the minimum silicone wall, every void
reached from the inlet socket and the socket on the flat inlet face. The rules of the mold
(parting plane, block features, printer) are the plan stage's (:mod:`soft_molds.plan.rules`)."""

from __future__ import annotations

from collections.abc import Callable
from functools import partial

import numpy as np

from ..errors import Problem
from . import voidgraph
from .model import Recipe
from .primitives import Primitive, union_sdf

#: Sample spacing on void surfaces (mm). Walls here are planes, cylinders and fillets,
#: whose distance to the body varies smoothly, so 0.5 mm resolves a 0.05 mm reporting step
#: well enough for a go/no-go before the kernel runs.
SAMPLE_MM = 0.5
#: Sample budget per void entry: fields allow parts up to 1000 mm, and a 1000 mm bore at
#: 0.5 mm spacing would need ~24 million samples (gigabytes). Voids whose bounding shells
#: exceed ~25 000 mm2 are sampled more coarsely instead; flat and cylindrical walls still
#: give their exact distance.
MAX_SAMPLES = 100_000
EPS = 1e-6


def _spacing(prims: tuple[Primitive, ...]) -> float:
    """Sample spacing (mm) for a set of primitives: SAMPLE_MM, or coarser so that their
    bounding-box shells hold about MAX_SAMPLES grid points."""
    area = 0.0
    for p in prims:
        lo, hi = p.bounds()
        a, b, c = np.maximum(hi - lo, SAMPLE_MM)
        area += 2.0 * (a * b + b * c + a * c)
    return max(SAMPLE_MM, float(np.sqrt(area / MAX_SAMPLES)))


def _fmt_point(p: np.ndarray) -> str:
    return "(" + ", ".join(f"{c:.2f}" for c in p) + ") mm"


def sanity_problems(r: Recipe, lines: dict[str, int]) -> list[Problem]:
    out: list[Problem] = []
    body = r.body_primitives()
    socket = r.inlet.socket()
    min_wall = r.checks.min_wall_mm
    sock_r = r.inlet.socket_diameter_mm / 2.0
    cy, cz = r.inlet.center_mm

    def line(path: str) -> int | None:
        while path and path not in lines:
            path = path.rsplit(".", 1)[0] if "." in path else ""
        return lines.get(path)

    # The socket mouth must sit on the flat x = 0 face with a wall around it.
    ring = np.linspace(0.0, 2 * np.pi, 73)[:-1]
    delta = 1e-3
    rim = np.stack([np.full_like(ring, delta), cy + (sock_r + min_wall) * np.cos(ring),
                    cz + (sock_r + min_wall) * np.sin(ring)], axis=1)
    d = union_sdf(body, rim)
    if np.any(d > -delta + 1e-7):
        # When the socket follows the first void, point at the line the user wrote.
        given = "inlet.center_mm" in lines
        follows = "" if given else " (derived from voids[0].center_mm)"
        where = line("inlet.center_mm") if given else (
            lines.get("voids[0].center_mm") or line("inlet") or line("voids[0]"))
        out.append(Problem("inlet.center_mm", "puts the socket off the flat inlet face (x = 0) "
                           f"or closer than checks.min_wall_mm = {min_wall:g} mm to its edge"
                           + follows, where,
                           [cy, cz],
                           "a point of the x = 0 face at least socket radius + min wall from "
                           "its rim"))

    sock_samples = socket.surface_samples(_spacing((socket,)))
    # The mouth is meant to be open: within min_wall of the inlet face the face itself is
    # nearer than min_wall, and the rim check above bounds the wall there. Beyond it the
    # socket's side is checked as well as its floor, since a body may narrow away from
    # x = 0 (a tapered section).
    sock_samples = sock_samples[sock_samples[:, 0] >= min(min_wall,
                                                          r.inlet.socket_depth_mm) - EPS]
    _wall_problems(out, "inlet", line("inlet") or line(""), body, sock_samples, min_wall)

    # A void is reached when it opens into the socket or overlaps a void that is (the
    # void graph, exact for chambers and bores): one line per group reaching no inlet,
    # on its first void, after that void's wall findings.
    lost = {g[0]: g for g in voidgraph.unreached(
        r.void_primitives(), lambda i: _opens_into_socket(r, r.voids[i]))}
    for i, (void, prims) in enumerate(zip(r.voids, r.void_primitives())):
        path = f"voids[{i}]"
        spacing = _spacing(prims)
        per_prim = [p.surface_samples(spacing) for p in prims]
        samples = np.concatenate(per_prim)
        # Surface inside another primitive of the same void, or inside the socket, is not
        # a cast surface; keep only points on the void set's own boundary.
        inside_self = union_sdf(prims, samples) < -EPS
        inside_socket = socket.sdf(samples) < EPS
        samples = samples[~inside_self & ~inside_socket]
        _wall_problems(out, path, line(path), body, samples, min_wall,
                       partial(_wall_keys, void, path))
        _socket_wall_problems(out, r, void, path, line, per_prim)
        if i in lost:
            out.append(_unreached(r, lost[i], line(path)))

    return out


def _unreached(r: Recipe, group: tuple[int, ...], at: int | None) -> Problem:
    """The finding for a group of joined voids none of which opens into the socket."""
    (ey, ez), er, ex = r.voids[group[0]].entry()
    (cy, cz), sock_r = r.inlet.center_mm, r.inlet.socket_diameter_mm / 2.0
    rest = ", ".join(f"voids[{i}]" for i in group[1:])
    also = f" (nor is {rest}, joined to it)" if rest else ""
    return Problem(f"voids[{group[0]}]", "is not reached from the inlet socket" + also, at,
                   None, f"its entry (y, z) = ({ey:g}, {ez:g}) mm, radius {er:g} mm and "
                   f"start x = {ex:g} mm must lie inside the socket (centre ({cy:g}, {cz:g}), "
                   f"radius {sock_r:g} mm, depth {r.inlet.socket_depth_mm:g} mm), or hold its "
                   "whole section; or the void must overlap a void that is reached")


def _opens_into_socket(r: Recipe, void: object) -> bool:
    """Whether ``void`` opens straight into the tube socket: one passage holds the other at
    the inlet, the void's mouth inside the socket or a void wider than the socket (a thin
    tube into a fat bore) round the whole socket section, starting within the socket's
    depth. Whether its core still comes out through the socket is the core-extraction
    check's to say."""
    (ey, ez), er, ex = void.entry()  # type: ignore[attr-defined]
    cy, cz = r.inlet.center_mm
    sock_r = r.inlet.socket_diameter_mm / 2.0
    off = np.hypot(ey - cy, ez - cz)
    inside = off + er <= sock_r + EPS or off + sock_r <= er + EPS
    return bool(inside and ex <= r.inlet.socket_depth_mm)


def _wall_problems(out: list[Problem], path: str, line: int | None, body, samples: np.ndarray,
                   min_wall: float, keys: Callable[[np.ndarray], str] | None = None) -> None:
    if len(samples) == 0:
        return
    d = union_sdf(body, samples)
    worst = int(np.argmax(d))
    if d[worst] > -EPS:
        out.append(Problem(path, f"breaks through the body surface at {_fmt_point(samples[worst])}",
                           line, None, "voids entirely inside the body"))
    elif -d[worst] < min_wall - 1e-6:
        hint = ""
        if keys is not None:
            hint = f" (this wall is set by {keys(_outward(body, samples[worst]))})"
        out.append(Problem(path, f"leaves a silicone wall of {-d[worst]:.2f} mm at "
                           f"{_fmt_point(samples[worst])}", line, None,
                           f"at least checks.min_wall_mm = {min_wall:g} mm{hint}"))


def _outward(body: tuple[Primitive, ...], p: np.ndarray, h: float = 1e-3) -> np.ndarray:
    """Unit direction from ``p`` towards the nearest body surface (the body's distance
    gradient, by central differences)."""
    steps = np.eye(3) * h
    g = (union_sdf(body, p + steps) - union_sdf(body, p - steps)) / (2.0 * h)
    return g / max(float(np.linalg.norm(g)), 1e-12)


#: A void's fields that set the wall it leaves across each axis (x: near end, far end), in
#: the order they are named; only those the kind has are named.
_WALL_FIELDS = {
    "-x": ("start_mm",),
    "+x": ("start_mm", "count", "pitch_mm", "depth_mm", "length_mm"),
    "y": ("width_mm", "diameter_mm", "center_mm"),
    "z": ("height_mm", "diameter_mm", "center_mm"),
}


def _wall_keys(void: object, path: str, outward: np.ndarray) -> str:
    """The keys that set a void's wall whose outside lies along ``outward``: the void's own
    (``voids[0].height_mm``), the body's size and ``checks.min_wall_mm``."""
    axis = int(np.argmax(np.abs(outward)))
    side = ("-x" if outward[0] < 0 else "+x") if axis == 0 else "yz"[axis - 1]
    fields = {f.name for f in getattr(void, "FIELDS", ())}
    own = [f"{path}.{k}" for k in _WALL_FIELDS[side] if k in fields]
    return ", ".join([*own, "the body's size", "checks.min_wall_mm"])


def _socket_wall_problems(out: list[Problem], r: Recipe, void: object, path: str,
                          line: Callable[[str], int | None], per_prim: list[np.ndarray]
                          ) -> None:
    """The silicone between the socket's floor and a part of the void that does not open
    into the socket (a chamber beyond the feed channel): at least the least wall, or the
    tube pressed into the socket tears through it."""
    socket = r.inlet.socket()
    min_wall = r.checks.min_wall_mm
    worst, where, opens = np.inf, None, False
    for samples in per_prim:  # each primitive's surface samples
        d = socket.sdf(samples)
        if len(d) == 0 or float(d.min()) <= EPS:
            opens = True  # opens into the socket (or touches it): the passage, not a wall
            continue
        k = int(np.argmin(d))
        if d[k] < worst:
            worst, where = float(d[k]), samples[k]
    # A void that does not open into the socket at all is refused as not reached instead.
    if not opens or where is None or worst >= min_wall - 1e-6:
        return
    fields = {f.name for f in getattr(void, "FIELDS", ())}
    own = f"{path}.start_mm, " if "start_mm" in fields else ""
    # Blame the start the recipe wrote, else the void entry (its default placement).
    at = f"{path}.start_mm" if f"{path}.start_mm" in r.lines else path
    out.append(Problem(at, f"leaves a silicone wall of {worst:.2f} mm to the inlet socket's "
                       f"floor at {_fmt_point(where)}", line(at), None,
                       f"at least checks.min_wall_mm = {min_wall:g} mm (this wall is set by "
                       f"{own}inlet.socket_depth_mm ({r.inlet.socket_depth_mm:g} mm) and "
                       "checks.min_wall_mm)"))


def wall_keys_at(r: Recipe, point: tuple[float, float, float], between: bool) -> str:
    """The recipe keys that set the silicone wall whose middle is ``point`` (mm, world):
    for a wall between voids, the nearest two of the socket and the voids' parts (each
    chamber on its own; a feed channel, which joins them, is no side of such a wall);
    for an outer wall, the nearest void's keys across the wall's direction."""
    p = np.asarray([point], dtype=float)
    length = r.body_length_mm
    sides: list[tuple[float, str, int, object]] = [
        (float(r.inlet.socket().sdf(p)[0]), "socket", -1, None)]
    for i, v in enumerate(r.voids):
        boxes = getattr(v, "chamber_boxes", None)
        parts = boxes(length) if boxes is not None else v.primitives(length)
        sides += [(float(q.sdf(p)[0]), "void", i, v) for q in parts]
    sides.sort(key=lambda s: s[0])
    (_, what_a, a, va), (_, what_b, b, vb) = sides[0], sides[1]
    if not between:
        return _wall_keys(va, f"voids[{a}]", _outward(r.body_primitives(), p[0])) \
            if what_a == "void" else "inlet.socket_depth_mm, checks.min_wall_mm"
    keys: list[str] = []
    if "socket" in (what_a, what_b):
        i, near = (b, vb) if what_a == "socket" else (a, va)
        keys = [f"voids[{i}].start_mm"] if _has(near, "start_mm") else []
        keys.append("inlet.socket_depth_mm")
    elif a == b:
        keys = [f"voids[{a}].{k}" for k in ("pitch_mm", "depth_mm") if _has(va, k)]
    else:
        for i, side in ((a, va), (b, vb)):
            keys += [f"voids[{i}].{k}" for k in ("center_mm", "width_mm", "diameter_mm")
                     if _has(side, k)]
    return ", ".join([*keys, "checks.min_wall_mm"])


def _has(void: object, name: str) -> bool:
    return any(f.name == name for f in getattr(void, "FIELDS", ()))
