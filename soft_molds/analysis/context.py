"""What every check reads: the built mold set, each mesh prepared once.

Frame: mm, world; the parting axis points up in pour orientation (``up``); the lower
shell pulls along -up, the upper along +up, the core along
:data:`soft_molds.constants.CORE_PULL` (-x) through the inlet opening at x = 0.

:meth:`CheckContext.create` is the one place that turns the build's outputs into a
context; the checks never build a :class:`Surface` or a ray index of their own.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType
from typing import Protocol

import numpy as np

from soft_molds.meshdata import TriMesh
from soft_molds.plan.model import MoldPlan
from soft_molds.recipe.model import Recipe
from soft_molds.recipe.primitives import union_sdf

from .printability import Printer
from .rays import RayCaster
from .surface import Surface
from .trapped_air import combine

RIGID_PARTS = ("shell-lower", "shell-upper", "core")
"""The printed parts of a mold set, in the order the checks report them."""

Box = tuple[Sequence[float], Sequence[float]]
"""A world box (lo, hi corners, mm)."""


class MoldOpening(Protocol):
    """What the checks need of a sprue or vent where it meets the cavity: its centre (mm,
    world) and radius (mm). Any opening type with these two attributes will do."""

    @property
    def center_mm(self) -> tuple[float, float, float]: ...

    @property
    def radius_mm(self) -> float: ...


@dataclass(frozen=True, eq=False)
class PreparedPart:
    """One printed mold part: its prepared surface and the unit vector it is pulled along
    (world frame)."""

    name: str
    surface: Surface
    pull: tuple[float, float, float] | None


def void_facets(r: Recipe, cast: Surface) -> np.ndarray:
    """Facets of the cast on the surface of the voids or the inlet socket (those the core
    touches), found with the recipe primitives' exact distance functions."""
    prims = tuple(p for group in r.void_primitives() for p in group) + (r.inlet.socket(),)
    tol = min(0.1, r.checks.min_wall_mm / 3.0)
    return np.abs(union_sdf(prims, cast.centroids)) <= tol


def core_print_facets(core: Surface, block_lo_x: float, tol_mm: float = 0.05) -> np.ndarray:
    """Facets of the core between the mold block's inlet face and the body (the print and
    its key, seated in the two shells)."""
    x = core.centroids[:, 0]
    return (x > block_lo_x + tol_mm) & (x < -tol_mm)


def _frozen(a: np.ndarray) -> np.ndarray:
    a.flags.writeable = False
    return a


@dataclass(frozen=True, eq=False)
class CheckContext:
    """The shared, read-only input of every check.

    ``cast``: the cast part (silicone with its voids), outward-wound. ``parts``: the printed
    parts by name (shell-lower, shell-upper, core), each prepared once. ``up``: unit pour
    direction. ``block_lo_x``: x of the mold block's inlet face (mm). ``openings``: sprue
    and vents cut into the upper shell. ``label_boxes``: per part, world boxes of its
    label (the print-wall check skips them). ``void_facets``: cast facets the core touches
    (voids and inlet socket); ``core_contact``: core facets seated in the shells. ``mold``:
    the ray index of every rigid part of the closed mold as one mesh. ``printer``: the
    recipe's printer limits.
    """

    recipe: Recipe
    cast: Surface
    parts: Mapping[str, PreparedPart]
    up: tuple[float, float, float]
    block_lo_x: float
    openings: tuple[MoldOpening, ...]
    label_boxes: Mapping[str, tuple[Box, ...]]
    void_facets: np.ndarray
    core_contact: np.ndarray
    mold: RayCaster
    printer: Printer

    @property
    def outer_facets(self) -> np.ndarray:
        """Cast facets on the outer surface (the shells' contact)."""
        return ~self.void_facets

    @property
    def core(self) -> PreparedPart:
        return self.parts["core"]

    @classmethod
    def create(
        cls,
        r: Recipe,
        cast: TriMesh,
        parts: Mapping[str, tuple[TriMesh, Sequence[float] | None]],
        up: Sequence[float],
        block_lo_x: float,
        openings: Sequence[MoldOpening] = (),
        label_boxes: Mapping[str, Sequence[Box]] | None = None,
    ) -> CheckContext:
        """Prepare every mesh once. ``parts`` maps part name -> (mesh, pull direction) for
        shell-lower, shell-upper and core (the core is required); ``cast`` is the cast
        part's mesh."""
        prepared = {
            name: PreparedPart(name, Surface(mesh),
                               None if pull is None else _vec(pull))
            for name, (mesh, pull) in parts.items()
        }
        cast_s = Surface(cast)
        core = prepared["core"].surface
        rigid = [prepared[n].surface.mesh for n in RIGID_PARTS if n in prepared]
        pr = r.printer
        printer = Printer(bed_mm=(float(pr.bed_mm[0]), float(pr.bed_mm[1])),
                          height_mm=pr.height_mm, nozzle_mm=pr.nozzle_mm,
                          perimeters=pr.perimeters, overhang_deg=pr.overhang_deg)
        u = np.asarray(up, dtype=np.float64)
        return cls(
            recipe=r,
            cast=cast_s,
            parts=MappingProxyType(prepared),
            up=_vec(u / np.linalg.norm(u)),
            block_lo_x=float(block_lo_x),
            openings=tuple(openings),
            label_boxes=MappingProxyType({k: tuple(v) for k, v in (label_boxes or {}).items()}),
            void_facets=_frozen(void_facets(r, cast_s)),
            core_contact=_frozen(core_print_facets(core, block_lo_x)),
            mold=RayCaster(combine(rigid)),
            printer=printer,
        )

    @classmethod
    def for_step(
        cls,
        plan: MoldPlan,
        cast: TriMesh,
        parts: Mapping[str, tuple[TriMesh, Sequence[float] | None]],
        label_boxes: Mapping[str, Sequence[Box]] | None = None,
    ) -> CheckContext:
        """The context of a built casting step: pour direction, block and openings as the
        completed plan says."""
        step = plan.step
        return cls.create(plan.recipe, cast, parts, step.settled_parting.up,
                          step.settled_layout.block_lo[0], step.openings, label_boxes)


def _vec(v: Sequence[float] | np.ndarray) -> tuple[float, float, float]:
    return (float(v[0]), float(v[1]), float(v[2]))
