"""``build-volume``, ``flat-face``, ``print-wall`` and ``overhang``: how each printed part
goes onto the bed of the recipe's printer (:mod:`soft_molds.analysis.printability`)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType

from ..context import CheckContext
from ..findings import Finding
from ..printability import PrintPlan, plan_print, print_findings
from ..registry import CheckOutput, check


@dataclass(frozen=True)
class PrintPlans:
    """The chosen pose of each printed part, by part name (in
    :attr:`CheckContext.rigid_parts` order)."""

    plans: Mapping[str, PrintPlan]


@check("build-volume", "flat-face", "print-wall", "overhang", order=600)
def printability(ctx: CheckContext) -> CheckOutput:
    plans: dict[str, PrintPlan] = {}
    out: list[Finding] = []
    for name in ctx.rigid_parts:
        s = ctx.parts[name].surface
        plan = plan_print(s.mesh, name, ctx.printer, ctx.label_boxes.get(name, ()), surface=s)
        plans[name] = plan
        out.extend(print_findings(plan, ctx.printer))
    return CheckOutput(tuple(out), PrintPlans(MappingProxyType(plans)))
