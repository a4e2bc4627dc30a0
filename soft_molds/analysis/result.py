"""The typed result of one build: every part of the mold set with its mesh, the plan it
was built to, and what the analysis measured. The pipeline assembles it after the analysis
stage; the export stage turns it into files (:class:`soft_molds.MoldSet` adds the methods
that call export).

Frame: mm, world (see :mod:`soft_molds.recipe.model`); ``pull_dir`` is the unit vector along
which a part leaves the cast in pour orientation.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from ..meshdata import TriMesh
from ..recipe.model import Recipe
from .findings import Finding
from .integrity import MeshReport

if TYPE_CHECKING:
    from ..geometry.mold import Label
    from ..plan.layout import Layout
    from ..plan.model import MoldPlan, Opening, PlaneScore
    from .casting import CastingPlan
    from .motion import MotionCurve
    from .pressure import WallPressure
    from .review import Review


@dataclass(frozen=True, eq=False)
class Part:
    """One solid of the mold set with its mesh and integrity report.

    ``pull_dir`` is the unit vector (world frame) along which the part leaves the cast,
    ``None`` for the cast itself. ``brep`` is the kernel's solid (opaque outside geometry/).
    """

    name: str
    role: str
    brep: Any
    mesh: TriMesh
    brep_volume_mm3: float
    pull_dir: tuple[float, float, float] | None
    report: MeshReport

    @property
    def stl_name(self) -> str:
        return f"{self.name}.stl"

    @property
    def step_name(self) -> str:
        return f"{self.name}.step"


class PartsOfAStep:
    """What every casting step of a multi-step process offers over its parts: its output
    folder (``step-<index>-<name>``) and a part by name. Mixed into each process's frozen
    step dataclass, which declares the three fields."""

    index: int
    name: str
    parts: tuple[Part, ...]

    @property
    def folder(self) -> str:
        return f"step-{self.index}-{self.name}"

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)


@dataclass(frozen=True, eq=False)
class BuiltMoldSet:
    """Everything built from one recipe. Nothing here changes after the build.

    ``plan``: the completed plan the parts were built to (its recipe carries the chosen
    parting plane). ``volumes_mm3``: exact volumes of body, void_set, core, cast, and fill
    (the sprue, funnel and vents above the cavity). ``timings_s``: seconds per build stage.
    """

    plan: MoldPlan
    parts: tuple[Part, ...]
    volumes_mm3: Mapping[str, float]
    funnel_diameter_mm: float | None
    timings_s: Mapping[str, float] = field(default_factory=dict)
    review: Review | None = None   # every manufacturability finding
    casting: CastingPlan | None = None  # what to weigh and print
    labels: tuple[Label, ...] = ()  # per printed part that carries one
    motion: MotionCurve | None = None  # predicted bend or extension against pressure

    @property
    def recipe(self) -> Recipe:
        """The recipe built, with the chosen parting plane filled in."""
        return self.plan.recipe

    @property
    def layout(self) -> Layout:
        return self.plan.step.settled_layout

    @property
    def openings(self) -> tuple[Opening, ...]:
        """Sprue first, then the vents, as located on the cast and cut."""
        return self.plan.step.openings

    @property
    def parting_candidates(self) -> tuple[PlaneScore, ...]:
        """Every plane tried for ``parting: auto``, best first (empty otherwise)."""
        return self.plan.step.candidates

    @property
    def source_params_sha256(self) -> str:
        """Hash of the recipe as given (before ``parting: auto`` was filled in)."""
        return self.plan.source_params_sha256

    @property
    def pressures(self) -> tuple[WallPressure, ...]:
        return () if self.review is None else self.review.pressures

    @property
    def findings(self) -> tuple[Finding, ...]:
        return () if self.review is None else self.review.findings

    @property
    def errors(self) -> tuple[Finding, ...]:
        return () if self.review is None else self.review.errors

    @property
    def warnings(self) -> tuple[Finding, ...]:
        return () if self.review is None else self.review.warnings

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)

    @property
    def void_volume_mm3(self) -> float:
        """Air inside the cast: voids and tube socket (mm3)."""
        return self.volumes_mm3["void_set"]

    @property
    def silicone_volume_mm3(self) -> float:
        return self.part("cast").brep_volume_mm3

    @property
    def pour_up(self) -> tuple[float, float, float]:
        """Unit vector pointing up in pour orientation (world frame): the parting axis."""
        return self.plan.step.settled_parting.up
