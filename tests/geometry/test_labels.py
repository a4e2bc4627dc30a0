"""Debossed labels: the stroke font's numbers by hand arithmetic, the engraving tool's
volume and placement against manifold3d's CrossSection (an independent 2-D polygon
library: the same strokes as a union of rectangles and circles), and the cut against
closed-form prism volumes and trimesh's closure checks."""

from __future__ import annotations

import math

import cadquery as cq  # imported once, here; every fixture below builds with it
import numpy as np
import pytest
from manifold3d import CrossSection, OpType

from soft_molds.analysis.integrity import check_mesh
from soft_molds.geometry import kernel
from soft_molds.geometry.labels import OVERSHOOT_MM, deboss, label_solid, settled_stroke
from soft_molds.geometry.tessellate import tessellate
from soft_molds.recipe.strokefont import GLYPHS, text_segments, text_width_mm

H, DEPTH, STROKE = 5.0, 0.6, 1.0  # the project's label defaults
CHARSET = "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-."
# A regular n-gon inscribed in a circle holds sin(2 pi/n) / (2 pi/n) of its area, a
# shortfall of about (2 pi/n)^2 / 6 (Taylor series of sin): 2.5e-5 at n = 512, far under
# the 0.1 % allowed for the polygon error.
CIRCLE_SEGMENTS = 512


def stroke_section(text: str, height: float, stroke: float) -> CrossSection:
    """The engraved area of ``text`` in the text frame (mm), built by manifold3d."""
    segs = text_segments(text, height)
    parts = []
    for a, b in segs:
        d = b - a
        length = float(np.hypot(d[0], d[1]))
        angle = float(np.degrees(np.arctan2(d[1], d[0])))
        parts.append(CrossSection.square((length, stroke)).translate((0.0, -stroke / 2))
                     .rotate(angle).translate((float(a[0]), float(a[1]))))
    for p in {(round(float(x), 9), round(float(y), 9)) for x, y in segs.reshape(-1, 2)}:
        parts.append(CrossSection.circle(stroke / 2, CIRCLE_SEGMENTS).translate(p))
    return CrossSection.batch_boolean(parts, OpType.Add)


def section_centroid(cs: CrossSection) -> tuple[float, float, float]:
    """Area and centroid (mm2, mm, mm) by the shoelace formula over every contour; holes
    come back wound clockwise, so their signed areas subtract."""
    area = cx = cy = 0.0
    for poly in cs.to_polygons():
        p = np.asarray(poly, dtype=np.float64)
        x, y = p[:, 0], p[:, 1]
        xn, yn = np.roll(x, -1), np.roll(y, -1)
        cross = x * yn - xn * y
        area += cross.sum() / 2
        cx += ((x + xn) * cross).sum() / 6
        cy += ((y + yn) * cross).sum() / 6
    return area, cx / area, cy / area


def frame_coords(shape: cq.Shape, origin, right, up) -> np.ndarray:
    """Points on the surface of ``shape`` (a 1 um chord mesh, so arcs are sampled and not
    only their end vertices) in the text frame: along right, up and the normal, mm."""
    o, r, u = (np.asarray(v, dtype=np.float64) for v in (origin, right, up))
    pts = tessellate(shape, 0.001, 5, "label").vertices - o
    return np.column_stack([pts @ r, pts @ u, pts @ np.cross(r, u)])


# ---- stroke font: hand arithmetic --------------------------------------------------------

def test_every_glyph_stays_inside_its_4_by_6_box():
    for char, lines in GLYPHS.items():
        for line in lines:
            assert len(line) >= 2, char  # a lone point would give no stroke to cut
            for x, y in line:
                assert 0.0 <= x <= 4.0 and 0.0 <= y <= 6.0, (char, x, y)


def test_the_label_character_set_is_complete():
    missing = [c for c in CHARSET + " " if c not in GLYPHS]
    assert missing == []
    assert GLYPHS[" "] == ()


def test_text_width_by_hand_arithmetic():
    # Four glyph boxes of 4 units and three gaps of 2 units: 22 units, 1 mm each at 6 mm.
    assert text_width_mm("F2-C", 6.0) == pytest.approx(4 * 4 + 3 * 2, abs=1e-12)
    assert text_width_mm("F2-C", 5.0) == pytest.approx(22 * 5 / 6, abs=1e-12)
    assert text_width_mm("F", 3.0) == pytest.approx(2.0, abs=1e-12)


