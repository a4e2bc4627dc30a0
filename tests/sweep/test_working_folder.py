"""Python files lying in the folder a command is started in are never run by it: not by
``build`` or ``check``, and not by the fork server or the workers of ``sweep`` (one or
two local workers, or a Dask cluster on loopback).

Python puts the folder of a ``python -c`` process first on its import path, so before
the fork server was started in safe-path mode a file named like a standard module
(``inspect.py``, ``json.py``) next to the recipes ran inside the sweep, and one that
raised killed it. The planted modules here record that they ran, then raise.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

PLANTED = '''"""Planted by a test: records which process imported it, then fails."""
import os
import sys

_here = os.path.dirname(os.path.abspath(__file__))
with open(os.path.join(_here, f"ran-{__name__}-{os.getpid()}"), "w") as _f:
    _f.write(" ".join(sys.argv))
raise RuntimeError("a planted module ran")
'''

#: Modules the pool's helper processes import while they start (socket: the fork server
#: and the resource tracker) and that the kernel and the pipeline import (inspect, json).
NAMES = ("inspect", "json", "socket")


def _plant(folder: Path) -> None:
    for name in NAMES:
        (folder / f"{name}.py").write_text(PLANTED)


def _ran(folder: Path) -> list[str]:
    return sorted(f"{p.name}: {p.read_text()}" for p in folder.glob("ran-*"))


def _run(argv: list[str], folder: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(argv, cwd=folder, capture_output=True, text=True, timeout=300)


@pytest.mark.parametrize("args", [
    ("build", "cushion.yaml", "--out", "out"),
    ("check", "cushion.yaml"),
    ("sweep", "cushion.yaml", "--jobs", "1", "--out", "out"),
    ("sweep", "pair.yaml", "--jobs", "2", "--out", "out"),
], ids=["build", "check", "sweep-jobs-1", "sweep-jobs-2"])
def test_no_module_in_the_working_folder_is_imported(args, recipes, command):
    _plant(recipes)
    done = _run(command(*args), recipes)
    assert _ran(recipes) == []
    assert done.returncode == 0, done.stderr[-2000:]
    assert "Traceback" not in done.stderr
    if args[0] != "check":
        n = 2 if "pair.yaml" in args else 1
        assert len(list((recipes / "out").rglob("manifest.json"))) == n


def test_no_module_in_the_working_folder_is_imported_on_a_dask_cluster(recipes, command):
    distributed = pytest.importorskip("distributed")
    _plant(recipes)
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address="127.0.0.1:0") as cluster:
        done = _run(command("sweep", "cushion.yaml", "--out", "out", "--scheduler",
                            cluster.scheduler_address), recipes)
    assert _ran(recipes) == []
    assert done.returncode == 0, done.stderr[-2000:]
    assert len(list((recipes / "out").rglob("manifest.json"))) == 1


def test_workers_get_the_import_path_without_the_working_folder(tmp_path, monkeypatch):
    from soft_molds.sweep.executors import worker_import_path

    # What ``python -m`` or ``python -c`` started in tmp_path leaves: that folder first.
    monkeypatch.chdir(tmp_path)
    rest = [p for p in sys.path if os.path.realpath(p or ".") != str(tmp_path.resolve())]
    monkeypatch.setattr(sys, "path", [str(tmp_path), *rest])
    if sys.flags.safe_path:
        pytest.skip("this interpreter runs in safe-path mode: nothing was put first")
    assert worker_import_path() == rest
    monkeypatch.setattr(sys, "path", ["", *rest])
    assert worker_import_path() == rest
