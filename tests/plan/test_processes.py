"""Casting processes are a registry: one-shot is there, a process added in one module is
found, and a process must give at least one step, each named once."""

from __future__ import annotations

from dataclasses import replace

import pytest
from recipe_text import FINGER_TEXT

from soft_molds.plan.processes import PROCESSES, casting_process, processes, steps_of
from soft_molds.recipe import recipe_from_text


def test_one_shot_is_registered_and_gives_one_step():
    r = recipe_from_text(FINGER_TEXT, "f.yaml", "f")
    assert "one-shot" in processes()
    (step,) = steps_of("one-shot", r)
    assert step.name == "silicone"


def test_a_process_added_in_one_module_is_used_and_checked():
    one_shot = processes()["one-shot"]

    @casting_process("probe-two-pours")
    def two(r):
        (s,) = one_shot(r)
        return (replace(s, name="first"), replace(s, name="second"))

    @casting_process("probe-same-names")
    def same(r):
        (s,) = one_shot(r)
        return (s, s)

    r = recipe_from_text(FINGER_TEXT, "f.yaml", "f")
    try:
        assert [s.name for s in steps_of("probe-two-pours", r)] == ["first", "second"]
        with pytest.raises(ValueError, match="each named once"):
            steps_of("probe-same-names", r)
    finally:
        PROCESSES.pop("probe-two-pours", None)
        PROCESSES.pop("probe-same-names", None)
