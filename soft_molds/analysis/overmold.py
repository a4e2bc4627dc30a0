"""What the analysis stage measures on an overmold build (see
:mod:`soft_molds.plan.processes.overmold`): each step's parts, the silicone of each pour,
the thread to cut for the guides, and how each shell half clears the cast when pulled.

Frame: the actuator frame (mm; x along the rod from the inlet face, parting plane z = 0,
z up in pour orientation).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import manifold3d
import numpy as np

from ..meshdata import TriMesh
from ..plan.model import Bladder, MoldPlan, Opening, Overmold
from ..recipe.model import Recipe
from .casting import Quantities, silicone_quantities
from .findings import Finding
from .motion import MotionCurve
from .printability import PrintPlan
from .result import Part

#: Full circumferential wraps of thread at each end of a helix to anchor it before the
#: skin is poured (common practice: a few tight wraps, tied off).
WRAP_TURNS_PER_END = 2
#: Thread added to each helix for tying off its two ends (mm; from memory: about 20 mm a
#: knot is easy to tie by hand).
KNOT_ALLOWANCE_MM = 40.0
#: How far each shell half is moved along its pull when its release is checked (mm): a
#: touch, fractions of a ridge, a ridge height and well clear of the cast.
RELEASE_STEPS_MM = (0.05, 0.2, 0.5, 1.0, 2.0, 5.0, 20.0)
#: Intersection volume below which two meshes count as only touching (mm3): float32
#: vertices of the mesh library and coincident faces leave slivers far below this.
TOUCH_MM3 = 1e-2


@dataclass(frozen=True)
class ThreadPlan:
    """The thread for the guides: ``helices`` of ``turns`` each at ``diameter_mm`` (the
    thread's centre line: lying on the bladder's surface beside the ridges, so the tube's
    outer diameter plus one thread diameter) and ``pitch_mm``; each helix is
    turns x sqrt((pi d)^2 + pitch^2) long plus its end wraps and knots."""

    helices: int
    turns: float
    diameter_mm: float
    pitch_mm: float
    helix_mm: float
    ends_mm: float

    @property
    def per_helix_mm(self) -> float:
        return self.helix_mm + self.ends_mm

    @property
    def total_mm(self) -> float:
        return self.helices * self.per_helix_mm


def thread_plan(r: Recipe, bl: Bladder) -> ThreadPlan | None:
    """The thread to cut (None: no guides). Closed form of a helix's length: one turn is
    the hypotenuse of the unrolled cylinder, sqrt((pi d)^2 + pitch^2)."""
    p = r.process
    if p.guides == "none" or not bl.pieces:
        return None
    d = 2.0 * bl.outer_radius_mm + p.thread_diameter_mm
    turns = (bl.length_mm - 2.0 * bl.guide_start_x_mm) / bl.guide_pitch_mm
    helix = turns * math.hypot(math.pi * d, bl.guide_pitch_mm)
    ends = 2 * WRAP_TURNS_PER_END * math.pi * d + KNOT_ALLOWANCE_MM
    return ThreadPlan(2 if p.guides == "double" else 1, turns, d, bl.guide_pitch_mm, helix,
                      ends)


@dataclass(frozen=True)
class Release:
    """One part pulled along ``pull_dir``: the largest volume (mm3) it shares with the cast
    at any of RELEASE_STEPS_MM, and the move (mm) where that was measured."""

    part: str
    pull_dir: tuple[float, float, float]
    locked_mm3: float
    at_mm: float


@dataclass(frozen=True, eq=False)
class OvermoldStep:
    """One pour of an overmold build: its 1-based ``index``, ``name`` (the plan step's),
    parts (actuator frame), the silicone to mix, the openings cut into its upper shell and
    how each printed part releases."""

    index: int
    name: str
    overmold: Overmold
    parts: tuple[Part, ...]
    pour: Quantities
    openings: tuple[Opening, ...]
    releases: tuple[Release, ...]

    @property
    def folder(self) -> str:
        return f"step-{self.index}-{self.name}"

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)


@dataclass(frozen=True, eq=False)
class OvermoldMoldSet:
    """Everything built for an overmold recipe, steps in pour order, the thread to cut,
    the measured figures (``skin_over_guides_mm``, ``axis_offset_mm``) and the findings of
    its checks (:mod:`soft_molds.analysis.overmold_checks`)."""

    plan: MoldPlan
    steps: tuple[OvermoldStep, ...]
    thread: ThreadPlan | None
    skin_over_guides_mm: float
    axis_offset_mm: float
    timings_s: Mapping[str, float] = field(default_factory=dict)
    findings: tuple[Finding, ...] = ()
    #: Per step (pour order), how each printed part lies on the bed, by part name.
    print_plans: tuple[Mapping[str, PrintPlan], ...] = ()

    @property
    def recipe(self) -> Recipe:
        return self.plan.recipe

    @property
    def silicone_volume_mm3(self) -> float:
        """The finished actuator: the bladder and the skin."""
        return sum(s.part("cast").brep_volume_mm3 for s in self.steps)

    @property
    def motion(self) -> MotionCurve | None:
        """Not predicted: how the wound thread holds the bladder's radial growth is outside
        every registered motion model (:mod:`soft_molds.analysis.motion`)."""
        return None


def pour_quantities(r: Recipe, cast_mm3: float, fill_mm3: float) -> Quantities:
    """The silicone of one pour: the cast and what stands in the sprue and vents, plus the
    recipe's waste."""
    m = r.material
    return silicone_quantities(cast_mm3, fill_mm3, m.silicone, r.casting.waste_pct,
                               r.casting.scale_resolution_g, m.blend)


def to_manifold(mesh: TriMesh) -> manifold3d.Manifold:
    """``mesh`` as an independent mesh library's solid (float32 vertices)."""
    m = manifold3d.Mesh(vert_properties=np.asarray(mesh.vertices, dtype=np.float32),
                        tri_verts=np.asarray(mesh.faces, dtype=np.uint32))
    return manifold3d.Manifold(m)


def shared_mm3(a: manifold3d.Manifold, b: manifold3d.Manifold) -> float:
    """Volume two solids share (mm3)."""
    return float((a ^ b).volume())


def release(part: str, mesh: TriMesh, pull: tuple[float, float, float],
            cast: manifold3d.Manifold) -> Release:
    """Move ``mesh`` along ``pull`` by each of RELEASE_STEPS_MM and measure what it cuts
    out of the cast; the largest cut is the silicone the part locks (0 when it lifts
    clear)."""
    moving = to_manifold(mesh)
    worst, at = 0.0, 0.0
    for d in RELEASE_STEPS_MM:
        moved = moving.translate(tuple(float(c) * d for c in pull))
        v = shared_mm3(moved, cast)
        if v > worst:
            worst, at = v, d
    return Release(part, pull, worst, at)


def releases(parts: Sequence[Part], cast: TriMesh) -> tuple[Release, ...]:
    """Every printed part of a step pulled along its pull against the step's cast."""
    c = to_manifold(cast)
    return tuple(release(p.name, p.mesh, p.pull_dir, c) for p in parts
                 if p.pull_dir is not None)


def radial_extent_mm(mesh: TriMesh) -> float:
    """The largest distance of a vertex from the x axis (mm)."""
    v = mesh.vertices
    return float(np.sqrt(v[:, 1] ** 2 + v[:, 2] ** 2).max())


def axis_yz_mm(mesh: TriMesh, rho_lo_mm: float, rho_hi_mm: float) -> tuple[float, float]:
    """The (y, z) of the axis of a round surface of ``mesh``: the centre, across x, of the
    bounding box of its vertices between the radii ``rho_lo_mm`` and ``rho_hi_mm`` from the
    x axis (the vertices of one cylinder, a full turn of it, so the box is symmetric about
    its axis to the chord error)."""
    v = mesh.vertices
    rho = np.sqrt(v[:, 1] ** 2 + v[:, 2] ** 2)
    on = v[(rho >= rho_lo_mm) & (rho <= rho_hi_mm)]
    if len(on) == 0:
        raise ValueError(f"no vertex between radii {rho_lo_mm:g} and {rho_hi_mm:g} mm")
    lo, hi = on.min(axis=0), on.max(axis=0)
    return (float(lo[1] + hi[1]) / 2.0, float(lo[2] + hi[2]) / 2.0)
