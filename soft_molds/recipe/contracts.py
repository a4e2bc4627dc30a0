"""What a body kind and a void kind must provide, checked when the kind registers.

Frame every kind works in (mm): the body starts at the inlet face x = 0 and lies at x >= 0;
the tube socket enters that face along +x. Nothing else is assumed: a body need not be
centred on the x axis, nor widest at any particular plane. The plan stage derives bounds and
sections from the kind's primitives, so a kind that is none of the shapes planned so far is
still planned from its own geometry.

A kind is a frozen dataclass whose fields are exactly the names in its ``FIELDS`` tuple.

Body kinds provide ``primitives()``: the solids the body is the union of.
Void kinds provide ``primitives(body_length_mm)``, ``entry()`` and
``membranes(body_length_mm)`` (the walls
inflation loads from one side, for the pressure check; a void with none returns ``()``
explicitly, so a kind cannot lose its pressure check by omission).

A void whose shape follows the body's (a bellows cavity inside a revolved body) may also
provide ``follow_body(body, path)``: called once the body is read, it returns the void fitted
to that body (or None) and the problems that refuse the pair, each naming its field path.

A void placed by default (a chamber row without ``start_mm``) may also provide
``after_socket(clear_from_mm, body_length_mm)``: called once the inlet is known, it returns
the void with that default settled so that it starts no nearer the inlet face than
``clear_from_mm`` (the socket floor plus ``checks.min_wall_mm``); a void the recipe places
itself is returned unchanged.

A body without a long axis (``ring``) says so with class attributes: ``CURVED_INLET_FACE``
(the socket enters a curved face touching x = 0) and ``LONG_AXIS = False`` (no motion
model applies). A void whose core cannot be drawn out through its socket provides
``lost_core_reason()`` (why, or None); the plan then asks for a lost core.
"""

from __future__ import annotations

import dataclasses
import inspect
from collections.abc import Mapping
from typing import Any, ClassVar, NamedTuple, Protocol

import numpy as np

from ..errors import Problem
from .fields import Field
from .membranes import Membrane
from .primitives import Primitive


class Entry(NamedTuple):
    """Where a void meets the tube socket: the passage centre (y, z) on the inlet face
    (mm), its radius (mm) and the x (mm) where the void starts."""

    center_mm: tuple[float, float]
    radius_mm: float
    start_x_mm: float


class BodyKind(Protocol):
    KIND: ClassVar[str]
    FIELDS: ClassVar[tuple[Field, ...]]

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None
                    ) -> list[Problem]: ...

    def primitives(self) -> tuple[Primitive, ...]: ...


class VoidKind(Protocol):
    KIND: ClassVar[str]
    FIELDS: ClassVar[tuple[Field, ...]]

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None
                    ) -> list[Problem]: ...

    def primitives(self, body_length_mm: float) -> tuple[Primitive, ...]: ...

    def entry(self) -> Entry: ...

    def membranes(self, body_length_mm: float) -> tuple[Membrane, ...]: ...


_BODY_METHODS = {"cross_check": 3, "primitives": 0}
_VOID_METHODS = {"cross_check": 3, "primitives": 1, "entry": 0, "membranes": 1}


def check_kind(cls: type, what: str) -> None:
    """Raise TypeError naming what a kind class lacks (run once, when it registers)."""
    methods = _BODY_METHODS if what == "body" else _VOID_METHODS
    name = cls.__name__
    if not dataclasses.is_dataclass(cls) or not cls.__dataclass_params__.frozen:  # type: ignore[attr-defined]
        raise TypeError(f"{what} kind {name}: must be a frozen dataclass")
    fields = getattr(cls, "FIELDS", None)
    if not isinstance(fields, tuple) or not all(isinstance(f, Field) for f in fields):
        raise TypeError(f"{what} kind {name}: FIELDS must be a tuple of fields.Field")
    declared = [f.name for f in fields]
    # A field marked ``derived`` is no recipe key: the reader fills it (a file body's
    # imported solid, recipe/kinds/file.py).
    attrs = [f.name for f in dataclasses.fields(cls) if not f.metadata.get("derived")]
    if declared != attrs:
        raise TypeError(f"{what} kind {name}: dataclass fields {attrs} differ from FIELDS "
                        f"{declared}")
    for meth, n_args in methods.items():
        fn = getattr(cls, meth, None)
        if fn is None or not callable(fn):
            raise TypeError(f"{what} kind {name}: missing method {meth}()")
        params = [p for p in inspect.signature(fn).parameters.values()
                  if p.default is inspect.Parameter.empty
                  and p.kind in (p.POSITIONAL_ONLY, p.POSITIONAL_OR_KEYWORD)]
        # Bound classmethods drop cls; plain functions keep self.
        given = len(params) - (0 if isinstance(inspect.getattr_static(cls, meth),
                                               classmethod) else 1)
        if given != n_args:
            raise TypeError(f"{what} kind {name}: {meth}() takes {given} argument(s), the "
                            f"contract says {n_args}")


def bounds_of(prims: tuple[Primitive, ...]) -> tuple[tuple[float, float, float],
                                                     tuple[float, float, float]]:
    """Axis-aligned bounds (lo, hi) of a union of primitives (mm, world frame)."""
    los = np.array([p.bounds()[0] for p in prims])
    his = np.array([p.bounds()[1] for p in prims])
    lo, hi = los.min(axis=0), his.max(axis=0)
    return ((float(lo[0]), float(lo[1]), float(lo[2])),
            (float(hi[0]), float(hi[1]), float(hi[2])))
