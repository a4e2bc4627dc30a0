"""Recipes and a launcher shared by the sweep tests that run the command in a process
of its own."""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path

import pytest

#: A stem cushion (bar with a bore; demo scenario): one variant, quick to build.
CUSHION = """
name: cushion-one
body: {kind: bar, length_mm: 30, width_mm: 20, height_mm: 12, edge_radius_mm: 2}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 22, end_round_mm: 1.5}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 5}
mold: {clamp_bolt: M3}
"""

#: The same cushion in two bore sizes: enough for two workers to run at once.
PAIR = CUSHION.replace("cushion-one", "cushion-pair") + """variants:
  vary:
    voids[0].diameter_mm: [3, 4]
"""

#: What the installed ``soft-molds`` command runs. Python puts the script's own folder
#: first on the import path, never the folder the command is started in.
LAUNCHER = """import sys

from soft_molds.cli import main

if __name__ == "__main__":
    sys.exit(main())
"""


@pytest.fixture(scope="session")
def command(tmp_path_factory) -> Callable[..., list[str]]:
    """argv for ``soft-molds ARGS...`` as the installed console script runs it."""
    script = tmp_path_factory.mktemp("bin") / "soft-molds"
    script.write_text(LAUNCHER)
    return lambda *args: [sys.executable, str(script), *map(str, args)]


@pytest.fixture
def recipes(tmp_path) -> Path:
    """A working folder holding cushion.yaml (one variant) and pair.yaml (two)."""
    folder = tmp_path / "work"
    folder.mkdir()
    (folder / "cushion.yaml").write_text(CUSHION)
    (folder / "pair.yaml").write_text(PAIR)
    return folder