def test_segments_are_placed_by_advance_and_scaled_by_height():
    # The dash runs from (0.5, 3) to (3.5, 3) in grid units; the second glyph starts one
    # advance (4 + 2 units) later; at 3 mm capitals one unit is 0.5 mm.
    segs = text_segments("t-", 3.0)
    assert segs.shape == (len(text_segments("T", 3.0)) + 1, 2, 2)
    np.testing.assert_allclose(segs[-1], [[3.25, 1.5], [4.75, 1.5]], atol=1e-12)
    np.testing.assert_allclose(text_segments("t-", 3.0), text_segments("T-", 3.0))
    assert text_segments("  ", 5.0).shape == (0, 2, 2)


def test_an_unsupported_character_is_named():
    with pytest.raises(ValueError, match="'#'"):
        text_segments("F#2", 5.0)
    with pytest.raises(ValueError, match="'%'"):
        text_width_mm("5%", 5.0)


def test_no_two_glyphs_are_the_same_set_of_strokes():
    def strokes(lines):
        out = set()
        for line in lines:
            for a, b in zip(line[:-1], line[1:]):
                out.add(tuple(sorted([(float(a[0]), float(a[1])), (float(b[0]), float(b[1]))])))
        return frozenset(out)

    seen: dict[frozenset, str] = {}
    for char, lines in GLYPHS.items():
        key = strokes(lines)
        assert key not in seen, (char, seen.get(key))
        seen[key] = char


@pytest.fixture(scope="module")
def glyph_areas() -> dict[str, CrossSection]:
    return {c: stroke_section(c, H, STROKE) for c in CHARSET}


def test_look_alike_glyphs_differ_in_whole_strokes_once_engraved(glyph_areas):
    # Area engraved in one glyph of a pair but not the other (manifold3d booleans), over the
    # smaller glyph's area, at the default 5 mm / 1 mm stroke. The thresholds are our design
    # rule: 30 % for the classic look-alike pairs, 10 % for any two glyphs.
    def differ(a: str, b: str) -> float:
        sa, sb = glyph_areas[a], glyph_areas[b]
        return ((sa - sb).area() + (sb - sa).area()) / min(sa.area(), sb.area())

    for a, b in ("0O", "1I", "5S", "8B", "2Z"):
        assert differ(a, b) >= 0.30, (a, b, differ(a, b))
    worst = min((differ(a, b), a, b) for i, a in enumerate(CHARSET) for b in CHARSET[i + 1:])
    assert worst[0] >= 0.10, worst


# ---- the engraving tool against manifold3d ------------------------------------------------

@pytest.fixture(scope="module")
def charset_tool() -> cq.Shape:
    return label_solid(CHARSET, (0.0, 0.0, 0.0), (1.0, 0.0, 0.0), (0.0, 1.0, 0.0),
                       H, DEPTH, STROKE, "charset")


def test_every_glyph_is_one_valid_solid(charset_tool):
    assert charset_tool.isValid()
    assert len(charset_tool.Solids()) == len(CHARSET)


def test_tool_volume_is_stroke_area_times_prism_length(charset_tool):
    # A straight prism: V = A * (depth + overshoot) (closed form); A from manifold3d.
    area = stroke_section(CHARSET, H, STROKE).area()
    want = area * (DEPTH + OVERSHOOT_MM)
    assert kernel.volume(charset_tool) == pytest.approx(want, rel=0.005)


# An oblique face: the text runs along (cos 30, sin 30, 0) and up +z, so the outward normal
# right x up is (sin 30, -cos 30, 0).
OBLIQUE = dict(origin=(3.0, -2.0, 1.5), right=(math.cos(math.pi / 6), math.sin(math.pi / 6), 0.0),
               up=(0.0, 0.0, 1.0))


@pytest.fixture(scope="module")
def oblique_tool() -> cq.Shape:
    return label_solid("F2-C", OBLIQUE["origin"], OBLIQUE["right"], OBLIQUE["up"],
                       H, DEPTH, STROKE, "oblique")


