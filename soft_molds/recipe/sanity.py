"""Geometric sanity of a validated recipe, checked with exact distance functions before
any kernel call: voids inside the body with the minimum silicone wall, every group of
joined voids reached from exactly one inlet socket, every socket on its flat end face,
feeding a void and clear of the other sockets. The rules of the mold
(parting plane, block features, printer) are the plan stage's (:mod:`soft_molds.plan.rules`)."""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import replace
from functools import partial

import numpy as np

from ..errors import Problem
from .feeds import fed_groups
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
    sockets = r.sockets()
    min_wall = r.checks.min_wall_mm

    def line(path: str) -> int | None:
        while path and path not in lines:
            path = path.rsplit(".", 1)[0] if "." in path else ""
        return lines.get(path)

    for j in range(len(r.inlets)):
        _inlet_problems(out, r, j, body, line)
    _socket_pair_problems(out, r, line)

    # A void is reached when it opens into a socket or overlaps a void that is (the void
    # graph, exact for chambers and bores): one line per group reaching no inlet, on its
    # first void, after that void's wall findings; one per group reaching two.
    void_prims = r.void_primitives()
    fed = fed_groups(r)
    # A network opening on the outline with no socket is reached through its mouth.
    lost = {g[0]: g for g, js in fed if not js
            and not (not r.inlets and any(getattr(r.voids[i], "MOUTH_ON_OUTLINE", False)
                                          for i in g))}
    for i, (void, prims) in enumerate(zip(r.voids, void_prims)):
        path = f"voids[{i}]"
        spacing = _spacing(prims)
        per_prim = [p.surface_samples(spacing) for p in prims]
        samples = np.concatenate(per_prim)
        # Surface inside another primitive of the same void, or inside a socket, is not
        # a cast surface; keep only points on the void set's own boundary.
        inside_self = union_sdf(prims, samples) < -EPS
        inside_socket = (union_sdf(sockets, samples) < EPS if sockets
                         else np.zeros(len(samples), dtype=bool))
        samples = samples[~inside_self & ~inside_socket]
        own_walls = getattr(void, "wall_problems", None)
        if own_walls is not None:  # a network: located by the piece, joints measured
            out.extend(replace(p, line=line(p.path))
                       for p in own_walls(body, sockets, min_wall, path))
        else:
            _wall_problems(out, path, line(path), body, samples, min_wall,
                           partial(_wall_keys, void, path))
        for j in range(len(r.inlets)):
            _socket_wall_problems(out, r, j, void, path, line, per_prim)
        if i in lost:
            out.append(_unreached(r, lost[i], line(path)))
    groups = [g for g, js in fed if js]  # one core each
    for g, js in fed:
        for j in js[1:]:
            at = f"{r.inlet_path(j)}.center_mm"
            names = ", ".join(f"voids[{i}]" for i in g)
            out.append(Problem(at, f"opens into the void group {names}, which "
                               f"{r.inlet_path(js[0])} feeds too: two inlets feed one void "
                               "group; one core can leave through one socket only",
                               line(at), list(r.inlets[j].center_mm),
                               "one inlet per group of joined voids (move this socket off "
                               "the group, or part the voids into groups of their own)"))
    out.extend(_group_wall_problems(r, groups, line))
    # (The one socket of a recipe that no void opens into is said by the voids' lines.)
    for j in range(len(r.inlets) if len(r.inlets) > 1 else 0):
        if not any(j in js for _, js in fed):
            at = f"{r.inlet_path(j)}.center_mm"
            out.append(Problem(at, "puts a socket that no void opens into", line(at),
                               list(r.inlets[j].center_mm),
                               "a socket a void's passage opens into (each inlet feeds one "
                               "group of joined voids)"))
    return out


