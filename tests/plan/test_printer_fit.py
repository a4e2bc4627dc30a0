"""A mold block that cannot lie on the printer is refused from the plan, before anything is
built. The rectangle-in-rectangle condition is checked against a brute-force search over
turns (independent: the bounding box of a p x q rectangle turned by t is
p cos t + q sin t by p sin t + q cos t)."""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest
from recipe_text import FINGER_TEXT, edit

from soft_molds.plan.printer_fit import box_fits, rectangle_fits

TURNS = np.linspace(0.0, np.pi / 2.0, 20001)


def _fits_by_search(p, q, a, b) -> bool:
    c, s = np.cos(TURNS), np.sin(TURNS)
    w, h = p * c + q * s, p * s + q * c
    return bool(np.any(((w <= a) & (h <= b)) | ((w <= b) & (h <= a))))


def test_rectangle_fit_agrees_with_a_search_over_turns():
    rng = np.random.default_rng(7)
    agree = 0
    for _ in range(400):
        a, b = rng.uniform(100, 300, 2)
        p, q = rng.uniform(10, 400), rng.uniform(5, 120)
        searched = _fits_by_search(p, q, a, b)
        closed = rectangle_fits(p, q, a, b)
        # The search samples turns, so it can miss a fit only right at the border.
        if searched != closed:
            assert closed and not searched
            assert _fits_by_search(p * 0.999, q * 0.999, a, b)
        agree += searched == closed
    assert agree >= 396


def test_a_long_thin_part_fits_only_across_the_diagonal():
    # 290 x 10 on a 220 x 220 bed: too long for a side; turned 45 deg its bounding square is
    # (290 + 10) / sqrt 2 = 212 mm. 300 x 20 would need (300 + 20) / sqrt 2 = 226 mm there,
    # and the closed form says no turn does better.
    assert rectangle_fits(290, 10, 220, 220) and _fits_by_search(290, 10, 220, 220)
    assert not rectangle_fits(300, 20, 220, 220)
    assert not _fits_by_search(300, 20, 220, 220)


def test_a_box_may_stand_on_any_face():
    # 290 x 10 x 10: 290 tall stood on end (over 250), but it lies across the bed diagonal.
    assert box_fits((290.0, 10.0, 10.0), (220.0, 220.0), 250.0)
    assert box_fits((10.0, 10.0, 240.0), (100.0, 100.0), 250.0)
    assert not box_fits((400.0, 30.0, 20.0), (220.0, 220.0), 250.0)


def test_a_metre_long_body_is_refused_before_anything_is_built(tmp_path):
    text = edit(FINGER_TEXT, "length_mm: 70", "length_mm: 1000")
    path = tmp_path / "long.yaml"
    path.write_text(text)
    run = subprocess.run([sys.executable, "-m", "soft_molds", "check", str(path)],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 2, run.stdout + run.stderr
    assert "printer.bed_mm: is too small for the shell-lower" in run.stderr
    assert "cadquery" not in run.stderr


@pytest.mark.parametrize("bed", ["[220, 220]", "[120, 120]"])
def test_the_bundled_finger_fits_the_usual_beds(bed):
    from soft_molds.plan import plan_problems
    from soft_molds.recipe import recipe_from_text

    text = FINGER_TEXT + f"printer:\n  bed_mm: {bed}\n"
    assert plan_problems(recipe_from_text(text, "f.yaml", "f")) == []
