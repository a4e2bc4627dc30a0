"""A body read from the user's own CAD file, as the recipe stage sees it.

The recipe stage may not touch the CAD kernel, yet a ``file`` body must be read and checked
while the recipe is validated (one closed solid, its volume and bounds). So the stage
declares what it needs here, a reader taking (file, placement) to an :class:`ImportedBody`
or a :class:`BodyFileRefused`, and the package (a driver, ``soft_molds/__init__.py``)
installs the geometry stage's reader with :func:`use_body_reader` when it is imported.
Every way into the recipe stage imports the package first, so the reader is always there;
without one (a stage used on its own) a ``file`` body is refused, not half read.

Frame: mm, the recipe's world frame after placement (see ``recipe/kinds/file.py``).
"""

from __future__ import annotations

import enum
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from ..meshdata import TriMesh

Triple = tuple[float, float, float]


@dataclass(frozen=True, eq=False)
class ImportedBody:
    """One closed solid read from a file and placed: its triangle mesh (``mesh``, mm,
    placed, outward-wound, chord ``chord_mm`` to the BRep), the BRep's own volume (mm3) and
    exact placed bounds ``lo_mm``/``hi_mm``, its extents as the file drew it
    (``raw_size_mm``, before rotation) and the SHA-256 of the file's bytes (``digest``:
    the BRep is kept in the geometry stage's cache under it, and it goes into the recipe's
    echo, so a changed file changes the recipe's hash)."""

    path: str
    digest: str
    translate_mm: Triple
    rotate_deg: Triple
    mesh: TriMesh
    chord_mm: float
    volume_mm3: float
    lo_mm: Triple
    hi_mm: Triple
    raw_size_mm: Triple


class Refusal(enum.Enum):
    """Why a file gives no usable body."""

    NOT_STEP = "is not a STEP file"
    UNREADABLE = "is a STEP file the reader could not read"
    EMPTY = "holds no solid"
    SEVERAL = "holds more than one solid"
    OPEN = "holds no closed solid"
    INVALID = "holds a solid the kernel finds invalid"


@dataclass(frozen=True)
class BodyFileRefused:
    """A file the reader refused: why, and what it found (for the message's ``got``)."""

    reason: Refusal
    found: str


BodyReader = Callable[[Path, Triple, Triple], "ImportedBody | BodyFileRefused"]

_READERS: list[BodyReader] = []


def use_body_reader(reader: BodyReader) -> None:
    """Install the reader of body files (the geometry stage's, installed by the package)."""
    _READERS[:] = [reader]


def body_reader() -> BodyReader | None:
    return _READERS[0] if _READERS else None


#: The first bytes of every STEP file (ISO 10303-21, clause 5: the exchange structure
#: opens with this keyword). Checked before the kernel is asked, so a text file or an STL
#: under a .step name is refused at once.
STEP_MAGIC = b"ISO-10303-21;"


def looks_like_step(head: bytes) -> bool:
    """Whether a file's first bytes open a STEP exchange structure (leading white space
    and a UTF-8 byte order mark allowed)."""
    return head.lstrip(b"\xef\xbb\xbf").lstrip().startswith(STEP_MAGIC)
