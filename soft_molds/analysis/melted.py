"""What the analysis stage measures on a melted-core build (see
:mod:`soft_molds.plan.processes.melted_core`): the core mold's parts, the wax (or alloy)
to melt for the core, how each shell half clears the core when pulled, and the silicone
step, which is the one-shot mold set around that core with its own review.

Frame: world (mm), the parting axis up in pour orientation for both steps.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from ..constants import CORE_DENSITY_G_CM3
from ..plan.model import CoreMold, MoldPlan, Opening
from ..recipe.model import Recipe
from ..units import mm3_to_cm3
from .casting import Portion, Quantities, round_up
from .findings import Finding, Severity, finding
from .motion import MotionCurve
from .overmold import Release
from .printability import PrintPlan
from .result import BuiltMoldSet, Part, PartsOfAStep
from .support import CoreSupportFigures, CoreSupports

#: Core volume a shell half may share with the core when pulled, as a fraction of the
#: core's volume: the slivers two meshes of one surface share (chord-sized facets of the
#: cavity wall and of the core, float32 vertices in the mesh library) stay far below it; a
#: real undercut of the core mold (a hook of wax) is far above it.
LOCK_FRACTION = 1e-3


@dataclass(frozen=True, eq=False)
class CoreMoldStep(PartsOfAStep):
    """The first step: the core mold's parts (shells and the core as its cast), what to
    melt for the core (``pour``, one portion: the core material), the sprue and vents
    located on the core and how each shell half releases it."""

    index: int
    name: str
    core_mold: CoreMold
    parts: tuple[Part, ...]
    pour: Quantities
    openings: tuple[Opening, ...]
    releases: tuple[Release, ...]
    fill_mm3: float


@dataclass(frozen=True, eq=False)
class SiliconeStep:
    """The second step: the one-shot mold set around the cast core (``molds``)."""

    index: int
    name: str
    molds: BuiltMoldSet

    @property
    def folder(self) -> str:
        return f"step-{self.index}-{self.name}"

    @property
    def parts(self) -> tuple[Part, ...]:
        return self.molds.parts

    @property
    def pour(self) -> Quantities:
        assert self.molds.casting is not None
        return self.molds.casting.quantities

    @property
    def openings(self) -> tuple[Opening, ...]:
        return self.molds.openings

    def part(self, name: str) -> Part:
        return self.molds.part(name)


@dataclass(frozen=True, eq=False)
class MeltedMoldSet:
    """Everything built for a melted-core recipe: the core mold, then the silicone mold,
    the findings of both (the core mold's printing and release, then the one-shot review
    of the silicone step) and how each printed core-mold part lies on the bed."""

    plan: MoldPlan
    steps: tuple[CoreMoldStep, SiliconeStep]
    timings_s: Mapping[str, float] = field(default_factory=dict)
    findings: tuple[Finding, ...] = ()
    print_plans: tuple[Mapping[str, PrintPlan], ...] = ()

    @property
    def recipe(self) -> Recipe:
        return self.plan.recipe

    @property
    def core_mold(self) -> CoreMoldStep:
        return self.steps[0]

    @property
    def silicone(self) -> BuiltMoldSet:
        return self.steps[1].molds

    @property
    def motion(self) -> MotionCurve | None:
        return self.silicone.motion

    @property
    def silicone_volume_mm3(self) -> float:
        return self.silicone.silicone_volume_mm3

    @property
    def core_volume_mm3(self) -> float:
        """The core as cast: the core mold's cavity (mm3)."""
        return self.core_mold.part("cast").brep_volume_mm3

    @property
    def core_mass_g(self) -> float:
        """The core's mass: volume x the stated density of its material (g)."""
        return mm3_to_cm3(self.core_volume_mm3) * self.core_mold.pour.density_g_cm3

    @property
    def support(self) -> tuple[CoreSupportFigures, ...]:
        """The support check's figures (see :mod:`soft_molds.analysis.support`)."""
        rev = self.silicone.review
        got = None if rev is None else rev.result(CoreSupports)
        return () if got is None else got.cores


def core_quantities(r: Recipe, core_mm3: float, fill_mm3: float) -> Quantities:
    """What to melt for one core: the core and what stands in the sprue and vents, plus
    the recipe's waste, at the core material's stated density; one portion, rounded up to
    the scale's resolution."""
    rho = CORE_DENSITY_G_CM3[r.core.material]
    c = r.casting
    mixed = (core_mm3 + fill_mm3) * (1.0 + c.waste_pct / 100.0)
    mass = mm3_to_cm3(mixed) * rho
    portion = Portion(r.core.material, round_up(mass, c.scale_resolution_g),
                      round(mm3_to_cm3(mixed), 3), "weight")
    return Quantities(core_mm3, fill_mm3, c.waste_pct, mixed, rho, mass, (portion,))


def release_finding(rel: Release, step: str, core_mm3: float) -> Finding:
    """A core-mold shell half pulled off the core: an error when it drags more than
    LOCK_FRACTION of the core (an undercut of the core mold: the core breaks or the shell
    will not come off)."""
    part = f"{step} {rel.part}"
    pull = "(" + ", ".join(f"{c:g}" for c in rel.pull_dir) + ")"
    limit = LOCK_FRACTION * core_mm3
    if rel.locked_mm3 > limit:
        return finding("release", Severity.ERROR, part,
                       f"pulled along {pull} it drags {rel.locked_mm3:.2f} mm3 of the core "
                       f"(most at {rel.at_mm:g} mm of travel): the core is locked in this "
                       "half; choose another parting plane", value=rel.locked_mm3,
                       limit=limit)
    return finding("release", Severity.INFO, part,
                   f"pulled along {pull} it clears the core (at most {rel.locked_mm3:.3f} "
                   "mm3 shared)", value=rel.locked_mm3, limit=limit)


def core_mold_findings(s: CoreMoldStep) -> list[Finding]:
    return [release_finding(rel, s.name, s.part("cast").brep_volume_mm3)
            for rel in s.releases]
