"""``core-extraction`` and ``core-slenderness``: pulling each core out through its inlet.

The inlet ring of silicone stretches round each section of the core as it passes
(:mod:`soft_molds.analysis.extraction`): an error when the stretch times the safety factor
reaches the grade's elongation at break. A core whose narrow part runs long between the
sections that hold it (span over width, defined there) may bend while pouring or break
while pulling: a warning.
"""

from __future__ import annotations

import numpy as np

from ..context import CheckContext, CoreView
from ..extraction import Extraction, allowed_stretch, core_extraction
from ..findings import Finding, Severity, finding
from ..registry import CheckOutput, check
from ..wording import point


@check("core-extraction", "core-slenderness", order=300)
def core_extraction_check(ctx: CheckContext) -> CheckOutput:
    """Each core through its own socket (one core: the part ``core``); the figures of the
    first core ride on the output, the findings of every core are listed. Nothing for a
    lost core (``core.kind: dissolved``), which is not pulled."""
    if ctx.recipe.core.lost:
        # A dissolved core never passes the socket: the drain check stands in for this one.
        return CheckOutput(())
    out: list[Finding] = []
    figures = []
    for view in ctx.cores:
        found, ext = _one_core(ctx, view)
        out.extend(found)
        figures.append(ext)
    if not figures:  # no core (an open groove's plates slide out: see plate-release)
        return CheckOutput(())
    return CheckOutput(tuple(out), figures[0])


def _one_core(ctx: CheckContext, view: CoreView) -> tuple[list[Finding], Extraction]:
    r, c = ctx.recipe, ctx.recipe.checks
    inlet = view.inlet
    cy, cz = inlet.center_mm
    d_open = inlet.socket_diameter_mm
    name = view.part.name
    face_x = inlet.face_x_mm(r.body_length_mm)
    ext = core_extraction(view.part.surface.mesh, view.pull, (face_x, cy, cz),
                          np.pi * d_open)
    elong = r.material.elongation_at_break_pct
    k = c.core_safety_factor
    allowed = allowed_stretch(elong, k)
    need = k * ext.strain * 100.0
    tears = ext.stretch > allowed + 1e-9
    the = "the core" if name == "core" else f"{name}"
    out: list[Finding] = [finding(
        "core-extraction", Severity.ERROR if tears else Severity.INFO, name,
        f"pulling {the} out stretches the {d_open:g} mm inlet to {ext.stretch:.2f} x its "
        f"perimeter ({ext.section_perimeter_mm:.1f} mm section near {point(ext.where_mm)}): "
        f"strain {ext.strain * 100:.0f} % x safety factor {k:g} = {need:.0f} % against "
        f"elongation at break {elong:g} % ({r.material.grade})"
        + ("; the inlet will tear: widen the socket, slim the voids, choose a more "
           "stretchy grade, or set core.kind: dissolved (a soluble core, never pulled)"
           if tears else ""),
        value=ext.stretch, limit=allowed, where=ext.where_mm)]
    if ext.slenderness > c.core_slenderness_max:
        out.append(finding(
            "core-slenderness", Severity.WARNING, name,
            f"{the} is only {ext.least_width_mm:.1f} mm wide and runs {ext.span_mm:.1f} mm "
            f"with nothing wider to hold it near {point(ext.span_where_mm)} (span / width "
            f"{ext.slenderness:.1f} > {c.core_slenderness_max:g}): it may bend while pouring "
            "or break while pulling; print it solid, or widen it along that span",
            value=ext.slenderness, limit=c.core_slenderness_max, where=ext.span_where_mm))
    return out, ext
