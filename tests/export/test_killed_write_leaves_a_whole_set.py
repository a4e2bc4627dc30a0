"""A writer killed (SIGKILL) at any step leaves its output folder holding exactly the old set
or exactly the new set, and the next writer succeeds and leaves nothing else behind.

Each writer runs in a forked child that counts the calls that open or change something on
disk (see writer_processes.py) and kills itself before step k, for every k of the write.
Outside references: kill(2)/signal(7) (SIGKILL cannot be caught, so nothing of the writer
runs after it); flock(2) (the kernel drops the lock of a killed holder); rename(2) and
renameat2(2) RENAME_EXCHANGE (each replaces a directory entry in one step).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from export.writer_processes import SWAPS, put, run_forked, snapshot

from soft_molds.export import files
from soft_molds.export.files import write_file_set

OLD = {"manifest.json": b'{"set": "old"}\n', "cast.stl": b"old cast" * 40,
       "core.stl": b"old core", "shell-upper.stl": b"only in the old set"}
NEW = {"cast.stl": b"new cast" * 50, "core.stl": b"new core",
       "manifest.json": b'{"set": "new"}\n'}
THIRD = {"cast.stl": b"third", "manifest.json": b'{"set": "third"}\n'}


def _state(folder: Path, old: dict[str, bytes] | None, new: dict[str, bytes]) -> str:
    got = snapshot(folder)
    if got is None:
        return "absent"
    if got == new:
        return "new"
    if got == old:
        return "old"
    return "MIXED"


def _kill_at_every_step(tmp_path: Path, old: dict[str, bytes] | None, new: dict[str, bytes],
                        exchange: bool = True) -> list[str]:
    """State of the folder after a kill before step k, for k = 1..N (N: steps of a full
    write); checks that each next write succeeds and leaves only the folder."""
    def folder_for(tag: str) -> Path:
        folder = tmp_path / tag / "seedling-finger" / "A"
        if old is not None:
            put(folder, old)
        else:
            folder.parent.mkdir(parents=True)
        return folder

    clean = folder_for("full")
    full = run_forked(lambda: write_file_set(clean, new, last="manifest.json"),
                      exchange=exchange)
    assert full.exit_code == 0 and full.steps > 0
    assert snapshot(clean) == new and sorted(os.listdir(clean.parent)) == ["A"]

    states = []
    for k in range(1, full.steps + 1):
        folder = folder_for(f"k{k}")
        out = run_forked(lambda f=folder: write_file_set(f, new, last="manifest.json"),
                         kill_at=k, exchange=exchange)
        assert out.killed, f"the writer was not killed at step {k}"
        state = _state(folder, old, new)
        if state == "absent" and old is not None:
            files.remove_stale_temps(folder)  # the next claim finishes a half-done swap
            state = "absent, then " + _state(folder, old, new)
        states.append(state)
        # the next writer (another process: the killed one's lock is left behind) succeeds
        write_file_set(folder, THIRD, last="manifest.json")
        assert snapshot(folder) == THIRD
        assert sorted(os.listdir(folder.parent)) == ["A"], f"leftovers after a kill at {k}"
    return states


def _runs(states: list[str]) -> list[str]:
    out: list[str] = []
    for s in states:
        if not out or out[-1] != s:
            out.append(s)
    return out


def test_kill_at_every_step_leaves_the_old_or_the_new_set(tmp_path):
    if not files._exchange(*_two_dirs(tmp_path)):
        pytest.skip("this file system cannot exchange directories")
    states = _kill_at_every_step(tmp_path, OLD, NEW)
    # old until the one swap, new after it; never a mix, never no folder
    assert _runs(states) == ["old", "new"], states
    print(f"{len(states)} kill points: {states.count('old')} old, {states.count('new')} new")


def test_kill_at_every_step_of_a_first_write_leaves_nothing_or_the_set(tmp_path):
    states = _kill_at_every_step(tmp_path, None, NEW)
    assert _runs(states) == ["absent", "new"], states
    print(f"{len(states)} kill points: {states.count('absent')} absent, "
          f"{states.count('new')} new")


def test_kill_at_every_step_of_the_two_rename_swap_never_mixes(tmp_path):
    states = _kill_at_every_step(tmp_path, OLD, NEW, exchange=False)
    # only a kill between the two renames leaves no folder, and the next claim puts the
    # complete new set in place
    assert _runs(states) == ["old", "absent, then new", "new"], states
    assert states.count("absent, then new") == 1
    print(f"{len(states)} kill points: {states.count('old')} old, 1 absent then new, "
          f"{states.count('new')} new")


def test_kill_at_every_step_of_a_real_build_set(tmp_path, finger):
    new = finger.files()  # the ~11 files of a real build: STL, STEP, cards, manifest
    assert len(new) >= 10
    states = _kill_at_every_step(tmp_path, OLD, new)
    assert _runs(states) == ["old", "new"], states
    print(f"{len(new)} files, {len(states)} kill points: {states.count('old')} old, "
          f"{states.count('new')} new")


def test_killed_cli_build_keeps_the_previous_set(tmp_path, finger):
    """One real ``soft-molds build`` in its own process, killed after writing every new file
    and before anything is swapped in."""
    root = Path(__file__).resolve().parents[2]
    out = tmp_path / "out"
    folder = out / "seedling-finger" / "A"
    put(folder, OLD)
    env = {**os.environ, "PYTHONPATH": os.pathsep.join([str(root), str(root / "tests")])}
    helper = Path(__file__).with_name("writer_processes.py")
    killed = subprocess.run(
        [sys.executable, str(helper), ",".join(sorted(SWAPS)), "--", "build",
         str(root / "recipes" / "seedling-finger.yaml"), "--out", str(out)],
        env=env, capture_output=True, text=True, timeout=600)
    assert killed.returncode == -9, killed.stderr
    assert "built in" in killed.stdout  # it got as far as writing
    assert snapshot(folder) == OLD
    staged = [n for n in os.listdir(folder.parent) if n.endswith(".new")]
    assert len(staged) == 1  # the killed run's staging folder, unseen under the final name
    assert len(os.listdir(folder.parent / staged[0])) == len(finger.files())

    # the next real write takes the dead run's leftovers away
    want = finger.files()  # (taken just before: export adds its own time to the manifest)
    finger.export(out)
    assert snapshot(folder) == want
    assert sorted(os.listdir(folder.parent)) == ["A"]


def _two_dirs(tmp_path: Path) -> tuple[Path, Path]:
    a, b = tmp_path / "probe-a", tmp_path / "probe-b"
    a.mkdir()
    b.mkdir()
    return a, b