def test_tool_centre_is_the_stroke_centroid_placed_in_the_face_frame(oblique_tool):
    # Centroid of a right prism: the section's centroid (manifold3d polygons, shoelace), at
    # the middle of the prism's span along the normal, from -depth to +overshoot.
    area, cx, cy = section_centroid(stroke_section("F2-C", H, STROKE))
    assert area == pytest.approx(stroke_section("F2-C", H, STROKE).area(), rel=1e-9)
    o, r, u = (np.asarray(OBLIQUE[k]) for k in ("origin", "right", "up"))
    want = o + cx * r + cy * u + (OVERSHOOT_MM - DEPTH) / 2 * np.cross(r, u)
    got = np.asarray(oblique_tool.Center().toTuple())
    np.testing.assert_allclose(got, want, atol=2e-3)
    # A mirrored or upside-down label would move the centroid by about its own size.
    assert kernel.volume(oblique_tool) == pytest.approx(area * (DEPTH + OVERSHOOT_MM),
                                                        rel=0.005)


def test_text_reads_along_right_and_up(oblique_tool):
    width = text_width_mm("F2-C", H)
    c = frame_coords(oblique_tool, **OBLIQUE)
    half = STROKE / 2
    chord = 2e-3  # mesh points lie on the surface, at most a chord error inside the arcs
    for axis, lo, hi in ((0, -half, width + half), (1, -half, H + half),
                         (2, -DEPTH, OVERSHOOT_MM)):
        assert lo - 1e-6 <= c[:, axis].min() <= lo + chord, axis
        assert hi - chord <= c[:, axis].max() <= hi + 1e-6, axis

    # The piece nearest the origin along right is the F, equal to an F cut on its own:
    # same volume, same centre, inside the first glyph box (4 units = 10/3 mm wide).
    along = np.asarray(OBLIQUE["right"])
    first = min(oblique_tool.Solids(),
                key=lambda s: float(np.asarray(s.Center().toTuple()) @ along))
    alone = label_solid("F", OBLIQUE["origin"], OBLIQUE["right"], OBLIQUE["up"],
                        H, DEPTH, STROKE, "F")
    assert kernel.volume(first) == pytest.approx(kernel.volume(alone), rel=1e-9)
    np.testing.assert_allclose(first.Center().toTuple(), alone.Center().toTuple(), atol=1e-6)
    cf = frame_coords(first, **OBLIQUE)
    unit = H / 6
    assert cf[:, 0].min() == pytest.approx(-half, abs=chord)
    assert cf[:, 0].max() == pytest.approx(4 * unit + half, abs=chord)
    # F: near the baseline only the stem at x = 0 is cut; near cap height the top bar
    # reaches the box's right edge, while the middle bar stops at 3 units. A mirrored F
    # would have its stem on the right, an upside-down one its long bar at the bottom.
    foot = cf[cf[:, 1] < 0.3 * unit]
    assert foot[:, 0].max() == pytest.approx(half, abs=chord)
    top = cf[cf[:, 1] > 5.7 * unit]
    assert top[:, 0].max() == pytest.approx(4 * unit + half, abs=chord)
    middle = cf[np.abs(cf[:, 1] - 3 * unit) < 0.3 * unit]
    assert middle[:, 0].max() == pytest.approx(3 * unit + half, abs=chord)


# ---- deboss into a block -------------------------------------------------------------------

@pytest.fixture(scope="module")
def debossed():
    block = kernel.box((0.0, 0.0, 0.0), (60.0, 20.0, 15.0))
    # The y = 0 side face: outward normal -y = right x up for right +x, up +z.
    tool = label_solid("F2-C", (20.0, 0.0, 5.0), (1.0, 0.0, 0.0), (0.0, 0.0, 1.0),
                       H, DEPTH, STROKE, "block")
    out, removed = deboss(block, tool, "block", "label", depth_mm=DEPTH)
    return block, tool, out, removed


def test_deboss_removes_exactly_the_tool_inside_the_block(debossed):
    block, tool, out, removed = debossed
    # Prism normal to a flat face: the part inside is depth / (depth + overshoot) of it.
    inside = kernel.volume(tool) * DEPTH / (DEPTH + OVERSHOOT_MM)
    assert 60 * 20 * 15 == pytest.approx(kernel.volume(block), rel=1e-12)
    assert 60 * 20 * 15 - kernel.volume(out) == pytest.approx(inside, rel=0.001)
    assert removed == pytest.approx(inside, rel=0.001)
    assert out.isValid() and len(out.Solids()) == 1


