"""``core-support``: a lost core (``core.kind: dissolved`` or ``melted``) in the liquid
silicone: the net force that lifts or sinks it, how many supports hold it, and, for a core
held by its one print, whether the print takes the moment (the criterion and its figures:
:mod:`soft_molds.analysis.support`). Nothing for a pulled core, printed in the mold's own
filament and stiff enough by the core checks before this one.
"""

from __future__ import annotations

from ...recipe.feeds import core_groups
from ..context import CheckContext
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..support import CoreSupportFigures, CoreSupports, core_support


@check("core-support", order=320)
def core_support_check(ctx: CheckContext) -> CheckOutput:
    r = ctx.recipe
    if not r.core.lost:
        return CheckOutput(())
    out: list[Finding] = []
    figures: list[CoreSupportFigures] = []
    views = {v.part.name: v for v in ctx.cores}
    for g in core_groups(r):
        name = "core" if len(r.inlets) == 1 else f"core-{g.inlet + 1}"
        view = views.get(name)
        mesh = view.part.surface.mesh if view is not None else ctx.parts[name].surface.mesh
        f = core_support(r, name, mesh, g.inlet)
        figures.append(f)
        out.append(_finding(f))
    return CheckOutput(tuple(out), CoreSupports(tuple(figures)))


def _finding(f: CoreSupportFigures) -> Finding:
    way = "floats up" if f.floats else "sinks"
    head = (f"the {f.material} core ({f.core_density_g_cm3:g} g/cm3, {f.immersed_mm3:.0f} "
            f"mm3 in silicone of {f.silicone_density_g_cm3:g} g/cm3) {way} with a net "
            f"{abs(f.net_force_n):.3f} N, held by {len(f.supports)} support(s)")
    if f.holding_nmm is None and len(f.supports) == 1:
        return finding("core-support", Severity.INFO, f.part, head + ": its magnet pair, "
                       "whose pull is the supplier's figure (see its data sheet)",
                       value=f.net_force_n)
    if f.holding_nmm is None:
        return finding("core-support", Severity.INFO, f.part, head + ", spanning between "
                       "them", value=f.net_force_n)
    tail = (f"; at {f.lever_mm:.1f} mm from the cavity wall that is {f.moment_nmm:.2f} N mm "
            f"on its one print, which is taken to hold {f.holding_nmm:.2f} N mm")
    if f.overloaded:
        return finding("core-support", Severity.WARNING, f.part, head + tail + ": the core "
                       "may sag or lift and bend the print; support its far end",
                       value=f.moment_nmm, limit=f.holding_nmm, where=f.centroid_mm)
    return finding("core-support", Severity.INFO, f.part, head + tail,
                   value=f.moment_nmm, limit=f.holding_nmm)
