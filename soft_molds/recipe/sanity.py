"""Geometric sanity of a validated recipe, checked with exact distance functions before
any kernel call: voids inside the body with the minimum silicone wall, every void
reached from the inlet socket and the socket on the flat inlet face. The rules of the mold
(parting plane, block features, printer) are the plan stage's (:mod:`soft_molds.plan.rules`)."""

from __future__ import annotations

import numpy as np

from ..errors import Problem
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

    for i, (void, prims) in enumerate(zip(r.voids, r.void_primitives())):
        path = f"voids[{i}]"
        spacing = _spacing(prims)
        samples = np.concatenate([p.surface_samples(spacing) for p in prims])
        # Surface inside another primitive of the same void, or inside the socket, is not
        # a cast surface; keep only points on the void set's own boundary.
        inside_self = union_sdf(prims, samples) < -EPS
        inside_socket = socket.sdf(samples) < EPS
        samples = samples[~inside_self & ~inside_socket]
        _wall_problems(out, path, line(path), body, samples, min_wall)

        (ey, ez), er, ex = void.entry()
        if np.hypot(ey - cy, ez - cz) + er > sock_r + EPS or ex > r.inlet.socket_depth_mm:
            out.append(Problem(path, "is not reached from the inlet socket",
                               line(path), None,
                               f"its entry (y, z) = ({ey:g}, {ez:g}) mm, radius {er:g} mm and "
                               f"start x = {ex:g} mm must lie inside the socket "
                               f"(centre ({cy:g}, {cz:g}), radius {sock_r:g} mm, depth "
                               f"{r.inlet.socket_depth_mm:g} mm)"))

    return out


def _wall_problems(out: list[Problem], path: str, line: int | None, body, samples: np.ndarray,
                   min_wall: float) -> None:
    if len(samples) == 0:
        return
    d = union_sdf(body, samples)
    worst = int(np.argmax(d))
    if d[worst] > -EPS:
        out.append(Problem(path, f"breaks through the body surface at {_fmt_point(samples[worst])}",
                           line, None, "voids entirely inside the body"))
    elif -d[worst] < min_wall - 1e-6:
        out.append(Problem(path, f"leaves a silicone wall of {-d[worst]:.2f} mm at "
                           f"{_fmt_point(samples[worst])}", line, None,
                           f"at least checks.min_wall_mm = {min_wall:g} mm"))
