"""What the analysis stage measures on a layered build (see
:mod:`soft_molds.plan.processes.layered`): each step's parts checked as closed volumes,
the silicone of each pour, and the least draft of the post bridge's posts against its pull.

Frame: pour orientation per step (the chambered step turned over, its posts pulling along
+z); mm, degrees.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ..meshdata import TriMesh
from ..plan.model import Layer, LayerKind, MoldPlan
from ..recipe.model import Recipe
from .casting import Quantities, silicone_quantities
from .findings import Finding
from .motion import MotionCurve
from .printability import PrintPlan
from .result import Part, PartsOfAStep


@dataclass(frozen=True, eq=False)
class LayerStep(PartsOfAStep):
    """One pour of a layered build: its 1-based ``index``, ``name`` (the plan step's),
    parts (pour orientation), the silicone to mix (``pour``) and, for the chambered step,
    the least draft (deg) of any post facet against the bridge's pull."""

    index: int
    name: str
    layer: Layer
    parts: tuple[Part, ...]
    pour: Quantities
    least_post_draft_deg: float | None
    #: World box (lo, hi), mm, of the label cut into each labelled part: its strokes leave
    #: thin ribs the print-wall check skips.
    label_boxes: Mapping[str, tuple[tuple[float, float, float],
                                    tuple[float, float, float]]] = field(default_factory=dict)


@dataclass(frozen=True, eq=False)
class LayeredMoldSet:
    """Everything built for a layered recipe, steps in pour order, and the findings of its
    manufacturability checks (:mod:`soft_molds.analysis.layered_checks`)."""

    plan: MoldPlan
    steps: tuple[LayerStep, ...]
    timings_s: Mapping[str, float] = field(default_factory=dict)
    findings: tuple[Finding, ...] = ()
    #: Per step (pour order), how each printed part lies on the bed, by part name.
    print_plans: tuple[Mapping[str, PrintPlan], ...] = ()
    #: The finished actuator's predicted motion (None: no modulus, or no model applies).
    motion: MotionCurve | None = None

    @property
    def recipe(self) -> Recipe:
        return self.plan.recipe

    @property
    def silicone_volume_mm3(self) -> float:
        """The finished actuator: every layer's cast."""
        return sum(s.part("cast").brep_volume_mm3 for s in self.steps)


def pour_quantities(r: Recipe, cast_mm3: float) -> Quantities:
    """The silicone of one pour: the layer's volume plus the recipe's waste."""
    m = r.material
    return silicone_quantities(cast_mm3, 0.0, m.silicone, r.casting.waste_pct,
                               r.casting.scale_resolution_g, m.blend)


def post_facets(bridge: TriMesh, layer: Layer) -> np.ndarray:
    """Facets of the turned-over post bridge that form voids: below the plate's underside
    (z < -bond face) and over the footprint (the skirt lies outside it)."""
    tri = bridge.vertices[bridge.faces]
    c = tri.mean(axis=1)
    (cx, cy), (lx, ly) = layer.footprint.center_mm, layer.footprint.size_mm
    # Turned over: (x, y, z) -> (x, -y, -z).
    inside = (np.abs(c[:, 0] - cx) < lx / 2.0) & (np.abs(-c[:, 1] - cy) < ly / 2.0)
    return np.flatnonzero(inside & (c[:, 2] < -layer.bond_z_mm - 1e-6))


def facet_drafts_deg(mesh: TriMesh, pull: tuple[float, float, float],
                     facets: np.ndarray) -> np.ndarray:
    """Draft of each facet against ``pull`` (deg): asin(-n . pull) with n the outward
    unit normal; positive when the facet moves away from the silicone as the part is
    pulled, 90 for a face square to the pull."""
    tri = mesh.vertices[mesh.faces[facets]]
    n = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
    n /= np.linalg.norm(n, axis=1, keepdims=True)
    return np.degrees(np.arcsin(np.clip(-(n @ np.asarray(pull)), -1.0, 1.0)))


def least_post_draft_deg(bridge: Part, layer: Layer) -> float:
    assert bridge.pull_dir is not None
    idx = post_facets(bridge.mesh, layer)
    return float(facet_drafts_deg(bridge.mesh, bridge.pull_dir, idx).min())


def is_chambered(layer: Layer) -> bool:
    return layer.kind is LayerKind.CHAMBERED