def _inlet_problems(out: list[Problem], r: Recipe, j: int, body: tuple[Primitive, ...],
                    line: Callable[[str], int | None]) -> None:
    """Socket ``j`` on its flat face with a wall round its mouth, and silicone round its
    side and floor."""
    inlet = r.inlets[j]
    path = r.inlet_path(j)
    min_wall = r.checks.min_wall_mm
    sock_r = inlet.socket_diameter_mm / 2.0
    cy, cz = inlet.center_mm
    face_x = inlet.face_x_mm(r.body_length_mm)
    inward = -1.0 if inlet.at_end else 1.0
    lines = r.lines
    # The socket mouth must sit on the flat face with a wall around it.
    ring = np.linspace(0.0, 2 * np.pi, 73)[:-1]
    delta = 1e-3
    rim = np.stack([np.full_like(ring, face_x + inward * delta),
                    cy + (sock_r + min_wall) * np.cos(ring),
                    cz + (sock_r + min_wall) * np.sin(ring)], axis=1)
    # A curved inlet face (a ring's outer face, touching the plane x = 0 along a line)
    # stands back from the plane at the rim: the mouth counts as on the face when the rim
    # meets it within half the socket's depth, so the tube still grips the other half.
    curved = bool(getattr(type(r.body), "CURVED_INLET_FACE", False))
    on_plane = rim - np.array([inward * delta, 0.0, 0.0])
    sags = (_face_sag_mm(body, on_plane, inward, inlet.socket_depth_mm / 2.0) if curved
            else np.zeros(len(rim)))
    sag = float(sags.max())
    rim[:, 0] += inward * sags
    # Past a sloping face, delta along x is delta x the slope's cosine from it: the rim
    # points of a curved face are tested by being inside at all.
    d = union_sdf(body, rim)
    if np.any(d > (0.0 if curved else -delta + 1e-7)) or sag > inlet.socket_depth_mm / 2.0:
        # When the socket follows the first void, point at the line the user wrote.
        given = f"{path}.center_mm" in lines
        follows = "" if given else " (derived from voids[0].center_mm)"
        where = line(f"{path}.center_mm") if given else (
            lines.get("voids[0].center_mm") or line(path) or line("voids[0]"))
        face = (f"the flat end face (x = {face_x:g})" if inlet.at_end
                else "the curved outer face touching x = 0 (within half the socket depth)"
                if curved else "the flat inlet face (x = 0)")
        out.append(Problem(f"{path}.center_mm", f"puts the socket off {face} "
                           f"or closer than checks.min_wall_mm = {min_wall:g} mm to its edge"
                           + follows, where,
                           [cy, cz],
                           f"a point of the x = {face_x:g} face at least socket radius + min "
                           "wall from its rim"))

    socket = r.sockets()[j]
    sock_samples = socket.surface_samples(_spacing((socket,)))
    # The mouth is meant to be open: within min_wall of the face the face itself is
    # nearer than min_wall, and the rim check above bounds the wall there. Beyond it the
    # socket's side is checked as well as its floor, since a body may narrow away from
    # the face (a tapered section).
    depth_in = inward * (sock_samples[:, 0] - face_x)
    sock_samples = sock_samples[depth_in >= sag + min(min_wall, inlet.socket_depth_mm) - EPS]
    _wall_problems(out, path, line(path) or line(""), body, sock_samples, min_wall)


def mouth_depth_mm(r: Recipe, j: int) -> float:
    """How deep (mm, from its face's plane) the mouth of socket ``j`` reaches on a curved
    inlet face (the body kind's ``CURVED_INLET_FACE``): the face's greatest standback at
    the rim of socket radius + least wall, plus the least wall (or the socket's depth, if
    less). Within it the socket's side meets the face at a feather edge that no wall
    check can hold to the least wall; the checks leave it out, as on a flat face they
    leave out the face itself. 0 for a flat face."""
    if not getattr(type(r.body), "CURVED_INLET_FACE", False):
        return 0.0
    inlet = r.inlets[j]
    cy, cz = inlet.center_mm
    reach = inlet.socket_diameter_mm / 2.0 + r.checks.min_wall_mm
    ring = np.linspace(0.0, 2 * np.pi, 73)[:-1]
    rim = np.stack([np.full_like(ring, inlet.face_x_mm(r.body_length_mm)),
                    cy + reach * np.cos(ring), cz + reach * np.sin(ring)], axis=1)
    inward = -1.0 if inlet.at_end else 1.0
    sag = float(_face_sag_mm(r.body_primitives(), rim, inward,
                             inlet.socket_depth_mm / 2.0).max())
    return sag + min(r.checks.min_wall_mm, inlet.socket_depth_mm)


