"""The manufacturability review of a built mold set: every registered check, as findings.

Works on meshes and numbers only. :meth:`CheckContext.create` prepares every mesh once
(facet data, ray index, void and contact facets); :func:`run_checks` runs each check of
:mod:`soft_molds.analysis.registry` in its order and lists the findings errors first
(check order kept within a severity). The checks, one module each under
``soft_molds/analysis/checks/``:

- ``draft`` / ``undercut`` / ``core-lock``: each shell against the cast (a locked undercut
  is a warning with its depth: silicone flexes) and against the core print (rigid against
  rigid: an error);
- ``core-draft``: the void surface along the core's pull;
- ``core-extraction`` / ``core-slenderness``: the inlet ring's stretch as the core's
  widest section passes, and the core's span over its width;
- ``silicone-wall``: outer walls and walls between neighbouring voids;
- ``trapped-air``: a high point of the cavity no opening of the built mold vents;
- ``build-volume`` / ``flat-face`` / ``print-wall`` / ``overhang``: each printed part;
- ``pressure``: the limit pressure of each group of pressurised walls against the working
  pressure (an estimate, see :mod:`.pressure`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TypeVar

from soft_molds.meshdata import TriMesh
from soft_molds.recipe.model import Recipe

from .checks.core_draft import CoreDraft
from .checks.pressure import Pressures
from .checks.printability import PrintPlans
from .checks.shell_release import ShellRelease
from .context import Box, CheckContext, MoldOpening, core_print_facets, void_facets
from .demold import PullReport
from .extraction import Extraction
from .findings import Finding, Severity, of_severity, worst_first
from .pressure import WallPressure
from .printability import PrintPlan
from .registry import Check, registered_checks
from .trapped_air import AirReport
from .walls import WallMap

# The pipeline imports these from here (contact facets for scoring parting planes).
__all__ = ["Review", "core_print_facets", "review", "run_checks", "void_facets"]

T = TypeVar("T")


@dataclass(frozen=True)
class Review:
    """Every finding (errors first), the measurement each check kept (``results``, one
    typed object per check that keeps one) and the keys of the checks that ran, in order."""

    findings: tuple[Finding, ...]
    results: tuple[object, ...] = ()
    ran: tuple[str, ...] = ()

    def result(self, kind: type[T]) -> T | None:
        """The first kept measurement of type ``kind``, or ``None``."""
        return next((x for x in self.results if isinstance(x, kind)), None)

    @property
    def errors(self) -> tuple[Finding, ...]:
        return of_severity(self.findings, Severity.ERROR)

    @property
    def warnings(self) -> tuple[Finding, ...]:
        return of_severity(self.findings, Severity.WARNING)

    @property
    def pulls(self) -> tuple[PullReport, ...]:
        """The shells' pull reports, then each core's."""
        shells = self.result(ShellRelease)
        core = self.result(CoreDraft)
        return ((shells.reports if shells else ())
                + ((core.report, *core.others) if core else ()))

    @property
    def extraction(self) -> Extraction | None:
        return self.result(Extraction)

    @property
    def walls(self) -> WallMap | None:
        return self.result(WallMap)

    @property
    def air(self) -> AirReport | None:
        return self.result(AirReport)

    @property
    def prints(self) -> dict[str, PrintPlan]:
        plans = self.result(PrintPlans)
        return dict(plans.plans) if plans else {}

    @property
    def modulus_mpa(self) -> float | None:
        p = self.result(Pressures)
        return p.modulus_mpa if p else None

    @property
    def pressures(self) -> tuple[WallPressure, ...]:
        p = self.result(Pressures)
        return p.walls if p else ()


def run_checks(ctx: CheckContext, checks: Sequence[Check] | None = None) -> Review:
    """Run ``checks`` (default: every registered check, in order) on ``ctx``. Raises
    ``ValueError`` when a check emits a finding under a name it did not declare."""
    found: list[Finding] = []
    results: list[object] = []
    ran: list[str] = []
    for c in registered_checks() if checks is None else checks:
        out = c.run(ctx)
        stray = sorted({f.check for f in out.findings} - set(c.names))
        if stray:
            raise ValueError(f"check {c.names[0]!r} emitted undeclared name(s) "
                             f"{', '.join(stray)}")
        found.extend(out.findings)
        if out.result is not None:
            results.append(out.result)
        ran.append(c.names[0])
    return Review(worst_first(found), tuple(results), tuple(ran))


def review(
    r: Recipe,
    cast: TriMesh,
    parts: Mapping[str, tuple[TriMesh, Sequence[float] | None]],
    up: Sequence[float],
    block_lo_x: float,
    openings: Sequence[MoldOpening] = (),
    label_boxes: Mapping[str, Sequence[Box]] | None = None,
) -> Review:
    """Run every check on a built mold set. ``parts`` maps part name -> (mesh, pull
    direction) for shell-lower, shell-upper and core; ``cast`` is the cast part's mesh."""
    ctx = CheckContext.create(r, cast, parts, up, block_lo_x, openings, label_boxes)
    return run_checks(ctx)
