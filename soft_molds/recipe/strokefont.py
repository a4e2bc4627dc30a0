"""A single-stroke font of our own for labels engraved into mold parts.

No font file is needed: a fresh machine may have no system fonts, and the kernel's text
command fails without one. Each glyph is a few polylines on a grid 4 units wide and 6 units
tall (baseline y = 0, cap height y = 6); a label is cut by sweeping a round tool along them.

Design rules, because the tool is fat compared with the letters (1.0 mm stroke on a 5 mm
cap height is 1.2 grid units):

- parallel strokes of one glyph are at least 3 units apart, so counters stay open;
- round letters are octagons: a round tool turns their corners into arcs anyway;
- look-alike pairs differ in a whole stroke, not a detail: the zero is slashed and has
  steeper corners than the O, the one has a flag where the I has a bar, the five has a
  square top-left corner, the eight crosses at its waist where the B has a straight stem,
  the two has a round shoulder where the Z has a square corner;
- strokes of one glyph overlap or cross, never run side by side on top of each other,
  so every glyph is one connected piece and its tool fuses into one solid.

Frame of :func:`text_segments`: mm, x to the right along the line, y up, the first glyph
box starting at x = 0 on the baseline y = 0.
"""

from __future__ import annotations

import numpy as np

Point = tuple[float, float]
Polyline = tuple[Point, ...]

#: Glyph box in grid units.
GLYPH_WIDTH = 4.0
GLYPH_HEIGHT = 6.0
#: Empty space between neighbouring glyph boxes, grid units.
GLYPH_GAP = 2.0
ADVANCE = GLYPH_WIDTH + GLYPH_GAP

GLYPHS: dict[str, tuple[Polyline, ...]] = {
    "A": (((0, 0), (0, 4), (2, 6), (4, 4), (4, 0)), ((0, 2.5), (4, 2.5))),
    "B": (((0, 3), (3, 3), (4, 4), (4, 5), (3, 6), (0, 6), (0, 0), (3, 0), (4, 1), (4, 2),
           (3, 3)),),
    "C": (((4, 4.75), (2.75, 6), (1.5, 6), (0, 4.5), (0, 1.5), (1.5, 0), (2.75, 0),
           (4, 1.25)),),
    "D": (((0, 0), (0, 6), (2, 6), (4, 4), (4, 2), (2, 0), (0, 0)),),
    "E": (((4, 6), (0, 6), (0, 0), (4, 0)), ((0, 3), (3, 3))),
    "F": (((4, 6), (0, 6), (0, 0)), ((0, 3), (3, 3))),
    "G": (((4, 4.75), (2.75, 6), (1.5, 6), (0, 4.5), (0, 1.5), (1.5, 0), (2.5, 0),
           (4, 1.5), (4, 3), (2, 3)),),
    "H": (((0, 0), (0, 6)), ((4, 0), (4, 6)), ((0, 3), (4, 3))),
    "I": (((0.5, 6), (3.5, 6)), ((2, 6), (2, 0)), ((0.5, 0), (3.5, 0))),
    "J": (((1.5, 6), (4, 6), (4, 1.5), (2.5, 0), (1.5, 0), (0, 1.5), (0, 2)),),
    "K": (((0, 0), (0, 6)), ((4, 6), (0, 2)), ((1.5, 3.5), (4, 0))),
    "L": (((0, 6), (0, 0), (4, 0)),),
    "M": (((0, 0), (0, 6), (2, 3), (4, 6), (4, 0)),),
    "N": (((0, 0), (0, 6), (4, 0), (4, 6)),),
    "O": (((1.5, 0), (0, 1.5), (0, 4.5), (1.5, 6), (2.5, 6), (4, 4.5), (4, 1.5), (2.5, 0),
           (1.5, 0)),),
    "P": (((0, 0), (0, 6), (3, 6), (4, 5), (4, 4), (3, 3), (0, 3)),),
    "Q": (((1.5, 0), (0, 1.5), (0, 4.5), (1.5, 6), (2.5, 6), (4, 4.5), (4, 1.5), (2.5, 0),
           (1.5, 0)), ((2.5, 2), (4, 0))),
    "R": (((0, 0), (0, 6), (3, 6), (4, 5), (4, 4), (3, 3), (0, 3)), ((2, 3), (4, 0))),
    "S": (((4, 5), (3, 6), (1, 6), (0, 5), (0, 4), (1, 3), (3, 3), (4, 2), (4, 1), (3, 0),
           (1, 0), (0, 1)),),
    "T": (((0, 6), (4, 6)), ((2, 6), (2, 0))),
    "U": (((0, 6), (0, 1.5), (1.5, 0), (2.5, 0), (4, 1.5), (4, 6)),),
    "V": (((0, 6), (2, 0), (4, 6)),),
    "W": (((0, 6), (0, 0), (2, 3), (4, 0), (4, 6)),),
    "X": (((0, 0), (4, 6)), ((0, 6), (4, 0))),
    "Y": (((0, 6), (2, 3), (4, 6)), ((2, 3), (2, 0))),
    "Z": (((0, 6), (4, 6), (0, 0), (4, 0)),),
    "0": (((1, 0), (0, 2), (0, 4), (1, 6), (3, 6), (4, 4), (4, 2), (3, 0), (1, 0)),
          ((0.5, 1), (3.5, 5))),
    "1": (((0.5, 4.5), (2, 6), (2, 0)), ((0.5, 0), (3.5, 0))),
    "2": (((0, 4.5), (1.5, 6), (2.5, 6), (4, 4.5), (4, 4), (0, 0), (4, 0)),),
    "3": (((0, 5), (1, 6), (3, 6), (4, 5), (4, 4), (3, 3), (1.5, 3)),
          ((3, 3), (4, 2), (4, 1), (3, 0), (1, 0), (0, 1))),
    "4": (((0, 6), (0, 2), (4, 2)), ((3, 6), (3, 0))),
    "5": (((4, 6), (0, 6), (0, 3.5), (3, 3.5), (4, 2.5), (4, 1), (3, 0), (0, 0)),),
    "6": (((4, 5), (3, 6), (1, 6), (0, 5), (0, 1), (1, 0), (3, 0), (4, 1), (4, 2.5),
           (3, 3.5), (0, 3.5)),),
    "7": (((0, 6), (4, 6), (1.5, 0)),),
    # Figure of eight: one closed line that crosses itself at the waist (2, 3).
    "8": (((2, 3), (0.5, 4.5), (0.5, 5), (1.5, 6), (2.5, 6), (3.5, 5), (3.5, 4.5), (2, 3),
           (0, 1.75), (0, 1), (1, 0), (3, 0), (4, 1), (4, 1.75), (2, 3)),),
    "9": (((0, 1), (1, 0), (3, 0), (4, 1), (4, 5), (3, 6), (1, 6), (0, 5), (0, 3.5), (1, 2.5),
           (4, 2.5)),),
    "-": (((0.5, 3), (3.5, 3)),),
    # A short dash on the baseline: a lone point would leave a tool with no stroke.
    ".": (((1.5, 0.5), (2.5, 0.5)),),
    " ": (),
}