def _face_sag_mm(body: tuple[Primitive, ...], rim: np.ndarray, inward: float,
                 limit_mm: float) -> np.ndarray:
    """How far (mm, along ``inward`` x) the body's surface stands back from each of the
    rim points' plane: each point marched along x by its distance to the body (sphere
    tracing; the distance is exact outside a union); beyond ``limit_mm`` where a point
    does not meet the body within it."""
    p = rim.copy()
    t = np.zeros(len(p))
    for _ in range(200):
        d = union_sdf(body, p)
        step = np.maximum(d, 0.0)
        if float(step.max()) < 1e-9 or float(t.max()) > limit_mm:
            break
        t += step
        p[:, 0] += inward * step
    return np.where(t <= limit_mm, t, limit_mm + 1e-3)


def _socket_pair_problems(out: list[Problem], r: Recipe,
                          line: Callable[[str], int | None]) -> None:
    """Two sockets must keep the least silicone wall between them. Both are cylinders along
    x, so their gap is exact: across, the centres' distance less both radii; along x, the
    body's length less both depths when they enter opposite faces (elementary geometry)."""
    length = r.body_length_mm
    min_wall = r.checks.min_wall_mm
    for j, b in enumerate(r.inlets):
        for i, a in enumerate(r.inlets[:j]):
            across = math.dist(a.center_mm, b.center_mm) - (a.socket_diameter_mm
                                                            + b.socket_diameter_mm) / 2.0
            along = (length - a.socket_depth_mm - b.socket_depth_mm if a.face != b.face
                     else -math.inf)
            gap = (math.hypot(max(across, 0.0), max(along, 0.0)) if max(across, along) > 0
                   else max(across, along))
            if gap >= min_wall - 1e-9:
                continue
            at = f"{r.inlet_path(j)}.center_mm"
            what = (f"overlaps the socket of {r.inlet_path(i)}" if gap <= 0.0 else
                    f"leaves {gap:.2f} mm of silicone to the socket of {r.inlet_path(i)}")
            out.append(Problem(at, what, line(at), list(b.center_mm),
                               f"sockets at least checks.min_wall_mm = {min_wall:g} mm apart "
                               "(move a socket or make them narrower)"))


def _group_wall_problems(r: Recipe, groups: list[tuple[int, ...]],
                         line: Callable[[str], int | None]) -> list[Problem]:
    """Two groups of voids (two cores) must keep the least silicone wall between them: the
    wall they do not share is sampled on the later group's surface."""
    out: list[Problem] = []
    prims = r.void_primitives()
    min_wall = r.checks.min_wall_mm
    for b, gb in enumerate(groups):
        for ga in groups[:b]:
            other = tuple(p for i in ga for p in prims[i])
            own = tuple(p for i in gb for p in prims[i])
            samples = np.concatenate([p.surface_samples(_spacing(own)) for p in own])
            d = union_sdf(other, samples)
            k = int(np.argmin(d))
            if d[k] >= min_wall - 1e-6:
                continue
            at = f"voids[{gb[0]}]"
            out.append(Problem(at, f"leaves a silicone wall of {max(d[k], 0.0):.2f} mm to "
                               f"voids[{ga[0]}] (another core) at {_fmt_point(samples[k])}",
                               line(at), None, f"at least checks.min_wall_mm = {min_wall:g} "
                               "mm between voids fed from different inlets"))
    return out


def _unreached(r: Recipe, group: tuple[int, ...], at: int | None) -> Problem:
    """The finding for a group of joined voids none of which opens into a socket."""
    (ey, ez), er, ex = r.voids[group[0]].entry()
    rest = ", ".join(f"voids[{i}]" for i in group[1:])
    also = f" (nor is {rest}, joined to it)" if rest else ""
    socks = "; ".join(f"centre ({i.center_mm[0]:g}, {i.center_mm[1]:g}), radius "
                      f"{i.socket_diameter_mm / 2.0:g} mm, depth {i.socket_depth_mm:g} mm"
                      + (" on the end face" if i.at_end else "") for i in r.inlets)
    which, inside = (("the inlet socket", "the socket") if len(r.inlets) == 1
                     else ("any inlet socket", "a socket"))
    return Problem(f"voids[{group[0]}]", f"is not reached from {which}" + also, at,
                   None, f"its entry (y, z) = ({ey:g}, {ez:g}) mm, radius {er:g} mm and "
                   f"start x = {ex:g} mm must lie inside {inside} ({socks}), or hold its "
                   "whole section; or the void must overlap a void that is reached")


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


