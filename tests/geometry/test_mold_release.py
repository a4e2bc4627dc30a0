"""Every variant of every bundled recipe opens and holds, checked with manifold3d on the
meshes (its own booleans and connected components, not the code under test).

Opens: demolding takes the upper shell off along its pull, then the lower along its pull,
then the core out of the silicone (nothing rigid is left by then). Each shell, moved along
its pull by any distance up to its own height, overlaps no other rigid part by more than
the noise of coincident faces.

Holds: with the mold closed, the air around and inside it is split into connected pieces.
The core print seats line to line in its seat through the block's inlet wall: a designed
contact, which the two meshes represent only to their chord (the facets of the print and of
its seat, inscribed in the same circle, do not coincide, leaving slivers of at most twice
the chord). The test fills that contact with a cylinder twice the chord proud of the print,
along each print's axis from the recipe (inlet centre, socket diameter) and only through the
wall (x < 0, or beyond the body's length for a socket in the end face), so no real gap is
hidden.
With a lid laid on the top face in pour orientation, the piece that holds the cast must be
closed: about the size of the cast and its pour channels, not joined to the air outside. So
the cavity reaches the outside only through openings in the top face. Without the lid, that
piece joins the outside (the silicone can be poured in).
"""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import pytest
from conftest import built_variant, bundled_variants
from meshes import manifold

VARIANTS = bundled_variants()
VARIANT_IDS = [f"{stem}-{label}" for stem, label in VARIANTS]

#: Overlap accepted between parts that touch face to face (mm3 per mm3 of the smaller
#: part): boolean noise on coincident faces, far below a locked key peg (tens of mm3).
TOUCH_FRACTION = 5e-4
#: How far beyond the closed mold the surrounding air reaches (mm).
MARGIN_MM = 10.0



def _rigid(molds) -> dict[str, m3.Manifold]:
    return {p.name: manifold(p.mesh) for p in molds.parts if p.role != "cast"}


@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_each_shell_pulled_along_its_pull_direction_cuts_no_rigid_part(stem, label):
    molds = built_variant(stem, label)
    rigid = _rigid(molds)
    for part in molds.parts:
        if part.role != "shell":
            continue
        pull = np.asarray(part.pull_dir, dtype=np.float64)
        lo, hi = (np.asarray(c) for c in part.mesh.bbox_mm())
        height = float(abs((hi - lo) @ pull))
        # Small moves find a lock at the contact; larger ones a hook further along.
        for d in (0.05, 0.2, 1.0, 3.0, height / 2.0, height):
            moved = rigid[part.name].translate(list(pull * d))
            for other, solid in rigid.items():
                if other == part.name:
                    continue
                overlap = (moved ^ solid).volume()
                limit = TOUCH_FRACTION * min(solid.volume(), moved.volume())
                assert overlap <= limit, (part.name, other, d, overlap)


def _air(molds, lid: bool) -> tuple[list[m3.Manifold], m3.Manifold]:
    """The connected pieces of air around the closed mold (optionally under a lid on its
    top face), and the cast."""
    rigid = list(_rigid(molds).values())
    r = molds.recipe
    length = r.body_length_mm
    seats = []
    # One seat per core print, through the block's wall at its socket's face.
    for sup in molds.plan.step.core_supports:
        lo, hi = molds.part(sup.part).mesh.bbox_mm()
        seat_r = sup.inlet.socket_diameter_mm / 2.0 + 2.0 * r.mesh.chord_mm
        cy, cz = sup.inlet.center_mm
        x0, x1 = (length + 0.05, hi[0]) if sup.pull_dir[0] > 0 else (lo[0], -0.05)
        seats.append(m3.Manifold.cylinder(x1 - x0, seat_r, seat_r, 96)
                     .rotate([0.0, 90.0, 0.0]).translate([x0, cy, cz]))
    closed = m3.Manifold.batch_boolean([*rigid, *seats], m3.OpType.Add)
    box = closed.bounding_box()
    lo = np.array(box[:3]) - MARGIN_MM
    hi = np.array(box[3:]) + MARGIN_MM
    air = m3.Manifold.cube(list(hi - lo)).translate(list(lo)) - closed
    if lid:
        w = int(np.argmax(np.abs(molds.pour_up)))
        top = box[3 + w]
        lid_lo, lid_hi = lo.copy(), hi.copy()
        lid_lo[w] = top - 0.01  # seals every hole that opens in the top face
        air = air - m3.Manifold.cube(list(lid_hi - lid_lo)).translate(list(lid_lo))
    return air.decompose(), manifold(molds.part("cast").mesh)


def _holding_piece(pieces: list[m3.Manifold], cast: m3.Manifold) -> m3.Manifold:
    """The piece of air that holds the cast (the most of it)."""
    return max(pieces, key=lambda piece: (piece ^ cast).volume())


@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_the_cavity_reaches_the_outside_only_through_the_top(stem, label):
    molds = built_variant(stem, label)
    pieces, cast = _air(molds, lid=True)
    cavity = _holding_piece(pieces, cast)
    # The closed cavity holds the whole cast and, beyond it, only what is poured into the
    # sprue, funnel and vents: nothing joins it to the outside air.
    assert (cavity ^ cast).volume() >= 0.995 * cast.volume()
    fill = molds.volumes_mm3["fill"]
    assert cavity.volume() <= 1.05 * (cast.volume() + fill) + 1.0, (
        cavity.volume(), cast.volume(), fill)


@pytest.mark.parametrize(("stem", "label"), VARIANTS, ids=VARIANT_IDS)
def test_without_a_lid_the_cavity_is_open_to_pour_into(stem, label):
    molds = built_variant(stem, label)
    pieces, cast = _air(molds, lid=False)
    cavity = _holding_piece(pieces, cast)
    # Joined to the outside air through the top openings: far larger than the cast.
    assert cavity.volume() > 3.0 * cast.volume()


def test_the_checks_bite_on_a_mold_set_that_does_not_open_or_hold(finger):
    """The same measures on a deliberately wrong mold: the upper shell pushed down into
    the lower (against its pull) overlaps it; the closed mold without its core leaks out
    through the empty core seat."""
    rigid = _rigid(finger)
    upper = finger.part("shell-upper")
    down = -np.asarray(upper.pull_dir)
    overlap = (rigid["shell-upper"].translate(list(down * 1.0)) ^ rigid["shell-lower"]).volume()
    assert overlap > 100 * TOUCH_FRACTION * rigid["shell-lower"].volume()

    no_core = m3.Manifold.batch_boolean([rigid["shell-lower"], rigid["shell-upper"]],
                                        m3.OpType.Add)
    box = no_core.bounding_box()
    lo, hi = np.array(box[:3]) - MARGIN_MM, np.array(box[3:]) + MARGIN_MM
    air = m3.Manifold.cube(list(hi - lo)).translate(list(lo)) - no_core
    lid_lo = lo.copy()
    lid_lo[2] = box[5] - 0.01
    air = air - m3.Manifold.cube(list(hi - lid_lo)).translate(list(lid_lo))
    cast = manifold(finger.part("cast").mesh)
    cavity = _holding_piece(air.decompose(), cast)
    assert cavity.volume() > 3.0 * cast.volume()  # joined to the outside air
