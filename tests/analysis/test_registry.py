"""The check registry and the shared check context, on the bundled seedling finger (demo
scenario) and on small stand-in checks.

What is proved: every registered check runs once, in its order, and only under the names it
declares; a check in a new module of the checks package is found without touching anything
else; the context builds one ray index per mesh (counted, not assumed); findings are listed
errors first with the check order kept within a severity (the ordering rule of
``analysis.findings.worst_first``).
"""

from __future__ import annotations

import dataclasses
import pkgutil
import sys
import textwrap

import numpy as np
import pytest

from soft_molds.analysis import checks as checks_pkg
from soft_molds.analysis import rays
from soft_molds.analysis.context import CheckContext
from soft_molds.analysis.findings import Severity, finding
from soft_molds.analysis.registry import (
    CheckOutput,
    FunctionCheck,
    register,
    registered_checks,
    unregister,
)
from soft_molds.analysis.review import run_checks

BUILT_IN = ("draft", "core-draft", "plate-release", "core-extraction", "drain", "core-support",
            "silicone-wall",
            "trapped-air", "build-volume", "fin-print", "fin-draft", "pressure", "motion")


def _context(m) -> CheckContext:
    """The context the pipeline builds for mold set ``m`` (same inputs as its review)."""
    return CheckContext.for_step(
        m.plan, m.part("cast").mesh,
        {p.name: (p.mesh, p.pull_dir) for p in m.parts if p.role != "cast"},
        {lab.part: [lab.box] for lab in m.labels})


@pytest.fixture(scope="module")
def ctx(finger) -> CheckContext:
    return _context(finger)


def test_every_check_module_registers_and_runs_once_in_its_order(finger, ctx):
    found = registered_checks()
    keys = tuple(c.names[0] for c in found)
    assert keys == BUILT_IN
    orders = [c.order for c in found]
    assert orders == sorted(orders) and len(set(orders)) == len(orders)
    modules = [m.name for m in pkgutil.iter_modules(checks_pkg.__path__)
               if not m.name.startswith("_")]
    assert len(modules) == len(found)  # one check per module

    calls: list[str] = []

    def spy(c):
        def run(context):
            calls.append(c.names[0])
            return c.run(context)
        return FunctionCheck(c.names, c.order, run)

    rev = run_checks(ctx, [spy(c) for c in found])
    assert calls == list(keys) and rev.ran == keys
    # Same inputs, same findings as the review the build ran (every value, every message).
    assert rev.findings == finger.review.findings
    declared = {n for c in found for n in c.names}
    assert {f.check for f in rev.findings} <= declared


def test_a_check_in_a_new_module_of_the_checks_package_is_picked_up(ctx, tmp_path,
                                                                    monkeypatch):
    name = "zz_tmp_opening_count"
    (tmp_path / f"{name}.py").write_text(textwrap.dedent('''
        from soft_molds.analysis.findings import Severity, finding
        from soft_molds.analysis.registry import CheckOutput, check

        @check("opening-count", order=650)
        def opening_count(ctx):
            n = len(ctx.openings)
            return CheckOutput((finding("opening-count", Severity.INFO, "shell-upper",
                                        f"{n} openings", value=float(n)),))
    '''))
    monkeypatch.setattr(checks_pkg, "__path__", [*checks_pkg.__path__, str(tmp_path)])
    try:
        keys = [c.names[0] for c in registered_checks()]
        # order 650 puts it between the print checks (600) and pressure (700)
        assert keys == [*BUILT_IN[:-2], "opening-count", "pressure", "motion"]
        rev = run_checks(ctx)
        (f,) = [f for f in rev.findings if f.check == "opening-count"]
        assert f.value == float(len(ctx.openings)) > 0
        infos = [g.check for g in rev.findings if g.severity is Severity.INFO]
        assert infos.index("opening-count") == infos.index("pressure") - 1
    finally:
        monkeypatch.undo()  # the package's own path again, then forget the module
        unregister("opening-count")
        sys.modules.pop(f"{checks_pkg.__name__}.{name}", None)
    assert "opening-count" not in [c.names[0] for c in registered_checks()]


def test_the_context_builds_one_ray_index_per_mesh(finger, monkeypatch):
    built: list[int] = []
    original = rays.RayCaster.__init__

    def counting(self, mesh):
        built.append(id(mesh))
        original(self, mesh)

    monkeypatch.setattr(rays.RayCaster, "__init__", counting)
    ctx = _context(finger)
    run_checks(ctx)
    meshes = [finger.part(n).mesh for n in ("cast", "shell-lower", "shell-upper", "core")]
    for m in meshes:
        assert built.count(id(m)) == 1
    # ... and one for the closed mold (every rigid part as one mesh), nothing else
    assert len(built) == len(meshes) + 1
    assert built.count(id(ctx.mold.mesh)) == 1


def test_the_context_is_read_only(ctx):
    with pytest.raises(dataclasses.FrozenInstanceError):
        ctx.up = (0.0, 0.0, -1.0)  # type: ignore[misc]
    with pytest.raises(ValueError):
        ctx.void_facets[0] = not ctx.void_facets[0]
    with pytest.raises(TypeError):
        ctx.parts["extra"] = ctx.core  # type: ignore[index]
    # the void facets and the outer facets split the cast's surface
    assert not np.any(ctx.void_facets & ctx.outer_facets)
    assert np.all(ctx.void_facets | ctx.outer_facets)


def _fake(key: str, order: int, severities: list[Severity]) -> FunctionCheck:
    def run(_ctx):
        return CheckOutput(tuple(finding(key, s, "cast", f"{key} {i}")
                                 for i, s in enumerate(severities)))
    return FunctionCheck((key,), order, run)


def test_findings_come_errors_first_keeping_check_order_within_a_severity(ctx):
    a = _fake("first", 1, [Severity.INFO, Severity.ERROR, Severity.WARNING])
    b = _fake("second", 2, [Severity.ERROR, Severity.INFO, Severity.WARNING])
    rev = run_checks(ctx, [a, b])
    assert [f.message for f in rev.findings] == [
        "first 1", "second 0",            # errors, in check order
        "first 2", "second 2",            # warnings
        "first 0", "second 1"]            # infos
    assert [f.message for f in rev.errors] == ["first 1", "second 0"]
    assert [f.message for f in rev.warnings] == ["first 2", "second 2"]


def test_a_check_may_not_emit_a_name_it_did_not_declare(ctx):
    def run(_ctx):
        return CheckOutput((finding("other", Severity.INFO, "cast", "x"),))

    with pytest.raises(ValueError, match="undeclared name.*other"):
        run_checks(ctx, [FunctionCheck(("mine",), 1, run)])


def test_a_name_can_be_registered_by_one_check_only():
    registered_checks()
    with pytest.raises(ValueError, match="already registered"):
        register(_fake("silicone-wall", 999, []))
    with pytest.raises(ValueError, match="lowercase words"):
        register(_fake("Not A Name", 999, []))
    assert "Not A Name" not in [c.names[0] for c in registered_checks()]
