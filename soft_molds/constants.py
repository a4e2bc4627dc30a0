"""Numbers that more than one module must agree on, in one place (a leaf module: it
imports nothing from the project).

Lengths mm, directions unit vectors in the world frame (body long axis +x from the inlet
face x = 0). A number used by one module only stays in that module, next to its reason.
"""

from __future__ import annotations

AIR_PERSISTENCE_MM = 0.5
"""A local high point of the cavity ceiling holds its own bubble only if it stands at least
this far (mm, along the pour direction) above the saddle where its region joins higher
ground; lower bumps are tessellation noise. The opening planner
(:func:`soft_molds.analysis.highpoints.plan_openings`) places vents with it and the
trapped-air check (:mod:`soft_molds.analysis.trapped_air`) looks for unvented high points
with it: if they disagreed, the check would flag high points the planner ignored, or miss
ones it vented."""

AIR_PLATEAU_MM = 0.25
"""The plateau of a high point: the surface within this height (mm, along the pour
direction) below its peak, connected to it. Air gathers anywhere on it, so an opening that
reaches the plateau vents the high point. Shared by the planner and the trapped-air check
for the same reason as :data:`AIR_PERSISTENCE_MM`."""

CORE_PULL = (-1.0, 0.0, 0.0)
"""The direction the core leaves the cured part: out through the inlet opening at x = 0,
along -x (unit vector, world frame). The review pulls the core's draft and extraction along
it; the build records it as the core part's pull."""

MESH_VOLUME_REL_TOL = 0.005
"""A part's mesh volume must agree with its exact (BRep) volume to this relative tolerance
(0.5 %). The integrity check (:func:`soft_molds.analysis.integrity.check_mesh`) holds every
mesh to it, and the tessellator (:func:`soft_molds.geometry.tessellate.tessellate_within`)
refines a mesh that misses it, so a coarse ``mesh.chord_mm`` on a small curved part yields
a finer mesh instead of a failed build."""

ROLE_COLOURS = {"shell": "#9fb3c8", "core": "#f0a04b", "cast": "#6cc3a0"}
"""Colours of the parts by role (shell, core, cast), as hex RGB: the pictures of the mold
(:mod:`soft_molds.export.assembly`), the preview page and the optional CAD viewer
(:mod:`soft_molds.geometry.viewer`) colour a part alike wherever a person sees it."""

CORE_DENSITY_G_CM3 = {"wax": 0.90, "low-melt-alloy": 9.5}
"""Density of what a melted core (``core.kind: melted``) is cast in, by ``core.material``
(g/cm3). Paraffin-type casting wax about 0.88-0.92 (from memory); a bismuth-based
low-melting alloy (bismuth with lead, tin, indium or cadmium, melting between about 47 and
140 deg C) about 9.4-9.7 (from memory). The recipe offers exactly these names; the support
check weighs the core with them; the card and manifest state the mass from them."""

DISSOLVED_CORE_DENSITY_G_CM3 = 1.23
"""A dissolved core (``core.kind: dissolved``) printed solid in a water-soluble filament
(polyvinyl alcohol): about 1.19-1.23 g/cm3 (from memory; the higher, as the core is printed
at full infill)."""
