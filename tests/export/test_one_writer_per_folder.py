"""An output folder is written by one writer at a time: a second writer fails at once with
one line naming the folder and the holder's pid, cleanup never removes a live writer's
files, and the lock of a killed writer is taken over.

The other writer runs in a forked child paused just before it swaps its files in (see
writer_processes.py). Outside references: flock(2) (locks of separate open files conflict,
also within one process; the kernel drops them when the holder dies); kill(2) with signal 0
(tells whether a pid exists).
"""

from __future__ import annotations

import os
import pickle
import signal
import threading
import time

import pytest
from export.writer_processes import paused_writer, put, run_forked, snapshot

from soft_molds.errors import SoftMoldsError
from soft_molds.export import files
from soft_molds.export.files import remove_stale_temps, write_atomic, write_file_set

MINE = {"cast.stl": b"first writer's cast" * 30, "manifest.json": b'{"by": "first"}\n'}
THEIRS = {"cast.stl": b"second writer's cast", "core.stl": b"second writer's core",
          "manifest.json": b'{"by": "second"}\n'}


def test_second_writer_fails_at_once_naming_folder_and_holder(tmp_path):
    folder = tmp_path / "seedling-finger" / "A"
    with paused_writer(lambda: write_file_set(folder, MINE, last="manifest.json")) as first:
        t = time.monotonic()
        with pytest.raises(files.FolderBusyError) as err:
            write_file_set(folder, THEIRS, last="manifest.json")
        assert time.monotonic() - t < 2.0  # refused, not queued
    exc = err.value
    assert isinstance(exc, SoftMoldsError) and isinstance(exc, OSError)
    assert str(exc) == (f"output folder {folder} is being written by process {first.pid}; "
                        "wait for it to finish or write to another output root")
    assert exc.holder is not None and exc.holder.pid == first.pid
    # the first writer was not disturbed: its complete set, nothing of the second's
    assert first.exit_code == 0
    assert snapshot(folder) == MINE
    assert sorted(os.listdir(folder.parent)) == ["A"]


def test_cleanup_leaves_a_live_writers_files_alone(tmp_path):
    # what a sweep does before building a variant another process is writing
    folder = tmp_path / "seedling-finger" / "A"
    put(folder, {"cast.stl": b"older build"})
    with paused_writer(lambda: write_file_set(folder, MINE, last="manifest.json")) as first:
        before = sorted(os.listdir(folder.parent))
        assert remove_stale_temps(folder) == 0
        assert sorted(os.listdir(folder.parent)) == before
    assert first.exit_code == 0
    assert snapshot(folder) == MINE


def test_cleanup_leaves_a_live_single_file_writers_temporary_alone(tmp_path):
    target = tmp_path / "summary.json"
    with paused_writer(lambda: write_atomic(target, b"summary")) as first:
        hidden = [n for n in os.listdir(tmp_path) if n.startswith(".summary.json.")]
        assert len(hidden) == 1  # its temporary, complete and about to be renamed
        assert remove_stale_temps(tmp_path) == 0
        write_atomic(tmp_path / "other.json", b"x")  # another file's writer leaves it too
        assert hidden[0] in os.listdir(tmp_path)
    assert first.exit_code == 0
    assert target.read_bytes() == b"summary"


def test_lock_of_a_killed_writer_is_taken_over(tmp_path):
    folder = tmp_path / "A"

    def hold_and_die():
        with files.claim_folder(folder):
            os.kill(os.getpid(), signal.SIGKILL)

    dead = run_forked(hold_and_die)
    assert dead.killed
    lock = tmp_path / ".A.lock"
    assert lock.read_text().split()[0] == str(dead.pid)  # left behind, held by nobody
    with files.claim_folder(folder) as claim:
        assert claim.took_over_from is not None and claim.took_over_from.pid == dead.pid
        assert lock.read_text().split()[0] == str(os.getpid())
    assert not lock.exists()  # released on exit


def test_a_finished_writer_leaves_no_lock_and_no_claim(tmp_path):
    done = run_forked(lambda: write_file_set(tmp_path / "A", MINE))
    assert done.exit_code == 0
    assert sorted(os.listdir(tmp_path)) == ["A"]
    with files.claim_folder(tmp_path / "A") as claim:
        assert claim.took_over_from is None


def test_another_thread_is_refused_and_the_same_thread_may_nest(tmp_path):
    folder = tmp_path / "A"
    seen: list[BaseException | None] = []

    def other_thread():
        try:
            with files.claim_folder(folder):
                seen.append(None)
        except files.FolderBusyError as exc:
            seen.append(exc)

    with files.claim_folder(folder):
        with files.claim_folder(folder):  # nested in this thread: shares the claim
            pass
        t = threading.Thread(target=other_thread)
        t.start()
        t.join()
    assert isinstance(seen[0], files.FolderBusyError)
    assert f"by process {os.getpid()}" in str(seen[0])


def test_family_claim_refuses_a_second_sweep_but_not_variant_writers(tmp_path):
    # A sweep holds its recipe's folder (family sheet and card) for the night; its workers
    # write variant folders below it under their own claims.
    family = tmp_path / "out" / "seedling-finger"

    def sweep():
        with files.claim_folder(family):
            write_atomic(family.parent / "summary.json", b"{}")

    family.mkdir(parents=True)
    with paused_writer(sweep) as first:
        with pytest.raises(files.FolderBusyError, match=f"process {first.pid}"):
            with files.claim_folder(family):
                pass
        write_file_set(family / "A", THEIRS)  # a variant of it: not blocked
    assert first.exit_code == 0
    assert snapshot(family / "A") == THEIRS


def test_busy_error_crosses_process_pools_intact(tmp_path):
    with paused_writer(lambda: write_file_set(tmp_path / "A", MINE)) as first:
        with pytest.raises(files.FolderBusyError) as err:
            write_file_set(tmp_path / "A", THEIRS)
    again = pickle.loads(pickle.dumps(err.value))
    assert type(again) is files.FolderBusyError and str(again) == str(err.value)
    assert again.holder == err.value.holder and again.holder.pid == first.pid


def test_build_into_a_folder_another_process_writes_fails_in_one_line(
        tmp_path, finger, monkeypatch, capsys):
    from pathlib import Path

    from soft_molds import cli, pipeline

    recipe = Path(__file__).resolve().parents[2] / "recipes" / "seedling-finger.yaml"
    out = tmp_path / "out"
    folder = out / "seedling-finger" / "A"
    monkeypatch.setattr(pipeline, "build", lambda r: finger)  # the shared real build
    with paused_writer(lambda: write_file_set(folder, MINE)) as first:
        status = cli.main(["build", str(recipe), "--out", str(out)])
    assert status == 1
    errors = [ln for ln in capsys.readouterr().err.splitlines() if ln.strip()]
    assert errors == [f"error: cannot write under {out}: output folder {folder} is being "
                      f"written by process {first.pid}; wait for it to finish or write to "
                      "another output root"]
    assert snapshot(folder) == MINE
