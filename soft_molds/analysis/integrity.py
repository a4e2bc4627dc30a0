"""Closure and volume checks for a tessellated part (no CAD kernel needed).

A mold part is only printable, and its cavity volume only meaningful, when its triangle mesh
is a closed, consistently wound, outward-facing surface. The checks here run trimesh on the
arrays exactly as given (``process=False``, nothing merged or repaired), so a defect in the
tessellation is reported rather than hidden. Counts of open, non-manifold and mis-wound edges
are computed here from the face list so that failure messages can say how bad things are.

Units: millimetres and cubic millimetres.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import trimesh

from soft_molds.errors import MeshIntegrityError
from soft_molds.meshdata import TriMesh


@dataclass(frozen=True)
class MeshReport:
    """Result of :func:`check_mesh` for one part; ``failures`` are plain-language sentences."""

    part: str
    triangles: int
    watertight: bool
    winding_consistent: bool
    is_volume: bool
    volume_mm3: float
    brep_volume_mm3: float | None
    volume_rel_error: float | None
    bodies: int
    failures: tuple[str, ...]

    @property
    def ok(self) -> bool:
        return not self.failures


@dataclass(frozen=True)
class _EdgeCounts:
    open: int  # used by one face
    non_manifold: int  # used by three or more faces
    same_direction: int  # used twice in the same direction (a face flipped against its neighbour)


def _edge_counts(faces: np.ndarray, n_vertices: int) -> _EdgeCounts:
    if len(faces) == 0:
        return _EdgeCounts(0, 0, 0)
    directed = faces[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2)
    n = np.int64(max(n_vertices, 1))
    # Integer keys: much faster than np.unique(axis=0) on row pairs.
    _, counts = np.unique(directed.min(axis=1) * n + directed.max(axis=1), return_counts=True)
    _, dcounts = np.unique(directed[:, 0] * n + directed[:, 1], return_counts=True)
    return _EdgeCounts(
        open=int((counts == 1).sum()),
        non_manifold=int((counts > 2).sum()),
        same_direction=int((dcounts > 1).sum()),
    )


def _body_count(tm: trimesh.Trimesh) -> int:
    # Faces joined through shared edges; trimesh's own body_count walks vertices and would
    # count every unreferenced vertex as a body.
    if len(tm.faces) == 0:
        return 0
    groups = trimesh.graph.connected_components(
        tm.face_adjacency, min_len=1, nodes=np.arange(len(tm.faces))
    )
    return len(groups)


def _plural(n: int, word: str, plural: str = "") -> str:
    return f"{n} {word}" if n == 1 else f"{n} {plural or word + 's'}"


#: Least relative slack between a mesh's volume and its solid's (0.5 %).
VOLUME_REL_TOL = 0.005


def volume_rel_tol(angle_deg: float) -> float:
    """Relative slack (fraction) between the volume of a mesh made with facets at most
    ``angle_deg`` apart on a curve and its solid's volume. The vertices lie on the surface,
    so the mesh is inscribed: a round section meshed in steps of angle t keeps
    sin(t) / t of its area (regular polygon in a circle, elementary geometry), and a round
    section is the worst case (a sphere or torus loses less, flat faces nothing; a
    chord limit only shortens the steps). That loss plus 0.1 % for the volume
    integrations, never less than ``VOLUME_REL_TOL``: 0.83 % at 12 deg, 4.6 % at 30 deg."""
    t = float(np.radians(angle_deg))
    return max(VOLUME_REL_TOL, 1.0 - float(np.sin(t)) / t + 0.001)


def check_mesh(
    mesh: TriMesh,
    part: str,
    brep_volume_mm3: float | None = None,
    rel_tol: float = VOLUME_REL_TOL,
    expected_bodies: int | None = 1,
) -> MeshReport:
    """Check closure, winding, sign of volume and body count of ``mesh`` (mm).

    ``brep_volume_mm3`` is the exact solid's volume from the CAD kernel; when given, the mesh
    volume must agree within ``rel_tol`` (relative, 0.005 = 0.5 %). An inscribed tessellation
    always loses a little volume, so ``rel_tol`` must exceed the chord error's effect.
    ``expected_bodies=None`` skips the body-count check.
    """
    failures: list[str] = []
    v = mesh.vertices
    f = mesh.faces
    m = int(f.shape[0])

    if m == 0:
        return MeshReport(part, 0, False, False, False, 0.0, brep_volume_mm3, None, 0,
                          ("mesh has no triangles",))
    if f.min() < 0 or f.max() >= len(v):
        bad = int(((f < 0) | (f >= len(v))).any(axis=1).sum())
        return MeshReport(part, m, False, False, False, 0.0, brep_volume_mm3, None, 0,
                          (f"{_plural(bad, 'triangle')} refer to vertices that do not exist "
                           f"(mesh has {len(v)} vertices)",))
    used = np.unique(f)
    nonfinite = int((~np.isfinite(v[used])).any(axis=1).sum())
    if nonfinite:
        failures.append(f"{_plural(nonfinite, 'vertex', 'vertices')} with non-finite coordinates")

    tm = trimesh.Trimesh(vertices=v.copy(), faces=f.copy(), process=False, validate=False)
    watertight = bool(tm.is_watertight)
    winding = bool(tm.is_winding_consistent)
    volume = float(tm.volume) if not nonfinite else float("nan")
    is_volume = bool(tm.is_volume) if not nonfinite else False
    bodies = _body_count(tm)
    edges = _edge_counts(f, len(v))

    if not watertight:
        parts = []
        if edges.open:
            parts.append(_plural(edges.open, "open edge"))
        if edges.non_manifold:
            parts.append(_plural(edges.non_manifold, "non-manifold edge") + " (3+ faces)")
        failures.append("not watertight: " + (", ".join(parts) or "edges not paired"))
    if not winding:
        detail = (f"{_plural(edges.same_direction, 'edge')} traversed the same way by both "
                  "of its faces" if edges.same_direction else "faces disagree on orientation")
        failures.append(f"winding inconsistent: {detail}")
    if watertight and winding and np.isfinite(volume) and volume < 0.0:
        failures.append(f"volume {volume:.6g} mm3 is negative: faces are wound inward "
                        "(inverted winding)")
    elif not is_volume and not failures:
        failures.append(f"not a valid volume (volume {volume:.6g} mm3)")

    rel_error: float | None = None
    if brep_volume_mm3 is not None:
        ref = float(brep_volume_mm3)
        if not np.isfinite(ref) or ref <= 0.0:
            failures.append(f"BRep volume {ref:.6g} mm3 is not a positive number; "
                            "cannot compare the mesh volume")
        elif np.isfinite(volume):
            rel_error = abs(volume - ref) / ref
            if rel_error > rel_tol:
                failures.append(
                    f"mesh volume {volume:.1f} mm3 differs from BRep volume {ref:.1f} mm3 "
                    f"by {100.0 * rel_error:.2f} % (allowed {100.0 * rel_tol:.2g} %)"
                )

    if expected_bodies is not None and bodies != expected_bodies:
        failures.append(f"{_plural(bodies, 'separate body', 'separate bodies')} "
                        f"(expected {expected_bodies})")

    return MeshReport(
        part=part,
        triangles=m,
        watertight=watertight,
        winding_consistent=winding,
        is_volume=is_volume,
        volume_mm3=volume,
        brep_volume_mm3=None if brep_volume_mm3 is None else float(brep_volume_mm3),
        volume_rel_error=rel_error,
        bodies=bodies,
        failures=tuple(failures),
    )


def require_ok(report: MeshReport, variant: str = "") -> None:
    """Raise :class:`~soft_molds.errors.MeshIntegrityError` unless ``report.ok``."""
    if not report.ok:
        raise MeshIntegrityError(report.part, list(report.failures), variant=variant)
