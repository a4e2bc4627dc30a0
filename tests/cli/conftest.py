"""Fixtures of the command-line tests."""

from __future__ import annotations

import pytest


@pytest.fixture
def no_cad_work(monkeypatch):
    """Any call of the build stage fails the test: bad input must be refused before any CAD
    work (a structural check, where a time bound would flake on a loaded machine)."""
    import soft_molds.pipeline

    def refuse(*_args, **_kwargs):
        raise AssertionError("the build stage ran for a recipe that should have been refused")

    # Every entry point of the build stage: one-shot and step by step.
    for name in ("build", "build_steps", "build_layered", "build_overmold", "build_melted"):
        monkeypatch.setattr(soft_molds.pipeline, name, refuse)
