"""Rules of the mold, checked on the plan before any kernel call: the parting plane runs
through the socket axis (so the core print seats in both shells) and through the body's
widest section (so neither shell locks the cast), the block's features keep clear of each
other, and the body starts at the inlet face. Each broken rule is a recipe
:class:`~soft_molds.errors.Problem` naming the field to change."""

from __future__ import annotations

from ..errors import Problem
from ..recipe.model import Recipe
from .layout import Layout, layout_problems, plan_layout
from .lines import LineOf
from .printer_fit import box_fits
from .sections import WIDTH_TOL_MM, widest_offset, width_at

#: Coordinates closer than this are the same (mm): float noise of recipe arithmetic.
EPS_MM = 1e-6
#: A parting plane this much narrower than the widest section still releases the cast (mm):
#: the rounding of a cylinder's section within a micrometre of its axis.
WIDEST_SLACK_MM = 2e-3


def frame_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """The body must start at the inlet face x = 0 (the frame every kind shares)."""
    lo, _ = r.body_bounds()
    if abs(lo[0]) > EPS_MM:
        return [Problem("body", "does not start at the inlet face x = 0", line("body"), lo[0],
                        "a body whose least x is 0 mm (the socket enters that face)")]
    return []


def lost_core_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """A void whose core cannot be drawn out through its socket (a closed channel all
    round a ring: a void kind's ``lost_core_reason()`` says why) on a pulled core."""
    if r.core.lost:
        return []
    out = []
    for i, v in enumerate(r.voids):
        why = getattr(v, "lost_core_reason", lambda: None)()
        if why is not None:
            out.append(Problem(f"voids[{i}]", f"{why}; it needs a lost core", line("core.kind")
                               or line(f"voids[{i}]"), r.core.kind,
                               "core.kind: melted | dissolved (cast in wax or a "
                               "low-melting alloy and melted out, or printed in a "
                               "water-soluble filament and dissolved out, through the "
                               "socket after the cure)"))
    return out


def process_problems(r: Recipe, line: LineOf) -> list[Problem]:
    """A void that only some casting processes can make (a branched channel network: a
    void kind's ``process_reason(kind)`` says why not) in another process."""
    out = []
    for i, v in enumerate(r.voids):
        why = getattr(v, "process_reason", lambda kind: None)(r.process.kind)
        if why is not None:
            out.append(Problem(f"voids[{i}].kind", f"{why}; it cannot be cast by the "
                               f"{r.process.kind} process", line("process.kind")
                               or line(f"voids[{i}].kind"), r.process.kind,
                               "process.kind: layered"))
    return out


def parting_problems(r: Recipe, axis: str, offset_mm: float, line: LineOf) -> list[Problem]:
    """The plane normal to ``axis`` at ``offset_mm``: through the socket axis and the widest
    section, and the mold-block rules of the layout it gives."""
    out: list[Problem] = []
    parting_line = line("parting.offset_mm")
    off_socket = socket_problem(r, axis, offset_mm, parting_line)
    if off_socket is not None:
        out.append(off_socket)
    elif not at_widest(r, axis, offset_mm):
        out.append(Problem("parting.offset_mm", "does not run through the body's widest "
                           "section: one shell part would lock the cast in an undercut",
                           parting_line, offset_mm,
                           "a plane through the straight sides of the body (for a rod, its "
                           "axis; move the voids and socket to that plane)"))
    lay = plan_layout(r, axis, offset_mm)
    out.extend(layout_problems(r, lay, line))
    out.extend(printer_problems(r, lay, line))
    return out


def _on_axis(r: Recipe, axis: str) -> list[float]:
    """Every socket centre's coordinate along ``axis`` (mm), in inlet order."""
    return [(i.center_mm[1] if axis == "z" else i.center_mm[0]) for i in r.inlets]


def through_sockets(r: Recipe, axis: str, offset_mm: float) -> bool:
    """Whether the plane normal to ``axis`` at ``offset_mm`` runs through every socket's
    axis (every core print is seated in both shells)."""
    return all(abs(c - offset_mm) <= EPS_MM for c in _on_axis(r, axis))


def socket_problem(r: Recipe, axis: str, offset_mm: float, at: int | None
                   ) -> Problem | None:
    """The problem of a plane that misses a socket's axis, or None."""
    coords = _on_axis(r, axis)
    if through_sockets(r, axis, offset_mm):
        return None
    if len(coords) == 1:
        return Problem("parting.offset_mm", "does not pass through the inlet socket axis",
                       at, offset_mm, f"{coords[0]:g} mm (the socket centre's {axis}), so the "
                       "core print can be seated in both shell parts")
    if max(coords) - min(coords) <= EPS_MM:
        return Problem("parting.offset_mm", "does not pass through the sockets' axes", at,
                       offset_mm, f"{coords[0]:g} mm (every socket centre's {axis}), so each "
                       "core print can be seated in both shell parts")
    other = "y" if axis == "z" else "z"
    listed = ", ".join(f"{c:g}" for c in coords)
    return Problem("parting.offset_mm", f"cannot pass through every socket axis: the "
                   f"socket centres lie at {axis} = {listed} mm", at, offset_mm,
                   f"one plane through every core print: put the sockets at the same "
                   f"{axis}, or set parting.axis: {other} (with the sockets at the same "
                   f"{other})")


def shell_sizes(lay: Layout) -> dict[str, tuple[float, float, float]]:
    """Block size (x, y, z extents, mm) of each shell part, without keys or funnel."""
    w = lay.frame.w_axis
    out = {}
    for name, (a, b) in (("shell-lower", (lay.block_lo[w], lay.parting_w)),
                         ("shell-upper", (lay.parting_w, lay.block_hi[w]))):
        size = [hi - lo for lo, hi in zip(lay.block_lo, lay.block_hi)]
        size[w] = b - a
        out[name] = (size[0], size[1], size[2])
    return out


def printer_problems(r: Recipe, lay: Layout, line: LineOf) -> list[Problem]:
    """A shell that cannot lie on the printer in any orientation: refused before building."""
    pr = r.printer
    for name, size in shell_sizes(lay).items():
        if not box_fits(size, pr.bed_mm, pr.height_mm):
            dims = " x ".join(f"{d:g}" for d in size)
            return [Problem("printer.bed_mm", f"is too small for the {name} ({dims} mm, "
                            f"on any face and turned as needed, under {pr.height_mm:g} mm)",
                            line("printer.bed_mm"), list(pr.bed_mm),
                            "a bed and height that hold the mold block (or a smaller body, "
                            "mold.wall_mm or mold.flange_mm)")]
    return []


def at_widest(r: Recipe, axis: str, offset_mm: float) -> bool:
    """Both shells pull straight off only if the body's section at the plane is as wide
    (across the other cross axis) as the widest section along the parting axis."""
    w = 2 if axis == "z" else 1
    v = 3 - w
    prims = r.body_primitives()
    _, widest = widest_offset(prims, v, w)
    return width_at(prims, v, w, offset_mm) >= widest - WIDEST_SLACK_MM - WIDTH_TOL_MM


def first_rule_broken(r: Recipe, axis: str, offset_mm: float) -> str | None:
    """The message of the first parting rule the plane breaks, or None (for ranking
    ``parting: auto`` candidates)."""
    problems = parting_problems(r, axis, offset_mm, lambda _path: None)
    return problems[0].message if problems else None