def test_deboss_without_depth_measures_the_tool_inside_the_part(debossed):
    block, tool, out, removed = debossed
    again, removed_again = deboss(block, tool, "block", "label")
    assert removed_again == pytest.approx(removed, rel=1e-9)
    assert kernel.volume(again) == pytest.approx(kernel.volume(out), rel=1e-12)


def test_debossed_block_meshes_watertight(debossed):
    _, _, out, _ = debossed
    report = check_mesh(tessellate(out, 0.02, 12, "block"), "block",
                        brep_volume_mm3=kernel.volume(out))
    assert report.ok, report.failures
    assert report.watertight and report.is_volume and report.bodies == 1


def test_a_label_over_the_edge_of_the_face_is_refused():
    # Half of the text hangs past the block's end: less than the prism formula is removed.
    block = kernel.box((0.0, 0.0, 0.0), (60.0, 20.0, 15.0))
    tool = label_solid("F2-C", (50.0, 0.0, 5.0), (1.0, 0.0, 0.0), (0.0, 0.0, 1.0),
                       H, DEPTH, STROKE, "block")
    with pytest.raises(kernel.GeometryError, match="volume"):
        deboss(block, tool, "block", "label", depth_mm=DEPTH)


# ---- the ends of the documented ranges (marking.height_mm 3-20, stroke_mm 0.5-3) -----------

def _tool_and_cut(text: str, height: float, stroke: float):
    tool = label_solid(text, (0.0, 0.0, 5.0), (1.0, 0.0, 0.0), (0.0, 0.0, 1.0),
                       height, DEPTH, stroke, "range")
    width = text_width_mm(text, height)
    block = kernel.box((-10.0, 0.0, 0.0), (width + 10.0, 20.0, height + 10.0))
    out, removed = deboss(block, tool, "range", "label", depth_mm=DEPTH)
    return tool, out, removed


def test_glyphs_whose_gap_equals_the_stroke_are_joined_with_a_real_overlap():
    # At a 3 mm cap height the glyph gap is 2 units = 1 mm (hand arithmetic), exactly the
    # default stroke: the S's right side (x = 4 units) and the F's stem (x = 6 units) touch.
    segs = text_segments("SF-A", 3.0)
    stroke, groups = settled_stroke(segs, 1.0)
    assert 1.0 < stroke <= 1.0 + 1e-3
    # S and F become one piece; the dash stays 2.5 units = 1.25 mm from both neighbours.
    assert len(groups) == 3
    tool, out, removed = _tool_and_cut("SF-A", 3.0, 1.0)
    assert tool.isValid() and len(tool.Solids()) == 3
    # Prism volume = stroke area (manifold3d) x length, at the width actually cut.
    area = stroke_section("SF-A", 3.0, stroke).area()
    assert kernel.volume(tool) == pytest.approx(area * (DEPTH + OVERSHOOT_MM), rel=0.005)
    assert removed == pytest.approx(area * DEPTH, rel=0.005)
    assert out.isValid() and len(out.Solids()) == 1


@pytest.mark.parametrize("text,height,stroke", [
    ("SF-A", 5.0, 2.0),   # stroke above the 5/3 mm glyph gap: neighbours overlap
    ("SF-A", 6.0, 2.0),   # stroke exactly the 2 mm glyph gap: neighbours touch
    ("SF", 3.0, 3.0),     # widest stroke at the lowest height: the text is one blob
    ("SF-A", 20.0, 0.5),  # tallest, thinnest: every glyph apart
])
def test_every_stroke_in_range_cuts_one_part_removing_the_union_of_strokes(text, height,
                                                                          stroke):
    tool, out, removed = _tool_and_cut(text, height, stroke)
    used, groups = settled_stroke(text_segments(text, height), stroke)
    section = stroke_section(text, height, used)
    # Overlapping glyphs make one piece each: as many solids as manifold3d's union has
    # connected pieces, and the volume of the union, not the sum of the glyphs.
    assert len(tool.Solids()) == len(groups) == len(section.decompose())
    assert kernel.volume(tool) == pytest.approx(section.area() * (DEPTH + OVERSHOOT_MM),
                                                rel=0.005)
    assert out.isValid() and len(out.Solids()) == 1
    assert removed == pytest.approx(section.area() * DEPTH, rel=0.005)