def _glyph(char: str) -> tuple[Polyline, ...]:
    key = char.upper()
    if key not in GLYPHS:
        raise ValueError(f"the label font has no glyph for {char!r}; "
                         f"supported: A-Z, 0-9, '-', '.' and space")
    return GLYPHS[key]


def text_segments(text: str, height_mm: float) -> np.ndarray:
    """Every straight stroke of ``text`` as an array (n, 2, 2) of segment end points, mm.

    Frame: x to the right along the line, y up; the first glyph box starts at x = 0 on the
    baseline y = 0. The cap height is ``height_mm``, one grid unit is ``height_mm / 6``,
    and each character advances 4 + 2 units. Lowercase letters are cut as capitals; any
    other character without a glyph raises :class:`ValueError` naming it.
    """
    if height_mm <= 0:
        raise ValueError(f"label height must be positive, got {height_mm} mm")
    scale = height_mm / GLYPH_HEIGHT
    segs: list[tuple[Point, Point]] = []
    for i, char in enumerate(text):
        x0 = i * ADVANCE
        for line in _glyph(char):
            for (ax, ay), (bx, by) in zip(line[:-1], line[1:]):
                segs.append(((x0 + ax, ay), (x0 + bx, by)))
    if not segs:
        return np.zeros((0, 2, 2))
    return np.asarray(segs, dtype=np.float64) * scale


def text_width_mm(text: str, height_mm: float) -> float:
    """Length along the line (mm) from x = 0 to the right edge of the last glyph box, with
    no spacing after it; the stroke's own half width is not included."""
    for char in text:
        _glyph(char)
    if not text:
        return 0.0
    return (len(text) * ADVANCE - GLYPH_GAP) * height_mm / GLYPH_HEIGHT
