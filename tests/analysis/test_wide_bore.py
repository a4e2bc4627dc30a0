"""A thin tube into a fat bore: the recipe accepts a bore wider than the tube socket, and
the core-extraction check alone decides whether its core comes out through the socket.
Expected figures by closed-form geometry and hand arithmetic, named beside each check."""

from __future__ import annotations

import math

import pytest

from soft_molds import build
from soft_molds.analysis.findings import Severity
from soft_molds.recipe import recipe_from_text

# Demo scenario: a swelling pad for the co-op's gripper fed by a 4 mm tube, its 8 mm bore
# twice the socket's diameter, starting 3 mm in (inside the 6 mm deep socket).
WIDE = """\
name: wide-bore
body: {{kind: rod, diameter_mm: 16, length_mm: 50, end_round_mm: 2}}
voids:
  - {{kind: bore, diameter_mm: 8, length_mm: 40, start_mm: 3, end_round_mm: 4}}
inlet: {{socket_diameter_mm: 4, socket_depth_mm: 6}}
material: {{grade: A10{extra}}}
"""


def _extraction(molds):
    (f,) = [f for f in molds.findings if f.check == "core-extraction"]
    return f


@pytest.fixture(scope="module")
def wide():
    return build(recipe_from_text(WIDE.format(extra=""), "wide.yaml", "wide-bore"))


@pytest.fixture(scope="module")
def wide_stiff():
    # elongation at break 150 %: a grade this stiff is hypothetical, chosen so that the
    # same bore fails the check
    text = WIDE.format(extra=", elongation_pct: 150")
    return build(recipe_from_text(text, "wide.yaml", "wide-bore"))


def test_a_bore_twice_the_socket_builds_when_its_core_comes_out(wide):
    # widest core section: the 8 mm bore, perimeter pi 8, through the pi 4 inlet: 2.0
    # (closed form); A10 stretches 1000 % (shipped table), safety factor 2: allowed
    # 1 + 10 / 2 = 6 (hand arithmetic)
    f = _extraction(wide)
    assert f.severity == Severity.INFO
    assert f.value == pytest.approx(math.pi * 8.0 / (math.pi * 4.0), rel=0.005)
    assert f.limit == pytest.approx(6.0)
    assert wide.errors == (), [e.message for e in wide.errors]


def test_the_same_bore_is_refused_by_the_extraction_check_when_the_inlet_would_tear(
        wide_stiff):
    # 150 % at break, safety factor 2: allowed 1 + 1.5 / 2 = 1.75 < 2.0 (hand arithmetic)
    f = _extraction(wide_stiff)
    assert f.severity == Severity.ERROR
    assert f.limit == pytest.approx(1.75)
    assert f.value == pytest.approx(2.0, rel=0.005)
    assert [e.check for e in wide_stiff.errors] == ["core-extraction"]
