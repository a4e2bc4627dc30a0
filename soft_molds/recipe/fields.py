"""Declarative recipe fields and the reader that validates a mapping against them.

A kind (body or void) or a settings block lists its fields once; the same list drives
validation, defaults, the error messages and the recipe reference in the README, so the
three cannot drift apart. Units live in the field names (``_mm``, ``_deg``).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

from ..errors import Problem
from .yamlsource import Node

#: No part of a cast actuator or its mold is larger than this (mm); far beyond any
#: desktop printer, it only stops typos such as 1e9 from reaching the kernel.
MAX_SIZE_MM = 1000.0

#: No length a recipe gives may be smaller than this unless it is 0 (mm). 0.05 mm is at or
#: below what a printer reproduces (an FDM layer is 0.05-0.3 mm and its nozzle 0.4 mm; a
#: resin printer's pixel about 0.03-0.05 mm; from memory) and 2.5 times the default mesh
#: chord (``mesh.chord_mm`` 0.02 mm), so a positive length below it cannot be made and
#: would only reach the geometry kernel as a degenerate solid (a 1e-300 mm pitch fails
#: there with a domain error). Sizes must reach it; lengths that may be 0 (a rounding, a
#: start position) are 0 or at least this.
MIN_SIZE_MM = 0.05

_REQUIRED = object()


def _fmt(x: float) -> str:
    return f"{x:g}"


@dataclass(frozen=True)
class Field:
    """One recipe key.

    ``kind`` is ``"number"``, ``"integer"``, ``"choice"``, ``"text"``, ``"pair"`` (two
    numbers), ``"triple"`` (three), ``"points"``, ``"rounds"``, ``"graded"``, ``"paths"``
    (a list of point lists) or ``"records"`` (a list of mappings of ``fields``; see their
    constructors).
    ``lo``/``hi`` bound numbers (``lo_open`` makes the lower bound strict);
    ``gap_below`` > 0 with ``lo`` = 0 accepts 0 or at least ``gap_below``, nothing between.
    ``default`` is ``None`` when the key is optional with no value, or the module-level
    ``REQUIRED`` sentinel when it must be given.
    """

    name: str
    kind: str
    doc: str
    default: object = _REQUIRED
    unit: str = ""
    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    choices: tuple[str, ...] = ()
    gap_below: float = 0.0
    item: str = ""  # what a ``graded`` field gives one value to ("chamber")
    #: What the two numbers of each point of a ``points`` field are.
    coords: tuple[str, str] = ("x", "radius")
    #: False for a field added after recipes were in use: left at its default, it is left
    #: out of the recipe's echo (``Recipe.params``), so a recipe that does not use it keeps
    #: its hash and its manifest.
    echo_default: bool = True
    #: The keys of each mapping of a ``records`` field.
    fields: tuple[Field, ...] = ()

    @property
    def required(self) -> bool:
        return self.default is _REQUIRED

    def allowed(self) -> str:
        """Human text for what this field accepts (used in errors and the README)."""
        if self.kind == "choice":
            return "one of " + ", ".join(self.choices)
        if self.kind == "text":
            return "text"
        if self.kind in ("points", "rounds", "graded", "paths"):
            return _list_allowed(self)
        if self.kind == "records":
            return (f"a list of 1 to {MAX_RECORDS} mappings, each with the keys "
                    + ", ".join(f.name for f in self.fields))
        parts = []
        if self.gap_below > 0.0:
            parts.append(f"0 or {_fmt(self.gap_below)} <= ")
        elif self.lo is not None:
            parts.append(f"{_fmt(self.lo)} {'<' if self.lo_open else '<='} ")
        parts.append("each value" if self.kind in ("pair", "triple") else "value")
        if self.hi is not None:
            parts.append(f" <= {_fmt(self.hi)}")
        unit = f" {self.unit}" if self.unit else ""
        what = "a whole number" if self.kind == "integer" else "a number"
        if self.kind in ("pair", "triple"):
            what = f"a list of {_COUNT_WORDS[2 if self.kind == 'pair' else 3]} numbers"
        return f"{what}, {''.join(parts)}{unit}"


REQUIRED = _REQUIRED

_COUNT_WORDS = {2: "two", 3: "three"}

#: Most points a profile field takes: a bellows of 100 pleats needs about 200.
MAX_POINTS = 400
#: Most point lists a ``paths`` field and mappings a ``records`` field take.
MAX_PATHS = 32
MAX_RECORDS = 32


def _list_allowed(f: Field) -> str:
    each = f"0 or {_fmt(f.gap_below)} <= value <= {_fmt(f.hi or MAX_SIZE_MM)} {f.unit}"
    if f.kind == "graded":
        each = f"{_fmt(f.lo or 0.0)} <= value <= {_fmt(f.hi or MAX_SIZE_MM)} {f.unit}"
        return (f"a number, a list of numbers (one per {f.item}), or a linear grade "
                f"{{from: first, to: last}}, each {each}")
    if f.lo is not None and f.lo < 0.0:
        top = _fmt(f.hi or MAX_SIZE_MM)
        each = (f"-{top} <= value <= {top} {f.unit}, 0 or at least {_fmt(f.gap_below)} "
                f"{f.unit} from 0")
    if f.gap_below == 0.0 and f.lo is not None:  # no floor: plain bounds (angles)
        each = f"{_fmt(f.lo)} <= value <= {_fmt(f.hi or MAX_SIZE_MM)} {f.unit}"
    if f.kind == "points":
        return (f"a list of 2 to {MAX_POINTS} points [{', '.join(f.coords)}], each value "
                f"{each}")
    if f.kind == "paths":
        return (f"a list of 1 to {MAX_PATHS} lists of 2 to {MAX_POINTS} points "
                f"[{', '.join(f.coords)}], each value {each}")
    return f"a number, or a list of numbers (one per {f.item or 'point'}), each {each}"


def number(name: str, doc: str, default: object = REQUIRED, *, unit: str = "mm",
           lo: float | None = 0.0, hi: float | None = MAX_SIZE_MM, lo_open: bool = True,
           echo_default: bool = True) -> Field:
    """A number field. A length (unit mm) bounded below by 0 gets the absolute floor
    ``MIN_SIZE_MM``: a size (0 excluded) must reach it, a length that may be 0 is 0 or
    reaches it."""
    if unit == "mm" and lo == 0.0:
        if lo_open:
            return Field(name, "number", doc, default, unit, MIN_SIZE_MM, hi, False,
                         echo_default=echo_default)
        return Field(name, "number", doc, default, unit, 0.0, hi, False, gap_below=MIN_SIZE_MM,
                     echo_default=echo_default)
    return Field(name, "number", doc, default, unit, lo, hi, lo_open,
                 echo_default=echo_default)


def integer(name: str, doc: str, default: object = REQUIRED, *, lo: int = 1,
            hi: int = 1000) -> Field:
    return Field(name, "integer", doc, default, "", lo, hi, False)


def choice(name: str, doc: str, choices: Iterable[str], default: object = REQUIRED, *,
           echo_default: bool = True) -> Field:
    return Field(name, "choice", doc, default, choices=tuple(choices),
                 echo_default=echo_default)


def text(name: str, doc: str, default: object = REQUIRED) -> Field:
    return Field(name, "text", doc, default)


def pair(name: str, doc: str, default: object = REQUIRED, *, unit: str = "mm",
         lo: float | None = -MAX_SIZE_MM, hi: float | None = MAX_SIZE_MM) -> Field:
    return Field(name, "pair", doc, default, unit, lo, hi, False)


def triple(name: str, doc: str, default: object = REQUIRED, *, unit: str = "mm",
           lo: float | None = -MAX_SIZE_MM, hi: float | None = MAX_SIZE_MM) -> Field:
    """Three numbers (x, y, z), each within [lo, hi]."""
    return Field(name, "triple", doc, default, unit, lo, hi, False)


def points(name: str, doc: str, default: object = None, *,
           coords: tuple[str, str] = ("x", "radius"), signed: bool = False) -> Field:
    """A list of points in mm (``coords`` names their two numbers), each coordinate 0 or
    at least ``MIN_SIZE_MM`` in size, and not below 0 unless ``signed`` (the order and
    shape of the points are the kind's to check)."""
    return Field(name, "points", doc, default, "mm", -MAX_SIZE_MM if signed else 0.0,
                 MAX_SIZE_MM, False, gap_below=MIN_SIZE_MM, coords=coords)


def paths(name: str, doc: str, default: object = REQUIRED, *,
          coords: tuple[str, str] = ("x", "y")) -> Field:
    """A list of polylines, each a list of at least two signed points in mm (``coords``
    names their two numbers); their shape is the kind's to check."""
    return Field(name, "paths", doc, default, "mm", -MAX_SIZE_MM, MAX_SIZE_MM, False,
                 gap_below=MIN_SIZE_MM, coords=coords)


def records(name: str, doc: str, fields: tuple[Field, ...], default: object = REQUIRED
            ) -> Field:
    """A list of mappings, each read against ``fields`` (every bad key on its own line,
    located ``name[i].key``); each comes back as a :class:`Record`."""
    return Field(name, "records", doc, default, fields=fields)


class Record(dict[str, Any]):
    """One mapping of a ``records`` field: its keys' validated values. Read-only and
    hashable, so a kind holding records stays a frozen value; a dict, so the recipe's echo
    writes it as a mapping."""

    def __hash__(self) -> int:  # type: ignore[override]
        return hash(tuple(sorted(self.items())))

    def __reduce__(self) -> tuple[type[Record], tuple[dict[str, Any]]]:
        # Pickled and copied whole (a sweep sends recipes to its workers): the default
        # would rebuild it key by key through the refused __setitem__.
        return (Record, (dict(self),))

    def _read_only(self, *args: object, **kwargs: object) -> None:
        raise TypeError("a Record is read-only")

    __setitem__ = __delitem__ = update = pop = popitem = clear = setdefault = _read_only  # type: ignore[assignment]


def rounds(name: str, doc: str, default: object = 0.0) -> Field:
    """One rounding radius (mm) for every corner of a profile, or a list of one per point;
    each 0 or at least ``MIN_SIZE_MM``."""
    return Field(name, "rounds", doc, default, "mm", 0.0, MAX_SIZE_MM, False,
                 gap_below=MIN_SIZE_MM)


@dataclass(frozen=True)
class Grade:
    """A size graded linearly from the first item of a row to the last (mm)."""

    from_mm: float
    to_mm: float


def graded(name: str, doc: str, default: object = REQUIRED, *, item: str = "item") -> Field:
    """A size (mm, at least ``MIN_SIZE_MM``) of each item of a row: one number for all, a
    list with one per ``item`` (the kind checks its length), or ``{from: a, to: b}``, a
    :class:`Grade` from the first item to the last. Resolve it with :func:`per_item`."""
    return Field(name, "graded", doc, default, "mm", MIN_SIZE_MM, MAX_SIZE_MM, False,
                 item=item)


def per_item(value: float | tuple[float, ...] | Grade, n: int) -> tuple[float, ...]:
    """The ``n`` values (mm) a ``graded`` field gives: a grade's are evenly spaced from its
    first value to its last (one item takes the first); a list is returned as written."""
    if isinstance(value, Grade):
        if n == 1:
            return (value.from_mm,)
        step = (value.to_mm - value.from_mm) / (n - 1)
        return tuple(value.from_mm + i * step for i in range(n - 1)) + (value.to_mm,)
    if isinstance(value, tuple):
        return value
    return (float(value),) * n


def join_path(base: str, key: str | int) -> str:
    if isinstance(key, int):
        return f"{base}[{key}]"
    return f"{base}.{key}" if base else key


def _is_number(v: object) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


class MapReader:
    """Reads one YAML mapping against a list of fields, collecting every problem.

    Nothing raises here: problems accumulate in the shared list so the user sees all of
    them in one run. Values that failed are returned as ``None``; the caller checks
    ``ok`` (no new problems) before building a value object.
    """

    def __init__(self, node: Node | None, path: str, problems: list[Problem],
                 fallback_line: int | None = None, what: str = "a mapping of settings"):
        self.path = path
        self.problems = problems
        self._start = len(problems)
        self.line = node.line if node is not None else fallback_line
        if node is not None and node.key_line is not None:
            self.line = node.key_line
        self.items: dict[str, Node] = {}
        self._seen: set[str] = set()
        if node is None:
            return
        if not isinstance(node.value, dict):
            self.problem(path, f"must be {what}", self.line, node.plain())
            return
        self.items = node.value

    @property
    def ok(self) -> bool:
        return len(self.problems) == self._start

    def problem(self, path: str, message: str, line: int | None, value: object = None,
                allowed: str = "") -> None:
        self.problems.append(Problem(path, message, line, value, allowed))

    def node(self, name: str) -> Node | None:
        self._seen.add(name)
        return self.items.get(name)

    def line_of(self, name: str) -> int | None:
        n = self.items.get(name)
        if n is None:
            return self.line
        return n.key_line if n.key_line is not None else n.line

    def take(self, f: Field) -> Any:
        """Return the validated value of ``f`` (its default when absent, None when bad)."""
        n = self.node(f.name)
        path = join_path(self.path, f.name)
        if n is None:
            if f.required:
                self.problem(path, "is required", self.line, None, f.allowed())
                return None
            return f.default
        line = n.key_line if n.key_line is not None else n.line
        v = n.value
        if f.kind == "choice":
            if not isinstance(v, str) or v not in f.choices:
                hint = suggest(str(v), f.choices)
                self.problem(path, "is not a known value" + hint, line, n.plain(), f.allowed())
                return None
            return v
        if f.kind == "text":
            if not isinstance(v, str) or not v.strip():
                self.problem(path, "must be non-empty text", line, n.plain(), f.allowed())
                return None
            return v.strip()
        if f.kind in ("pair", "triple"):
            count = 2 if f.kind == "pair" else 3
            items = v if isinstance(v, list) else None
            if items is None or len(items) != count or \
                    not all(_is_number(i.value) for i in items):
                self.problem(path, f"must be a list of {_COUNT_WORDS[count]} numbers", line,
                             n.plain(), f.allowed())
                return None
            out = [self._check_number(f, path, line, i.value) for i in items]
            numbers = [x for x in out if x is not None]
            if len(numbers) != count:
                return None
            return tuple(float(x) for x in numbers)
        if f.kind in ("points", "rounds", "graded"):
            return self._take_list(f, path, line, n)
        if f.kind == "paths":
            return self._take_paths(f, path, line, n)
        if f.kind == "records":
            return self._take_records(f, path, line, n)
        if not _is_number(v):
            self.problem(path, "must be a number" if f.kind == "number" else
                         "must be a whole number", line, n.plain(), f.allowed())
            return None
        if f.kind == "integer" and (isinstance(v, float) and not float(v).is_integer()):
            self.problem(path, "must be a whole number", line, v, f.allowed())
            return None
        checked = self._check_number(f, path, line, v)
        if checked is None:
            return None
        return int(checked) if f.kind == "integer" else float(checked)

    def _take_list(self, f: Field, path: str, line: int | None, n: Node) -> Any:
        """A ``points``, ``rounds`` or ``graded`` value: every bad item reported on its own
        line."""
        if f.kind in ("rounds", "graded") and _is_number(n.value):
            return self._check_number(f, path, line, n.value)
        if f.kind == "graded" and isinstance(n.value, dict):
            return self._take_grade(f, path, n)
        items = n.value if isinstance(n.value, list) else None
        if items is None or not items or len(items) > MAX_POINTS:
            self.problem(path, ("must be a number, a list or {from, to}" if f.kind == "graded"
                                else "must be a list") if items is None else
                         "has too many items" if items else "must not be empty", line,
                         n.plain() if items is None else len(items), f.allowed())
            return None
        out: list[Any] = []
        for i, item in enumerate(items):
            ipath, iline = join_path(path, i), item.line
            if f.kind in ("rounds", "graded"):
                if not _is_number(item.value):
                    self.problem(ipath, "must be a number", iline, item.plain(), f.allowed())
                    out.append(None)
                else:
                    out.append(self._check_number(f, ipath, iline, item.value))
                continue
            pair_ = item.value if isinstance(item.value, list) else None
            if pair_ is None or len(pair_) != 2 or not all(_is_number(c.value) for c in pair_):
                self.problem(ipath, f"must be a point [{', '.join(f.coords)}] of two numbers",
                             iline,
                             item.plain(), f.allowed())
                out.append(None)
                continue
            xy = [self._check_number(f, ipath, iline, c.value) for c in pair_]
            out.append(None if None in xy else (xy[0], xy[1]))
        if f.kind == "points" and len(items) < 2:
            self.problem(path, "has fewer than two points", line, len(items), f.allowed())
            return None
        return None if any(v is None for v in out) else tuple(out)

    def _take_paths(self, f: Field, path: str, line: int | None, n: Node) -> Any:
        """A ``paths`` value: a list of ``points`` lists, each read as one."""
        items = n.value if isinstance(n.value, list) else None
        if items is None or not items or len(items) > MAX_PATHS:
            self.problem(path, "must be a list" if items is None else
                         "has too many items" if items else "must not be empty", line,
                         n.plain() if items is None else len(items), f.allowed())
            return None
        one = Field(f.name, "points", f.doc, f.default, f.unit, f.lo, f.hi, False,
                    gap_below=f.gap_below, coords=f.coords)
        out = [self._take_list(one, join_path(path, i), item.line, item)
               for i, item in enumerate(items)]
        return None if any(v is None for v in out) else tuple(out)

    def _take_records(self, f: Field, path: str, line: int | None, n: Node) -> Any:
        """A ``records`` value: a list of mappings, each read against ``f.fields``."""
        items = n.value if isinstance(n.value, list) else None
        if items is None or not items or len(items) > MAX_RECORDS:
            self.problem(path, "must be a list" if items is None else
                         "has too many items" if items else "must not be empty", line,
                         n.plain() if items is None else len(items), f.allowed())
            return None
        out = []
        for i, item in enumerate(items):
            r = MapReader(item, join_path(path, i), self.problems, item.line)
            got = r.take_all(f.fields)
            r.finish()
            out.append(Record(got) if r.ok and isinstance(item.value, dict) else None)
        return None if any(v is None for v in out) else tuple(out)

    def _take_grade(self, f: Field, path: str, n: Node) -> Grade | None:
        """``{from: a, to: b}``: both ends required, each a size in ``f``'s range."""
        ends = (Field("from", "number", "first item", REQUIRED, f.unit, f.lo, f.hi),
                Field("to", "number", "last item", REQUIRED, f.unit, f.lo, f.hi))
        r = MapReader(n, path, self.problems)
        got = r.take_all(ends)
        r.finish()
        if not r.ok:
            return None
        return Grade(got["from"], got["to"])

    def _check_number(self, f: Field, path: str, line: int | None, v: object) -> float | None:
        try:
            x = float(v)  # type: ignore[arg-type]
        except OverflowError:  # a YAML int of hundreds of digits: beyond any float
            self.problem(path, "is out of range", line, v, f.allowed())
            return None
        if not math.isfinite(x):
            self.problem(path, "must be a finite number", line, v, f.allowed())
            return None
        low_bad = f.lo is not None and (x <= f.lo if f.lo_open else x < f.lo)
        low_bad = low_bad or 0.0 < abs(x) < f.gap_below
        high_bad = f.hi is not None and x > f.hi
        if low_bad or high_bad:
            self.problem(path, "is out of range", line, v, f.allowed())
            return None
        # -0.0 + 0.0 is +0.0 (IEEE 754): "-0.0" and "0" then hash alike in params_sha256.
        return x + 0.0

    def take_all(self, fields: Iterable[Field]) -> dict[str, Any]:
        return {f.name: self.take(f) for f in fields}

    def finish(self, extra_known: Iterable[str] = ()) -> None:
        """Report keys nobody asked for, with the nearest valid key suggested."""
        known = sorted(self._seen | set(extra_known))
        for key, n in self.items.items():
            if key in self._seen or key in known:
                continue
            line = n.key_line if n.key_line is not None else n.line
            self.problem(join_path(self.path, key), "is not a known key" + suggest(key, known),
                         line, None, ", ".join(known) if known else "")


def suggest(word: str, options: Iterable[str]) -> str:
    """`` (did you mean 'x'?)`` for the option nearest ``word``, or "" when none is near."""
    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f" (did you mean '{near[0]}'?)" if near else ""
