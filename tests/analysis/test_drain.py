"""The ``drain`` check of a dissolved core: standing inlet-down, every void drains to its
socket unless a pocket's only way out lies above it.

References: constructed cases whose answer is known by hand: a bore with a chamber
crossing it drains whole; an inverted U (up one leg, across the top, down the other) keeps
the second leg below the crossing, a cylinder of volume pi r^2 h (closed form), found at
that leg's foot. The grid's cubes are 0.5 mm, so volumes agree to a few per cent.
"""

from __future__ import annotations

import math

import pytest
from conftest import built_variant
from recipe_text import edit

from soft_molds import build
from soft_molds.export.formats import output_formats
from soft_molds.plan.drain import drainage
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.primitives import RoundedBox, RoundedRod

SOCKET = RoundedRod("x", 0.0, 6.0, (0.0, 0.0), 2.0)


def test_a_bore_with_a_chamber_across_it_drains_whole():
    bore = RoundedRod("x", 0.0, 40.0, (0.0, 0.0), 3.0)
    chamber = RoundedBox((22.5, 0.0, 0.0), (5.0, 16.0, 8.0))
    d = drainage([bore, chamber], SOCKET, at_end=False)
    assert d.pocket_mm3 == 0.0 and d.where_mm is None
    # Sampled volume against the closed form of the union (cylinder + box - their overlap).
    want = math.pi * 9 * 40 + 5 * 16 * 8 - math.pi * 9 * 5
    assert d.void_mm3 == pytest.approx(want, rel=0.03)


def test_the_far_leg_of_an_inverted_u_is_found_as_a_pocket_at_its_foot():
    up = RoundedRod("x", 0.0, 40.0, (0.0, 0.0), 2.0)
    across = RoundedBox((40.0, 5.0, 0.0), (4.0, 14.0, 4.0))     # x 38..42, y -2..12
    down = RoundedRod("x", 10.0, 30.0, (10.0, 0.0), 2.0)        # x 10..40 at y = 10
    d = drainage([up, across, down], SOCKET, at_end=False)
    # The far leg below the crossing (x 10 to 38) cannot climb to it.
    assert d.pocket_mm3 == pytest.approx(math.pi * 4 * 28, rel=0.06)
    assert d.where_mm is not None
    x, y, z = d.where_mm
    assert x == pytest.approx(10.25, abs=0.3) and y == pytest.approx(10.0, abs=2.0)
    assert abs(z) <= 2.0


def test_on_the_far_face_the_pocket_is_found_at_its_foot_there():
    # The mirror image: the socket in the x = 42 face, which the part stands on, the legs
    # joined at x 0..4 (now the top). The second leg (x 2..32) cannot climb to the
    # crossing: a pocket from x 4 to 32, its foot (lowest, standing on x = 42) at x = 32.
    socket = RoundedRod("x", 36.0, 6.0, (0.0, 0.0), 2.0)
    up = RoundedRod("x", 0.0, 42.0, (0.0, 0.0), 2.0)
    across = RoundedBox((2.0, 5.0, 0.0), (4.0, 14.0, 4.0))
    down = RoundedRod("x", 2.0, 30.0, (10.0, 0.0), 2.0)
    d = drainage([up, across, down], socket, at_end=True)
    assert d.pocket_mm3 == pytest.approx(math.pi * 4 * 28, rel=0.06)
    assert d.where_mm is not None and d.where_mm[0] == pytest.approx(31.75, abs=0.3)


def test_the_wide_pad_tears_its_inlet_when_pulled_and_drains_when_dissolved():
    # The bundled tray-lift pad: one 55 x 44 x 6 mm chamber behind a 5 mm socket.
    m = built_variant("tray-lift-pad", "A")
    names = [f.check for f in m.findings]
    assert "core-extraction" not in names and m.errors == ()
    (drain,) = [f for f in m.findings if f.check == "drain"]
    assert drain.severity.value == "info" and drain.value == 0.0
    card = output_formats()["casting-card"].encode(m, m.manifest())
    text = b"".join(card.values()).decode()
    assert "Dissolve the core" in text and "draw the core out" not in text
    # Pulled, the same core would stretch the inlet past the grade's elongation at break
    # (the section's perimeter, a 44 x 6 mm rectangle with 1 mm corner rounding,
    # 2 (44 + 6) - (8 - 2 pi) = 98.28 mm, against the socket's pi 5 = 15.71 mm: 6.26 x),
    # and the refusal names the way out.
    pulled = recipe_from_text(edit(open(m.recipe.source).read(), "  kind: dissolved",
                                   "  kind: pulled"), "pulled.yaml", "tray-lift-pad")
    err = [f for f in build(pulled).findings if f.check == "core-extraction"]
    assert err and err[0].severity.value == "error"
    perimeter = 2 * (44 + 6) - (8 - 2 * math.pi) * 1.0
    assert err[0].value == pytest.approx(perimeter / (math.pi * 5), rel=2e-3)
    assert "core.kind: dissolved" in err[0].message
