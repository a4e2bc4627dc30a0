"""The worked examples of DEVELOPERS.md are true: each code block marked
``<!-- example: NAME -->`` is run as written, registers its extension, and a recipe using it
is planned or built and checked against closed-form geometry (Steiner formula for the
rounded box, pi r^2 h for the cylinder and l w h for the box)."""

from __future__ import annotations

import math
import re
import sys
import types
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

import pytest

GUIDE = Path(__file__).resolve().parents[2] / "DEVELOPERS.md"
PI = math.pi


def examples() -> dict[str, str]:
    text = GUIDE.read_text()
    found = re.findall(r"<!-- example: ([a-z-]+) -->\s*```python\n(.*?)```", text, re.S)
    return dict(found)


@contextmanager
def registered(name: str, table: dict) -> Iterator[dict]:
    """Run the example; take what it registered out of ``table`` afterwards."""
    from soft_molds.analysis.registry import registered_checks
    from soft_molds.export.formats import output_formats
    from soft_molds.plan.processes import processes
    from soft_molds.recipe.registry import body_kinds

    # Load the bundled ones first: only what the example adds is removed afterwards.
    body_kinds(), processes(), registered_checks(), output_formats()
    before = dict(table)
    module = types.ModuleType(f"guide_example_{name.replace('-', '_')}")
    sys.modules[module.__name__] = module  # dataclasses look their module up
    try:
        exec(compile(examples()[name], f"DEVELOPERS.md:{name}", "exec"), module.__dict__)
        added = set(table) - set(before)
        assert added, f"example {name} registered nothing"
        yield module.__dict__
    finally:
        del sys.modules[module.__name__]
        for key in set(table) - set(before):
            del table[key]


def test_the_guide_has_every_worked_example():
    assert set(examples()) == {"body-kind", "void-kind", "check", "output-format",
                               "casting-process"}


def _rounded_box_volume(a: float, b: float, c: float, r: float) -> float:
    a, b, c = a - 2 * r, b - 2 * r, c - 2 * r
    return a * b * c + 2 * r * (a * b + b * c + c * a) + PI * r * r * (a + b + c) \
        + 4.0 / 3.0 * PI * r ** 3


KNOB_RECIPE = """
name: knob-test
body: {kind: knob-bar, length_mm: 60, width_mm: 16, height_mm: 14, knob_at_mm: 40,
       knob_diameter_mm: 8, knob_height_mm: 3}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 40, end_round_mm: 2}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 6}
parting: {axis: z}
"""


def test_the_body_kind_example_builds_with_its_closed_form_volume():
    from soft_molds import build
    from soft_molds.recipe import recipe_from_text
    from soft_molds.recipe.registry import BODY_KINDS

    with registered("body-kind", BODY_KINDS):
        molds = build(recipe_from_text(KNOB_RECIPE, "knob.yaml", "knob-test"))
    # Steiner formula (rounded bar) + cylinder standing on its flat top face.
    want = _rounded_box_volume(60, 16, 14, 2.0) + PI * 4.0 ** 2 * 3.0
    assert molds.volumes_mm3["body"] == pytest.approx(want, rel=1e-3)
    assert not molds.errors
    assert all(p.report.ok for p in molds.parts)


SLOT_RECIPE = """
name: slot-test
body: {kind: bar, length_mm: 60, width_mm: 20, height_mm: 12, edge_radius_mm: 2}
voids:
  - {kind: slot, length_mm: 40, width_mm: 12, height_mm: 3}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 6}
parting: {axis: z}
inflate: {working_pressure_kpa: 20}
"""


def test_the_void_kind_example_builds_and_its_walls_get_a_pressure_check():
    from soft_molds import build
    from soft_molds.geometry.kernel import build_primitive, volume
    from soft_molds.recipe import recipe_from_text
    from soft_molds.recipe.registry import VOID_KINDS

    with registered("void-kind", VOID_KINDS):
        r = recipe_from_text(SLOT_RECIPE, "slot.yaml", "slot-test")
        (slot,) = r.void_primitives()[0]
        assert volume(build_primitive(slot, "voids")) == pytest.approx(40 * 12 * 3, rel=1e-9)
        molds = build(r)
    groups = {w.group for w in molds.pressures}
    assert {"top wall", "bottom wall"} <= groups
    assert all(p.report.ok for p in molds.parts)


def test_the_casting_process_example_registers_and_gives_its_steps():
    from recipe_text import FINGER_TEXT

    from soft_molds.plan.processes import PROCESSES, steps_of
    from soft_molds.recipe import recipe_from_text

    with registered("casting-process", PROCESSES):
        steps = steps_of("two-pour", recipe_from_text(FINGER_TEXT, "f.yaml", "f"))
    assert [s.name for s in steps] == ["skin", "fill"]
    assert "two-pour" not in PROCESSES


def test_the_check_example_measures_the_gap_between_openings(finger):
    import dataclasses

    from soft_molds.analysis.context import CheckContext
    from soft_molds.analysis.registry import _CHECKS, registered_checks
    from soft_molds.analysis.review import run_checks
    from soft_molds.plan import Opening

    ctx = CheckContext.for_step(
        finger.plan, finger.part("cast").mesh,
        {p.name: (p.mesh, p.pull_dir) for p in finger.parts if p.role != "cast"},
        {lab.part: [lab.box] for lab in finger.labels})
    with registered("check", _CHECKS) as ns:
        assert "opening-spacing" in [c.names[0] for c in registered_checks()]
        # Two holes 4.5 mm apart centre to centre, radii 2 and 1: 1.5 mm of plastic
        # between them (closed form), below the 1.6 mm bridge; one 10 mm off is fine.
        close = (Opening("sprue", (10.0, 0.0, 7.0), 2.0), Opening("vent", (14.5, 0.0, 7.0), 1.0))
        got = ns["opening_spacing"](dataclasses.replace(ctx, openings=close)).findings
        assert [round(f.value, 9) for f in got] == [1.5]
        far = (close[0], Opening("vent", (22.0, 0.0, 9.0), 1.0))
        assert ns["opening_spacing"](dataclasses.replace(ctx, openings=far)).findings == ()
        rev = run_checks(ctx)
    # The bundled finger's own openings, checked by hand: every pair's edge-to-edge gap.
    ops = finger.openings
    gaps = [math.dist(a.center_mm[:2], b.center_mm[:2]) - a.radius_mm - b.radius_mm
            for i, a in enumerate(ops) for b in ops[i + 1:]]
    flagged = [f for f in rev.findings if f.check == "opening-spacing"]
    assert len(flagged) == sum(g < 1.6 for g in gaps)


def test_the_output_format_example_writes_what_the_manifest_says(finger):
    import csv
    import io

    from soft_molds.export.formats import _FORMATS
    from soft_molds.export.writer import encode_mold_set

    with registered("output-format", _FORMATS):
        first = encode_mold_set(finger, formats=["parts-csv"])
        again = encode_mold_set(finger, formats=["parts-csv"])
    assert first.files["parts.csv"] == again.files["parts.csv"]
    rows = list(csv.DictReader(io.StringIO(first.files["parts.csv"].decode())))
    assert [r["part"] for r in rows] == [p.name for p in finger.parts]
    for row, part in zip(rows, finger.parts):
        assert float(row["volume_mm3"]) == pytest.approx(part.brep_volume_mm3, abs=2e-3)
    assert sorted(first.files) == ["manifest.json", "parts.csv"]
