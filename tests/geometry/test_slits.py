"""Slits cut from a body's top face: the BRep volume each removes against the closed form
of its section (a drafted slot, width x depth widened by the draft, less the two rounded
corners: plane geometry, r^2 (cot(theta/2) - (pi - theta)/2) per corner of inner angle
theta), on constructed boxes; and the demo finger's cast against its body and slits."""

from __future__ import annotations

import math

import pytest

from soft_molds.recipe.cuts import OVERSHOOT_MM, SlitCut

#: The demo's slit: 2.2 mm wide at the face, 3.5 mm deep, 1.5 deg draft, 0.4 mm rounding.
DEMO_SLIT = dict(top_z_mm=7.0, depth_mm=3.5, width_top_mm=2.2, round_mm=0.4, draft_deg=1.5)


def _box_minus(cut: SlitCut, width_y_mm: float) -> tuple[float, float]:
    """(body volume, body less the slit volume), BRep, for a sharp box x in [0, 20],
    y in [-w/2, w/2], z in [-7, 7]."""
    from soft_molds.geometry import kernel as k

    body = k.box((0.0, -width_y_mm / 2.0, -7.0), (20.0, width_y_mm / 2.0, 7.0))
    cut_body = k.cut(body, [k.build_slit(cut, "body")], "body", "cut the slit")
    return k.volume(body), k.volume(cut_body)


@pytest.mark.parametrize("round_mm, draft_deg", [(0.0, 0.0), (0.4, 1.5), (0.8, 5.0)])
def test_a_blind_slit_removes_its_section_times_its_span(round_mm, draft_deg):
    # Span 10 mm inside a 16 mm wide box: the slit ends inside the body at both ends.
    cut = SlitCut(10.0, 0.0, 10.0, 7.0, 3.5, 2.2, round_mm, draft_deg)
    whole, left = _box_minus(cut, 16.0)
    # Closed form: trapezoid (w_bottom + w_top) / 2 x depth less two corner roundings.
    lean = math.tan(math.radians(draft_deg))
    bottom = 2.2 - 2 * 3.5 * lean
    theta = math.pi / 2 + math.radians(draft_deg)
    corner = round_mm ** 2 * (1 / math.tan(theta / 2) - (math.pi - theta) / 2)
    expected = ((bottom + 2.2) / 2 * 3.5 - 2 * corner) * 10.0
    assert whole - left == pytest.approx(expected, rel=1e-3)
    assert cut.removed_mm3() == pytest.approx(expected, rel=1e-12)


def test_a_slit_through_both_side_faces_removes_its_section_times_the_body_width():
    cut = SlitCut(10.0, 0.0, 16.0 + 2.0, **DEMO_SLIT)
    whole, left = _box_minus(cut, 16.0)
    assert whole - left == pytest.approx(cut.removed_mm3(16.0), rel=1e-3)


def test_the_slit_tool_has_the_volume_of_its_whole_section():
    from soft_molds.geometry import kernel as k

    cut = SlitCut(10.0, 0.0, 5.0, **DEMO_SLIT)
    tool = k.build_slit(cut, "body")
    # The tool goes on OVERSHOOT_MM above the face with the same draft.
    assert k.volume(tool) == pytest.approx(
        cut.section_area_mm2(7.0 + OVERSHOOT_MM) * 5.0, rel=1e-6)


def test_the_demo_body_loses_five_slits_between_its_six_chambers():
    """The demo finger: five slits, centred in the gaps of its chamber row, each removing
    from the bar between its section x the bar's flat top (16 - 2 x 2 mm rounded edges) and
    its section x the bar's full width; the cast is the slit body less the void set."""
    from conftest import built

    from soft_molds.geometry import kernel as k
    from soft_molds.geometry.mold import build_body

    ms = built("seedling-slit-finger")
    r = ms.recipe
    cuts = r.outer_cuts()
    assert len(cuts) == 5
    # Gaps between 6 chambers 3.5 mm deep every 8 mm, the row centred on a 62 mm body.
    x0 = (62.0 - (5 * 8.0 + 3.5)) / 2.0
    assert [c.center_x_mm for c in cuts] == pytest.approx(
        [x0 + 3.5 + 4.5 / 2 + 8.0 * i for i in range(5)])
    plain = k.fuse([k.build_primitive(p, "body") for p in r.body_primitives()], "body", "b")
    removed = k.volume(plain) - k.volume(build_body(r))
    per = cuts[0]
    assert per.removed_mm3(12.0) * 5 < removed < per.removed_mm3(16.0) * 5
    v = ms.volumes_mm3
    assert v["body"] == pytest.approx(k.volume(plain) - removed, rel=1e-9)
    assert v["cast"] == pytest.approx(v["body"] - v["void_set"], rel=1e-6)
