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
from ..plan.model import Bladder, MoldPlan, Opening, Overmold, Sheet
from ..recipe.model import Recipe
from .casting import Quantities, silicone_quantities
from .findings import Finding
from .motion import MotionCurve
from .printability import PrintPlan
from .result import Part, PartsOfAStep

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
    turns x sqrt(perimeter^2 + pitch^2) long plus its end wraps and knots, the perimeter
    pi d round, or (pi / 2 + 1) d round a D (``half_round``: half the circle over the
    curved face, the diameter straight across the flat one)."""

    helices: int
    turns: float
    diameter_mm: float
    pitch_mm: float
    helix_mm: float
    ends_mm: float
    half_round: bool = False

    @property
    def perimeter_mm(self) -> float:
        """Once round the thread's centre line (mm)."""
        d = self.diameter_mm
        return (math.pi / 2.0 + 1.0) * d if self.half_round else math.pi * d

    @property
    def per_helix_mm(self) -> float:
        return self.helix_mm + self.ends_mm

    @property
    def total_mm(self) -> float:
        return self.helices * self.per_helix_mm


def thread_plan(r: Recipe, bl: Bladder) -> ThreadPlan | None:
    """The thread to cut (None: no guides). Closed form of a helix's length: one turn is
    the hypotenuse of the unrolled cylinder, sqrt((pi d)^2 + pitch^2); round a D, of the
    unrolled prism, sqrt(perimeter^2 + pitch^2) (the thread advancing evenly along the
    perimeter: the guides advance it pitch / 2 over each face, which the curved face's
    longer arc makes 4e-4 longer on the demo, well inside the knot allowance)."""
    p = r.process
    if p.guides == "none" or not bl.pieces:
        return None
    d = 2.0 * bl.outer_radius_mm + p.thread_diameter_mm
    turns = (bl.length_mm - 2.0 * bl.guide_start_x_mm) / bl.guide_pitch_mm
    helices = 2 if p.guides == "double" else 1
    if bl.half_round:
        around = (math.pi / 2.0 + 1.0) * d
        ends = 2 * WRAP_TURNS_PER_END * around + KNOT_ALLOWANCE_MM
        return ThreadPlan(helices, turns, d, bl.guide_pitch_mm,
                          turns * math.hypot(around, bl.guide_pitch_mm), ends, True)
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
class OvermoldStep(PartsOfAStep):
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
    #: The least skin beyond the strain-limiting sheet's edges and under it (mm; None:
    #: no sheet).
    sheet_cover_mm: float | None = None

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
        every registered motion model (:mod:`soft_molds.analysis.motion`). A half-round
        bladder's sheet would suit ``sheet-bending`` in kind, but the motion stage finds the
        pressurised faces from the recipe's void primitives (a round bore, not the segment
        the core leaves) and ends each curve at the unwound wall's balloon limit, which the
        thread is there to lift; neither holds here."""
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


def arc_centre_yz(mesh: TriMesh, rho_lo_mm: float, rho_hi_mm: float, z_min_mm: float
                  ) -> tuple[float, float]:
    """The (y, z) of the axis of a round surface of ``mesh`` that is not a full turn (a
    D's curved face): the algebraic least-squares circle (Kasa's fit of y^2 + z^2 + D y +
    E z + F = 0) through its vertices between the radii ``rho_lo_mm`` and ``rho_hi_mm``
    from the x axis and above z = ``z_min_mm``."""
    v = mesh.vertices
    rho = np.sqrt(v[:, 1] ** 2 + v[:, 2] ** 2)
    on = v[(rho >= rho_lo_mm) & (rho <= rho_hi_mm) & (v[:, 2] > z_min_mm)]
    if len(on) < 3:
        raise ValueError(f"too few vertices between radii {rho_lo_mm:g} and {rho_hi_mm:g} mm")
    y, z = on[:, 1], on[:, 2]
    a = np.column_stack([y, z, np.ones_like(y)])
    d, e, _ = np.linalg.lstsq(a, -(y * y + z * z), rcond=None)[0]
    return (float(-d / 2.0), float(-e / 2.0))


def skin_over_half_round_mm(skin: TriMesh, bladder: TriMesh, outer_radius_mm: float,
                            thread_mm: float) -> float:
    """The thinnest skin over a wound half-round bladder (mm): over the curved face, the
    skin's largest distance from the axis above z = 0 less the bladder's (crests) or the
    thread's; under the flat face, the bladder's lowest z less the thread's less the
    skin's lowest."""
    def top(m: TriMesh) -> float:
        v = m.vertices[m.vertices[:, 2] >= 0.0]
        return float(np.sqrt(v[:, 1] ** 2 + v[:, 2] ** 2).max())

    curved = top(skin) - max(top(bladder), outer_radius_mm + thread_mm)
    flat = float(bladder.vertices[:, 2].min()) - thread_mm - float(skin.vertices[:, 2].min())
    return min(curved, flat)


def sheet_cover_mm(sheet: Sheet, skin: TriMesh) -> float:
    """The least skin beyond the sheet (mm): the skin's bounding box against the sheet's
    rectangle, below it and past each of its four edges (the skin is a D over a slab as
    wide as the D, so at the sheet's plane its section is the full box)."""
    lo, hi = skin.bbox_mm()
    return float(min(sheet.z_mm - lo[2], sheet.x0_mm - lo[0], hi[0] - sheet.x1_mm,
                     -sheet.half_width_mm - lo[1], hi[1] - sheet.half_width_mm))
