"""Packing posed parts onto printer beds (soft_molds.analysis.plates), on boxes whose
answers are known in closed form.

Overlap and bounds are checked exactly on axis-aligned boxes with numpy: the packer places
footprint boxes, and two disjoint boxes hold disjoint footprints."""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest

from soft_molds.analysis.plates import (
    PLATE_GAP_MM,
    PlateItem,
    pack_plates,
    placed_vertices,
    posed_vertices,
)
from soft_molds.analysis.printability import print_rotation

BED = (220.0, 220.0)


def box_vertices(sx: float, sy: float, sz: float) -> np.ndarray:
    return np.array(list(itertools.product((0.0, sx), (0.0, sy), (0.0, sz))))


def item(group: str, part: str, sx: float, sy: float, sz: float = 10.0) -> PlateItem:
    return PlateItem(group, part, posed_vertices(box_vertices(sx, sy, sz) + 7.0,
                                                 (0.0, 0.0, -1.0), 0.0))


def boxes(groups, plates):
    items = {(it.group, it.part): it for g in groups for it in g}
    out = []
    for p in plates.placements:
        v = placed_vertices(items[(p.group, p.part)], p)
        out.append((p.plate, v.min(axis=0), v.max(axis=0)))
    return out


def assert_on_beds_apart(groups, plates, gap=PLATE_GAP_MM):
    got = boxes(groups, plates)
    for _, lo, hi in got:
        assert lo[0] >= -1e-9 and lo[1] >= -1e-9 and lo[2] == pytest.approx(0.0, abs=1e-9)
        assert hi[0] <= BED[0] + 1e-9 and hi[1] <= BED[1] + 1e-9
    for (pa, la, ha), (pb, lb, hb) in itertools.combinations(got, 2):
        if pa != pb:
            continue
        # separated along x or y by at least the gap
        sep = max(lb[0] - ha[0], la[0] - hb[0], lb[1] - ha[1], la[1] - hb[1])
        assert sep >= gap - 1e-9


def test_the_print_rotation_puts_down_on_minus_z_and_turns_counter_clockwise():
    for down in [(0, 0, -1), (0, 0, 1), (1, 0, 0), (0, -1, 0), (0.6, 0.0, 0.8)]:
        r = print_rotation(down, 30.0)
        np.testing.assert_allclose(r @ r.T, np.eye(3), atol=1e-12)  # a rotation
        assert np.linalg.det(r) == pytest.approx(1.0)
        np.testing.assert_allclose(r @ np.asarray(down, float) / np.linalg.norm(down),
                                   [0, 0, -1], atol=1e-12)
    # down -z, turned 90 deg: +x goes to +y (counter-clockwise seen from above)
    np.testing.assert_allclose(print_rotation((0, 0, -1), 90.0) @ [1, 0, 0], [0, 1, 0],
                               atol=1e-12)


def test_a_posed_box_stands_on_the_face_named_down():
    v = posed_vertices(box_vertices(30.0, 20.0, 10.0) + 5.0, (1.0, 0.0, 0.0), 0.0)
    # standing on its +x face, the 30 mm side is the height
    assert v.min(axis=0) == pytest.approx([0, 0, 0], abs=1e-12)
    assert v.max(axis=0)[2] == pytest.approx(30.0)
    assert sorted(v.max(axis=0)[:2]) == pytest.approx([10.0, 20.0])


def test_four_squares_share_one_bed_and_a_fifth_opens_a_second():
    # 100 mm squares with a 5 mm gap: 2 x 2 take 205 mm of a 220 mm bed, a third in a row
    # would need 310 mm (arithmetic)
    four = [[item("A", f"p{i}", 100, 100) for i in range(4)]]
    plates = pack_plates(four, BED)
    assert plates.plate_count == 1
    assert_on_beds_apart(four, plates)
    five = [[item("A", f"p{i}", 100, 100) for i in range(5)]]
    plates = pack_plates(five, BED)
    assert plates.plate_count == 2 and len(plates.placements) == 5
    assert_on_beds_apart(five, plates)


def test_a_long_part_is_turned_a_quarter_turn_when_that_is_what_fits():
    # 200 x 60 twice on a 220 x 100 bed: side by side they need 405 mm across, so both
    # must lie along x, one above the other needs 125 > 100: two plates (arithmetic).
    groups = [[item("A", "a", 60, 200), item("A", "b", 60, 200)]]
    plates = pack_plates(groups, (220.0, 100.0))
    assert [p.quarter_turn for p in plates.placements] == [True, True]
    assert plates.plate_count == 2
    for p in plates.placements:
        assert p.size_mm == pytest.approx((200.0, 60.0))


def test_a_variant_that_fits_a_bed_is_not_split_across_two():
    a = [item("A", "long", 100, 200)]
    b = [item("B", f"sq{i}", 100, 100) for i in range(3)]
    c = [item("C", "small", 100, 100)]
    groups = [a, b, c]
    plates = pack_plates(groups, BED)
    where = {(p.group, p.part): p.plate for p in plates.placements}
    # B's three squares would fit two beside A, but they go together onto a bed of their own
    assert {where[("B", f"sq{i}")] for i in range(3)} == {1}
    # C fits beside A, on the first plate that holds it whole
    assert where[("C", "small")] == 0 and where[("A", "long")] == 0
    assert plates.plate_count == 2
    assert_on_beds_apart(groups, plates)


def test_a_part_larger_than_the_bed_is_left_off_and_named():
    groups = [[item("A", "huge", 300, 10), item("A", "ok", 50, 50)]]
    plates = pack_plates(groups, BED)
    assert plates.left_off == (("A", "huge"),)
    assert [(p.part, p.plate) for p in plates.placements] == [("ok", 0)]


def test_packing_is_the_same_every_time():
    groups = [[item(g, f"p{i}", 30 + 17 * i, 90 - 11 * i) for i in range(5)] for g in "ABC"]
    first = pack_plates(groups, BED)
    assert pack_plates(groups, BED) == first
    assert_on_beds_apart(groups, first)
    # area bound: the plates hold at least the grown boxes' area (arithmetic)
    area = sum((it.footprint_mm[0] + PLATE_GAP_MM) * (it.footprint_mm[1] + PLATE_GAP_MM)
               for g in groups for it in g)
    assert first.plate_count >= math.ceil(area / ((BED[0] + PLATE_GAP_MM) ** 2))


def test_three_two_shell_variants_with_long_cores_share_one_bed():
    # The finger family's footprints: two 104 x 50 shells and a 111.233 x 7 (or 8) core.
    # Grown by the 5 mm gap, two shells fill a 218 mm row 55 deep; three rows take 165 mm
    # of the 225 mm grown bed and the three cores, 116.233 x 12 or 13 each, stack in the
    # 60 mm left (37 mm): one bed (arithmetic). The first placement rule alone needs two.
    groups = [[item(g, "shell-lower", 104, 50), item(g, "shell-upper", 104, 50),
               item(g, "core", 111.233, w)] for g, w in zip("ABC", (7, 7, 8))]
    plates = pack_plates(groups, BED)
    assert plates.plate_count == 1
    assert_on_beds_apart(groups, plates)