def _socket_wall_problems(out: list[Problem], r: Recipe, j: int, void: object, path: str,
                          line: Callable[[str], int | None], per_prim: list[np.ndarray]
                          ) -> None:
    """The silicone between socket ``j`` and a part of the void that does not open into it
    (a chamber beyond the feed channel, or a void fed from another socket): at least the
    least wall, or the tube pressed into the socket tears through it."""
    socket = r.sockets()[j]
    ipath = r.inlet_path(j)
    inlet = r.inlets[j]
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
    # A void that does not open into the only socket is refused as not reached instead;
    # with several sockets, a void of another socket's group keeps its wall to this one.
    if (not opens and len(r.inlets) == 1) or where is None or worst >= min_wall - 1e-6:
        return
    fields = {f.name for f in getattr(void, "FIELDS", ())}
    own = f"{path}.start_mm, " if "start_mm" in fields else ""
    # Blame the start the recipe wrote, else the void entry (its default placement).
    at = f"{path}.start_mm" if f"{path}.start_mm" in r.lines else path
    which = "the inlet socket's" if len(r.inlets) == 1 else f"the socket of {ipath}:"
    floor = "floor " if opens else ""
    out.append(Problem(at, f"leaves a silicone wall of {worst:.2f} mm to {which} "
                       f"{floor}at {_fmt_point(where)}", line(at), None,
                       f"at least checks.min_wall_mm = {min_wall:g} mm (this wall is set by "
                       f"{own}{ipath}.socket_depth_mm ({inlet.socket_depth_mm:g} mm) and "
                       "checks.min_wall_mm)"))


def wall_keys_at(r: Recipe, point: tuple[float, float, float], between: bool) -> str:
    """The recipe keys that set the silicone wall whose middle is ``point`` (mm, world):
    for a wall between voids, the nearest two of the socket and the voids' parts (each
    chamber on its own; a feed channel, which joins them, is no side of such a wall);
    for an outer wall, the nearest void's keys across the wall's direction."""
    p = np.asarray([point], dtype=float)
    length = r.body_length_mm
    sides: list[tuple[float, str, int, object]] = [
        (float(sock.sdf(p)[0]), "socket", j, None) for j, sock in enumerate(r.sockets())]
    for i, v in enumerate(r.voids):
        boxes = getattr(v, "chamber_boxes", None)
        parts = boxes(length) if boxes is not None else v.primitives(length)
        sides += [(float(q.sdf(p)[0]), "void", i, v) for q in parts]
    sides.sort(key=lambda s: s[0])
    (_, what_a, a, va), (_, what_b, b, vb) = sides[0], sides[1]
    if not between:
        return _wall_keys(va, f"voids[{a}]", _outward(r.body_primitives(), p[0])) \
            if what_a == "void" else f"{r.inlet_path(a)}.socket_depth_mm, checks.min_wall_mm"
    keys: list[str] = []
    if what_a == what_b == "socket":
        keys = [f"{r.inlet_path(a)}.center_mm", f"{r.inlet_path(b)}.center_mm"]
    elif "socket" in (what_a, what_b):
        i, near = (b, vb) if what_a == "socket" else (a, va)
        j = a if what_a == "socket" else b
        keys = [f"voids[{i}].start_mm"] if _has(near, "start_mm") else []
        keys.append(f"{r.inlet_path(j)}.socket_depth_mm")
    elif a == b:
        keys = [f"voids[{a}].{k}" for k in ("pitch_mm", "depth_mm") if _has(va, k)]
    else:
        for i, side in ((a, va), (b, vb)):
            keys += [f"voids[{i}].{k}" for k in ("center_mm", "width_mm", "diameter_mm")
                     if _has(side, k)]
    return ", ".join([*keys, "checks.min_wall_mm"])


def _has(void: object, name: str) -> bool:
    return any(f.name == name for f in getattr(void, "FIELDS", ()))
