"""Body kind ``file``: the body drawn in the user's own CAD program, read from a STEP file.

The voids still come from the recipe's void kinds (bore, chambers, ...); only the outside
shape is drawn. The file is read while the recipe is validated, through the reader the
package installs (``recipe/imported.py``), and its closed triangle mesh answers the
primitive contract (``recipe/meshsolid.py``); the build uses the BRep itself.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import Field, text, triple
from ..imported import BodyFileRefused, ImportedBody, body_reader, looks_like_step
from ..meshsolid import MeshSolid
from ..primitives import Primitive
from ..registry import body_kind

#: Below this largest extent (mm) a drawn body is too small to hold a tube socket and its
#: walls; when it would fit the printer 25.4 times larger, it was almost surely drawn in
#: inches and exported without units (1 in = 25.4 mm exactly, ISO 31-1 / NIST SP 811).
INCHES_BELOW_MM = 10.0
MM_PER_INCH = 25.4
#: How far the placed body's lowest x may lie from the inlet face x = 0 (mm): float noise
#: of a placement, far below anything printed.
INLET_FACE_TOL_MM = 1e-4
#: Bytes read to recognise a STEP file before the kernel is asked.
HEAD_BYTES = 64

ALLOWED = "a STEP file (.step or .stp) holding one closed solid in millimetres, its path "\
    "relative to the recipe's folder"


@body_kind("file")
@dataclass(frozen=True)
class FileBody:
    """The one closed solid of the STEP file at ``path`` (relative to the recipe's folder),
    in mm, placed into the recipe's frame: turned about the x axis by ``rotate_deg[0]``,
    then about y by ``rotate_deg[1]``, then about z by ``rotate_deg[2]`` (world axes,
    right-handed, degrees), then moved by ``translate_mm``. Placed, it must start at the
    inlet face (its lowest x on x = 0; a recipe that misses it is told the translation
    that fixes it) and lie along +x like every body. The parting plane defaults to
    ``auto`` (the build chooses it from the body's sections)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        text("path", "STEP file of the body (one closed solid, mm), relative to the "
             "recipe's folder"),
        triple("translate_mm", "moves the body after the turns: [x, y, z]",
               (0.0, 0.0, 0.0)),
        triple("rotate_deg", "turns the body about x, then y, then z (world axes): "
               "[rx, ry, rz]", (0.0, 0.0, 0.0), unit="deg", lo=-360.0, hi=360.0),
    )
    #: A drawn body has no field the parting plane could follow: the build chooses it.
    DEFAULT_PARTING: ClassVar[str] = "auto"
    #: The kind reads a file: a recipe drawn at random cannot name one.
    READS_FILE: ClassVar[bool] = True

    path: str
    translate_mm: tuple[float, float, float]
    rotate_deg: tuple[float, float, float]
    #: The file as read and placed (set by :meth:`read_file`; not a recipe field).
    imported: ImportedBody | None = field(default=None, compare=False, repr=False,
                                          metadata={"derived": True})

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        return []

    def primitives(self) -> tuple[Primitive, ...]:
        if self.imported is None:
            raise ValueError("the body file has not been read (see FileBody.read_file)")
        return (MeshSolid(self.imported),)

    def echo_extra(self) -> dict[str, Any]:
        """What the recipe's echo adds to the fields: the file's SHA-256, so a changed
        drawing changes the recipe's hash (and a sweep rebuilds it)."""
        return {"sha256": self.imported.digest if self.imported is not None else None}

    def read_file(self, base_dir: Path | None, printer: Mapping[str, Any], path: str,
                  lines: Mapping[str, int]) -> tuple[FileBody | None, list[Problem]]:
        """This body with its file read and placed, or the problems that refuse it (on
        ``<path>.path``, or ``<path>.translate_mm`` for a body off the inlet face, with
        their recipe lines). ``printer``: the recipe's printer values (bed and height,
        mm)."""
        line = lines.get(f"{path}.path")
        file = Path(self.path).expanduser()
        if not file.is_absolute():
            file = (base_dir if base_dir is not None else Path.cwd()) / file
        where = f"{path}.path"

        def refuse(message: str, allowed: str = ALLOWED, got: object = self.path
                   ) -> tuple[None, list[Problem]]:
            return None, [Problem(where, message, line, got, allowed)]

        if not file.is_file():
            return refuse(f"names no file (looked for {file})")
        with file.open("rb") as fh:
            head = fh.read(HEAD_BYTES)
        if not looks_like_step(head):
            return refuse("is not a STEP file (it does not open with ISO-10303-21;)")
        reader = body_reader()
        if reader is None:
            return refuse("cannot be read: no body file reader is installed (import "
                          "soft_molds, which installs the CAD kernel's)")
        found = reader(file, self.translate_mm, self.rotate_deg)
        if isinstance(found, BodyFileRefused):
            return refuse(f"{found.reason.value}: found {found.found}")
        problems = _size_problems(found, printer, where, line, self.path)
        if problems:
            return None, problems
        lo_x = found.lo_mm[0]
        if abs(lo_x) > INLET_FACE_TOL_MM:
            t = self.translate_mm
            fix = [_g(t[0] - lo_x), _g(t[1]), _g(t[2])]
            return None, [Problem(f"{path}.translate_mm", f"puts the body's lowest x at "
                                  f"{lo_x:.4g} mm, not on the inlet face x = 0",
                                  lines.get(f"{path}.translate_mm", line),
                                  list(t), f"translate_mm: [{', '.join(fix)}] (the body "
                                  "starts at x = 0 and lies along +x)")]
        return replace(self, imported=found), []


def _g(x: float) -> str:
    return f"{round(x, 6) + 0.0:g}"


def _size_problems(found: ImportedBody, printer: Mapping[str, Any], where: str,
                   line: int | None, got: str) -> list[Problem]:
    """A body drawn in inches, or one far too large for the printer."""
    raw = found.raw_size_mm
    size = tuple(h - lo for lo, h in zip(found.lo_mm, found.hi_mm))
    bed, height = printer.get("bed_mm"), printer.get("height_mm")
    room = sorted((*bed, height)) if bed is not None and height is not None else None
    bed = bed if bed is not None else (float("nan"), float("nan"))
    dims = " x ".join(f"{x:.4g}" for x in raw)
    if max(raw) < INCHES_BELOW_MM and (room is None or _fits(raw, room, MM_PER_INCH)):
        return [Problem(where, f"holds a body only {dims} mm: looks like inches: multiply "
                        f"by {MM_PER_INCH:g} (export the STEP file in millimetres)", line,
                        got, f"a body at least {INCHES_BELOW_MM:g} mm across, drawn in mm")]
    if room is not None and not _fits(size, room, 1.0):
        placed = " x ".join(f"{x:.4g}" for x in size)
        return [Problem(where, f"holds a body {placed} mm after placement, larger than the "
                        f"printer (bed {bed[0]:g} x {bed[1]:g} mm, height {height:g} mm)",
                        line, got, "a body that fits the printer with room for the mold's "
                        "walls (drawn in mm? a smaller body, or printer.bed_mm and "
                        "printer.height_mm)")]
    return []


def _fits(size: tuple[float, ...], room: list[float], scale: float) -> bool:
    """Whether a box of ``size`` times ``scale`` fits ``room`` (sorted dims), turned as
    needed (axis-aligned)."""
    return all(s * scale <= r for s, r in zip(sorted(size), room)) and \
        not any(math.isnan(s) for s in size)
