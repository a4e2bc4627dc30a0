"""What every check reads: the built mold set, each mesh prepared once.

Frame: mm, world; the parting axis points up in pour orientation (``up``); the lower
shell pulls along -up, the upper along +up, each core out through its inlet socket:
:data:`soft_molds.constants.CORE_PULL` (-x) from the start face x = 0, +x from the end
face.

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
from soft_molds.plan.model import CoreSupport, MoldPlan
from soft_molds.plan.model import Inlet as PlanInlet
from soft_molds.recipe.model import Inlet, Recipe
from soft_molds.recipe.primitives import Primitive, union_sdf

from .printability import Printer
from .rays import RayCaster
from .surface import Surface
from .trapped_air import combine

RIGID_PARTS = ("shell-lower", "shell-upper", "core")
"""The printed parts of a one-core mold set, in the order the checks report them (a mold
set with several cores lists ``core-1``, ``core-2``, ... in place of ``core``:
:attr:`CheckContext.rigid_parts`)."""

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


@dataclass(frozen=True, eq=False)
class CoreView:
    """One core as the checks see it: its prepared part, the recipe inlet it leaves
    through, that socket's primitive, the unit pull (out of the socket's face) and the cast
    facets it forms (its voids and socket)."""

    part: PreparedPart
    inlet: Inlet
    socket: Primitive
    pull: tuple[float, float, float]
    void_facets: np.ndarray


def void_facets(r: Recipe, cast: Surface, voids: Sequence[int] | None = None,
                inlets: Sequence[int] | None = None) -> np.ndarray:
    """Facets of the cast on the surface of the voids or the inlet sockets (those the cores
    touch; ``voids`` and ``inlets`` pick some by index), found with the recipe primitives'
    exact distance functions."""
    groups = r.void_primitives()
    sockets = r.sockets()
    prims = (tuple(p for i in (range(len(groups)) if voids is None else voids)
                   for p in groups[i])
             + tuple(sockets[j] for j in (range(len(sockets)) if inlets is None else inlets)))
    if voids is None and inlets is None:
        # An open groove cut from the outside is formed by its plates, not the shells.
        prims += r.outer_primitives()
    tol = min(0.1, r.checks.min_wall_mm / 3.0)
    return np.abs(union_sdf(prims, cast.centroids)) <= tol


def core_print_facets(core: Surface, block_lo_x: float, body_length_mm: float | None = None,
                      tol_mm: float = 0.05) -> np.ndarray:
    """Facets of the cores between the mold block's end faces and the body (the prints and
    their keys, seated in the two shells): on the start side between ``block_lo_x`` and
    x = 0; with ``body_length_mm``, on the end side as far beyond the body's end as
    ``block_lo_x`` lies before its start."""
    x = core.centroids[:, 0]
    out = (x > block_lo_x + tol_mm) & (x < -tol_mm)
    if body_length_mm is not None:
        out |= (x > body_length_mm + tol_mm) & (x < body_length_mm - block_lo_x - tol_mm)
    return out


def _one_core(r: Recipe) -> tuple[CoreSupport, ...]:
    """The core support of a one-inlet recipe, as far as the checks need it."""
    i = r.inlet
    inlet = PlanInlet(i.center_mm, i.socket_diameter_mm, i.socket_depth_mm, i.face)
    return (CoreSupport(inlet, 0.0, 0.0, 0.0, ((0.0, 0.0, 0.0), (0.0, 0.0, 0.0)),
                        i.pull_dir()),)


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
    cores: tuple[CoreView, ...] = ()
    all_cores: PreparedPart | None = None

    @property
    def outer_facets(self) -> np.ndarray:
        """Cast facets on the outer surface (the shells' contact)."""
        return ~self.void_facets

    @property
    def has_core(self) -> bool:
        """Whether a core forms the voids (an open groove's plates are no core)."""
        return bool(self.cores)

    @property
    def core(self) -> PreparedPart:
        """The core, or every core as one part (``core_contact`` indexes its facets)."""
        return self.all_cores if self.all_cores is not None else self.parts["core"]

    @property
    def rigid_parts(self) -> tuple[str, ...]:
        """The printed parts present, shells first, then the cores in plan order."""
        names = [n for n in RIGID_PARTS if n in self.parts]
        names += [c.part.name for c in self.cores if c.part.name not in names]
        # Then any other printed part (an open groove's plates), in the plan's order.
        names += [n for n in self.parts if n not in names]
        return tuple(names)

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
        supports: Sequence[CoreSupport] = (),
    ) -> CheckContext:
        """Prepare every mesh once. ``parts`` maps part name -> (mesh, pull direction) for
        shell-lower, shell-upper and the cores (required: ``core``, or the parts the
        ``supports`` name); ``cast`` is the cast part's mesh."""
        prepared = {
            name: PreparedPart(name, Surface(mesh),
                               None if pull is None else _vec(pull))
            for name, (mesh, pull) in parts.items()
        }
        cast_s = Surface(cast)
        # No inlet (an open groove, formed by plates): no core at all.
        supports = tuple(supports) or (_one_core(r) if r.inlets else ())
        inlets = [PlanInlet(i.center_mm, i.socket_diameter_mm, i.socket_depth_mm, i.face)
                  for i in r.inlets]
        sockets = r.sockets()
        views = []
        for sup in supports:
            j = inlets.index(sup.inlet)
            views.append(CoreView(prepared[sup.part], r.inlets[j], sockets[j],
                                  _vec(sup.pull_dir),
                                  _frozen(void_facets(r, cast_s, sup.voids or None, (j,)))))
        all_cores = None
        if len(views) > 1:
            all_cores = PreparedPart("core", Surface(combine([v.part.surface.mesh
                                                              for v in views])), None)
        core = None if not views else (all_cores or prepared["core"]).surface
        names = [n for n in RIGID_PARTS if n in prepared]
        names += [v.part.name for v in views if v.part.name not in names]
        names += [n for n in prepared if n not in names]
        rigid = [prepared[n].surface.mesh for n in names]
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
            core_contact=_frozen(np.zeros(0, dtype=bool) if core is None else
                                 core_print_facets(core, block_lo_x, r.body_length_mm
                                                   if any(i.at_end for i in r.inlets)
                                                   else None)),
            mold=RayCaster(combine(rigid)),
            printer=printer,
            cores=tuple(views),
            all_cores=all_cores,
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
                          step.settled_layout.block_lo[0], step.openings, label_boxes,
                          step.core_supports)


def _vec(v: Sequence[float] | np.ndarray) -> tuple[float, float, float]:
    return (float(v[0]), float(v[1]), float(v[2]))
