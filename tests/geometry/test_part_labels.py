"""Labels cut into the printed parts of a real mold set (test recipe of the demo
scenario): the volume they remove is the volume of the glyph solids (built separately and
checked against an independent 2-D union), they stay clear of the cavity, and every mesh
stays closed."""

from __future__ import annotations

import manifold3d as m3
import numpy as np
import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds import build
from soft_molds.geometry import kernel, labels
from soft_molds.recipe import recipe_from_text
from soft_molds.recipe.strokefont import text_segments


@pytest.fixture(scope="module")
def pair():
    on = build(recipe_from_text(FINGER_TEXT, "finger-test.yaml", "finger-test"))
    text = edit(FINGER_TEXT, "checks:\n", "marking:\n  mode: none\nchecks:\n")
    off = build(recipe_from_text(text, "finger-test.yaml", "finger-test"))
    return on, off


def _tool_inside_volume(lab, depth: float) -> float:
    """Volume of the glyph prism below the face: the 2-D union of the strokes (manifold3d
    CrossSection: rectangles and round joints) times the cut depth (elementary geometry)."""
    segs = text_segments(lab.text, lab.height_mm)
    stroke = 1.0
    parts = []
    for a, b in segs:
        d = b - a
        length = float(np.hypot(d[0], d[1]))
        angle = float(np.degrees(np.arctan2(d[1], d[0])))
        parts.append(m3.CrossSection.square((length, stroke)).translate((0.0, -stroke / 2))
                     .rotate(angle).translate((float(a[0]), float(a[1]))))
    for p in {(round(float(x), 9), round(float(y), 9)) for x, y in segs.reshape(-1, 2)}:
        parts.append(m3.CrossSection.circle(stroke / 2, 512).translate(p))
    return m3.CrossSection.batch_boolean(parts, m3.OpType.Add).area() * depth


def test_each_part_carries_the_tag_and_variant_label(pair):
    on, _ = pair
    man = on.manifest().to_json()
    assert [(x["part"], x["text"]) for x in man["labels"]] == [
        ("shell-lower", "FT A"), ("shell-upper", "FT A"), ("core", "FT A")]
    assert all(x["height_mm"] >= 5.0 and x["depth_mm"] >= 0.6 for x in man["labels"])


def test_shell_labels_remove_exactly_the_glyph_volume(pair):
    on, off = pair
    for name in ("shell-lower", "shell-upper"):
        lab = next(x for x in on.labels if x.part == name)
        removed = off.part(name).brep_volume_mm3 - on.part(name).brep_volume_mm3
        # the same glyphs built as a kernel solid on their own, 0.2 mm proud of the face
        tool = labels.label_solid(lab.text, (0, 0, 0), (1, 0, 0), (0, 1, 0), lab.height_mm,
                                  0.6, 1.0)
        assert removed == pytest.approx(kernel.volume(tool) * 0.6 / 0.8, rel=1e-6)
        assert removed == pytest.approx(_tool_inside_volume(lab, 0.6), rel=2e-3)


def test_the_core_grows_by_its_grip_tab_less_the_label(pair):
    on, off = pair
    from soft_molds.geometry.mold import core_tag

    step = on.plan.step
    lo, hi = core_tag(on.recipe, step.core_supports[0], step.settled_parting)
    tab = float(np.prod(np.subtract(hi, lo)))
    lab = next(x for x in on.labels if x.part == "core")
    grown = on.part("core").brep_volume_mm3 - off.part("core").brep_volume_mm3
    assert grown == pytest.approx(tab - _tool_inside_volume(lab, 0.6), rel=1e-3)


def test_labels_stay_clear_of_the_cavity_and_the_meshes_stay_closed(pair):
    on, _ = pair
    lo_c, hi_c = on.part("cast").mesh.bbox_mm()
    for lab in on.labels:
        lo, hi = lab.box
        # clear of the cast part by at least a printed wall (4 x 0.4 mm, common practice)
        gap = max(max(lo_c[i] - hi[i], lo[i] - hi_c[i]) for i in range(3))
        assert gap >= 1.6, (lab.part, gap)
    for p in on.parts:
        assert p.report.ok and p.report.watertight, p.name
        mesh = m3.Mesh(vert_properties=np.asarray(p.mesh.vertices, dtype=np.float32),
                       tri_verts=np.asarray(p.mesh.faces, dtype=np.uint32))
        assert m3.Manifold(mesh).status() == m3.Error.NoError  # independent closure check


def _union_area(text: str, height: float, stroke: float) -> float:
    """Area of the 2-D union of the strokes at ``stroke`` width (manifold3d, mm2)."""
    segs = text_segments(text, height)
    parts = []
    for a, b in segs:
        d = b - a
        parts.append(m3.CrossSection.square((float(np.hypot(d[0], d[1])), stroke))
                     .translate((0.0, -stroke / 2))
                     .rotate(float(np.degrees(np.arctan2(d[1], d[0]))))
                     .translate((float(a[0]), float(a[1]))))
    for p in {(round(float(x), 9), round(float(y), 9)) for x, y in segs.reshape(-1, 2)}:
        parts.append(m3.CrossSection.circle(stroke / 2, 512).translate(p))
    return m3.CrossSection.batch_boolean(parts, m3.OpType.Add).area()


@pytest.mark.parametrize("height,stroke", [
    (3.0, 1.0),   # the lowest height: the glyph gap (1 mm) equals the stroke
    (5.0, 1.69),  # a stroke just over the 5/3 mm glyph gap: neighbours overlap
    (5.0, 3.0),   # the widest stroke
])
def test_the_core_takes_labels_at_the_ends_of_the_marking_ranges(height, stroke):
    from soft_molds.geometry import mold
    from soft_molds.plan import plan_mold

    text = edit(FINGER_TEXT, "checks:\n",
                f"marking:\n  height_mm: {height}\n  stroke_mm: {stroke}\nchecks:\n")
    r = recipe_from_text(text, "finger-test.yaml", "finger-test")
    step = plan_mold(r).step
    bare = mold.build_cast(r, step).core
    core, lab = mold.label_core(r, step, bare)
    assert lab is not None and lab.height_mm == pytest.approx(height, abs=1e-9)
    assert core.isValid() and len(core.Solids()) == 1
    lo, hi = mold.core_tag(r, step.core_supports[0], step.settled_parting)
    tab = float(np.prod(np.subtract(hi, lo)))
    used, _ = labels.settled_stroke(text_segments(lab.text, lab.height_mm), stroke)
    # bare core + tab (a box, closed form) - glyph prism (union area x depth, manifold3d)
    want = kernel.volume(bare) + tab - _union_area(lab.text, lab.height_mm, used) * 0.6
    assert kernel.volume(core) == pytest.approx(want, rel=1e-3)
