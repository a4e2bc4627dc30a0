"""The fin checks on constructed fins and on the demo's built upper shell.

``fin-print``: constructed slits whose fin tip is (a) thicker than the printed wall and
short, (b) thinner than the wall, (c) thinner than two nozzle widths, (d) tall for its
thickness; the printer values are the printability check's defaults (4 x 0.4 mm
perimeters, common practice). ``fin-draft``: the least draft of fin walls measured on
meshes made by trimesh's convex hull (an independent library) of a drafted, a straight
and a reversed fin, against asin(-n . pull) worked out by hand; on the demo it is the
recipe's 1.5 deg. ``silicone-wall``: the existing wall check sees the thinner wall
between slit and chamber (closed form below).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from soft_molds.analysis.checks.fin_draft import fin_draft_findings, fin_drafts
from soft_molds.analysis.checks.fin_print import (
    FIN_ASPECT_ERROR,
    FIN_ASPECT_WARN,
    fin_print_findings,
)
from soft_molds.analysis.findings import Severity
from soft_molds.analysis.printability import DEFAULT_PRINTER
from soft_molds.meshdata import TriMesh
from soft_molds.recipe.cuts import SlitCut


def _slit(width_mm: float, depth_mm: float, draft_deg: float = 0.0) -> SlitCut:
    return SlitCut(10.0, 0.0, 18.0, 7.0, depth_mm, width_mm, 0.0, draft_deg)


def _severities(cut: SlitCut) -> list[tuple[Severity, float]]:
    return [(f.severity, f.value) for f in fin_print_findings([cut], DEFAULT_PRINTER)]


def test_a_fin_thicker_than_the_printed_wall_and_short_passes():
    # Tip 2.2 - 2 x 3.5 tan 1.5 deg = 2.0167 mm >= 1.6 mm; 3.5 / 2.0167 = 1.74 <= 8.
    [(sev, value)] = _severities(_slit(2.2, 3.5, 1.5))
    assert sev is Severity.INFO
    assert value == pytest.approx(2.2 - 7 * math.tan(math.radians(1.5)), rel=1e-12)


def test_a_fin_thinner_than_the_printed_wall_is_a_warning():
    [(sev, value)] = _severities(_slit(1.2, 3.0))
    assert (sev, value) == (Severity.WARNING, pytest.approx(1.2))


def test_a_fin_thinner_than_two_nozzle_widths_is_an_error():
    # 0.7 mm < 2 x 0.4 mm; its ratio 3 / 0.7 = 4.3 stays below the aspect limit.
    [(sev, value)] = _severities(_slit(0.7, 3.0))
    assert (sev, value) == (Severity.ERROR, pytest.approx(0.7))


def test_a_fin_too_tall_for_its_thickness_is_a_warning_then_an_error():
    # 2 mm thick: 18 mm tall is ratio 9 (> 8), 26 mm tall ratio 13 (> 12).
    [(sev, ratio)] = _severities(_slit(2.0, 18.0))
    assert (sev, ratio) == (Severity.WARNING, pytest.approx(9.0))
    assert FIN_ASPECT_WARN < ratio < FIN_ASPECT_ERROR
    [(sev, ratio)] = _severities(_slit(2.0, 26.0))
    assert (sev, ratio) == (Severity.ERROR, pytest.approx(13.0))


def test_no_slits_no_fin_findings():
    assert fin_print_findings([], DEFAULT_PRINTER) == []


def _fin_mesh(top_half_mm: float, tip_half_mm: float) -> TriMesh:
    """A fin as trimesh's convex hull: x half-width ``top_half_mm`` at its root z = 7,
    ``tip_half_mm`` at its tip z = 3.5, y in [-9, 9] (the shell above it left out)."""
    import trimesh

    pts = [(sx * h, y, z) for sx in (-1, 1) for y in (-9.0, 9.0)
           for h, z in ((top_half_mm, 7.0), (tip_half_mm, 3.5))]
    hull = trimesh.convex.convex_hull(np.array(pts) + [10.0, 0.0, 0.0])
    return TriMesh(hull.vertices, hull.faces)


@pytest.mark.parametrize("tip_half, expected_deg, severity", [
    (0.9, math.degrees(math.atan(0.1 / 3.5)), Severity.INFO),   # drafted: 1.64 deg
    (1.0, 0.0, Severity.WARNING),                               # straight: no draft
    (1.1, -math.degrees(math.atan(0.1 / 3.5)), Severity.ERROR),  # wider at the tip
])
def test_fin_draft_measured_on_a_mesh(tip_half, expected_deg, severity):
    # The slit the fin fills: 2.2 mm wide at the top, straight, so every case's walls
    # lie within it (the pick tolerance is 0.05 mm; the reversed fin reaches 1.1).
    cut = SlitCut(10.0, 0.0, 18.0, 7.0, 3.5, 2.2, 0.0, 0.0)
    least, where = fin_drafts(_fin_mesh(1.0, tip_half), [cut], (0.0, 0.0, 1.0), (-8.0, 8.0))
    assert least == pytest.approx(expected_deg, abs=1e-9)
    [f] = fin_draft_findings(least, where, 0.5)
    assert f.severity is severity


def test_the_demo_fins_have_the_recipes_draft_and_print(bundled):
    ms = bundled("seedling-slit-finger")
    by = {f.check: f for f in ms.review.findings if f.check.startswith("fin-")}
    assert by["fin-draft"].severity is Severity.INFO
    # Tessellated planar walls: the draft is the recipe's 1.5 deg to round-off.
    assert by["fin-draft"].value == pytest.approx(1.5, abs=1e-3)
    assert by["fin-print"].severity is Severity.INFO
    assert by["fin-print"].value == pytest.approx(2.2 - 7 * math.tan(math.radians(1.5)))


def test_the_wall_check_sees_the_wall_between_slit_and_chamber(bundled):
    """The thinnest outer wall of the demo is beside a slit: half the gap (4.5 mm) less
    the slit's half-width at the top of the chamber's flat end face (z = 1 + 4 - 1 = 4;
    half-width 2.0167 / 2 + 0.5 tan 1.5 deg = 1.0214 mm): 1.2286 mm, to the check's
    0.05 mm resolution. The same finger without slits has 2 mm side walls."""
    from soft_molds.analysis.walls import RESOLUTION_MM

    ms = bundled("seedling-slit-finger")
    [f] = [f for f in ms.review.findings
           if f.check == "silicone-wall" and "outer" in f.message]
    half = (2.2 - 7 * math.tan(math.radians(1.5))) / 2 + 0.5 * math.tan(math.radians(1.5))
    assert f.value == pytest.approx(4.5 / 2 - half, abs=RESOLUTION_MM + 0.01)
    cuts = ms.recipe.outer_cuts()
    assert min(abs(f.where_mm[0] - c.center_x_mm) for c in cuts) < 2.25


def test_an_opening_over_a_slit_is_an_error_and_one_beside_it_is_not():
    """Disc against rectangle (plane geometry): a 2 mm vent 1.5 mm from a 2.2 mm slit's
    centre line reaches 1 - (1.5 - 1.1) = 0.6 mm over it; at 2.2 mm it keeps 0.1 mm off."""
    from soft_molds.analysis.checks.fin_print import fin_opening_findings
    from soft_molds.plan.model import Opening, OpeningKind

    cut = SlitCut(10.0, 0.0, 18.0, 7.0, 3.5, 2.2, 0.4, 1.5)
    over = Opening(OpeningKind.VENT, (11.5, 0.0, 7.0), 1.0)
    beside = Opening(OpeningKind.VENT, (12.2, 0.0, 7.0), 1.0)
    [f] = fin_opening_findings([cut], [over, beside])
    assert f.severity is Severity.ERROR
    assert f.value == pytest.approx(0.6)
    assert fin_opening_findings([cut], [beside]) == []


def test_a_motion_section_through_a_slit_has_no_silicone_in_it(bundled):
    """The bending model reads its sections off the cast mesh (analysis/motion/sections.py),
    so a section at a slit's centre line (x = 15 mm) is the bar's rounded rectangle less
    the slit above z = 3.5 (16 mm wide: the bar's two top edges, rounded 2 mm, already
    lack (1 - pi/4) 4 mm2 each) less the 2 mm feed channel; closed form, to the mesh chord
    (0.5 %)."""
    from soft_molds.analysis.motion.sections import cut_sections

    ms = bundled("seedling-slit-finger")
    cast = next(p for p in ms.parts if p.name == "cast").mesh
    corner = (1 - math.pi / 4) * 2.0 ** 2
    bar = 16 * 14 - 4 * corner
    slit = 16 * 3.5 - 2 * corner
    feed = math.pi * 1.0 ** 2
    [s] = cut_sections(cast, np.array([15.0]), np.zeros(len(cast.faces), dtype=bool))
    assert s.silicone_area_mm2 == pytest.approx(bar - slit - feed, rel=5e-3)
