"""Atomic writing of single files and file sets, and deterministic JSON.

Outside references: POSIX rename(2) / Python ``os.replace`` semantics (the target is either
the old or the new file); Linux renameat2(2) RENAME_EXCHANGE (both names swap in one step);
flock(2) (a lock held through one open file blocks another open of the same file);
RFC 8259 (JSON has no NaN or Infinity); Python's float ``repr`` is the shortest string that
round-trips (Python docs, "Floating Point Arithmetic").
"""

from __future__ import annotations

import fcntl
import json
import math
import os
import re
import subprocess
import sys

import numpy as np
import pytest

from soft_molds.export import files
from soft_molds.export.files import json_bytes, write_atomic, write_file_set


def _listing(d):
    return sorted(p.name for p in d.iterdir())


def test_write_atomic_writes_exact_bytes(tmp_path):
    target = tmp_path / "a.stl"
    write_atomic(target, b"\x00\x01payload")
    assert target.read_bytes() == b"\x00\x01payload"
    assert _listing(tmp_path) == ["a.stl"]


def test_write_atomic_leaves_no_temp_and_keeps_old_file_when_write_fails(tmp_path):
    target = tmp_path / "a.stl"
    target.write_bytes(b"old")
    with pytest.raises(TypeError):
        write_atomic(target, object())  # not bytes-like: fails inside the write
    assert target.read_bytes() == b"old"
    assert _listing(tmp_path) == ["a.stl"]


def test_write_atomic_leaves_no_temp_when_replace_fails(tmp_path, monkeypatch):
    target = tmp_path / "a.stl"
    seen = []

    def broken_replace(src, dst):
        seen.append(os.path.basename(src))
        assert os.path.exists(src)  # the temporary was complete before the rename
        raise OSError("disk gone")

    monkeypatch.setattr(files.os, "replace", broken_replace)
    with pytest.raises(OSError, match="disk gone"):
        write_atomic(target, b"new")
    assert _listing(tmp_path) == []
    # hidden temporary carrying the pid, in the same directory
    assert seen[0].startswith(".a.stl.") and str(os.getpid()) in seen[0]


def test_write_file_set_stages_the_whole_set_beside_the_folder_then_swaps_once(
        tmp_path, monkeypatch):
    folder = tmp_path / "out" / "A"
    put = {"manifest.json": b"old manifest", "gone.stl": b"only in the old set"}
    folder.mkdir(parents=True)
    for name, data in put.items():
        (folder / name).write_bytes(data)
    swaps = []
    real_exchange = files._exchange

    def recording_exchange(a, b):
        # at the swap: the staging folder beside the target holds the complete new set,
        # the target still the complete old one, and nothing else is in the parent
        swaps.append((_read(a), _read(b), _listing(a.parent)))
        return real_exchange(a, b)

    monkeypatch.setattr(files, "_exchange", recording_exchange)
    new = {"manifest.json": b"{}\n", "shell_a.stl": b"A", "core.stl": b"C"}
    paths = write_file_set(folder, new, last="manifest.json")
    assert len(swaps) == 1
    staged, before, parent = swaps[0]
    assert staged == new and before == put
    staging, lock, target = parent
    assert re.fullmatch(rf"\.A\.{os.getpid()}\.\d+\.new", staging)  # hidden, this writer's
    assert (lock, target) == (".A.lock", "A")
    assert [p.name for p in paths] == ["manifest.json", "shell_a.stl", "core.stl"]
    assert _read(folder) == new  # replaced as a whole: gone.stl went with the old set
    assert _listing(folder.parent) == ["A"]  # no staging, old folder or lock file left


def _read(d):
    return {p.name: p.read_bytes() for p in sorted(d.iterdir())}


def test_write_file_set_failure_at_the_swap_leaves_the_old_folder_and_no_leftovers(
        tmp_path, monkeypatch):
    folder = tmp_path / "A"
    folder.mkdir()
    (folder / "manifest.json").write_bytes(b"old manifest")
    (folder / "b.stl").write_bytes(b"old b")

    def failing_exchange(a, b):
        raise OSError("quota")

    monkeypatch.setattr(files, "_exchange", failing_exchange)
    with pytest.raises(OSError, match="quota"):
        write_file_set(folder, {"a.stl": b"new a", "b.stl": b"new b",
                                "manifest.json": b"new manifest"}, last="manifest.json")
    assert _listing(tmp_path) == ["A"]
    assert _read(folder) == {"b.stl": b"old b", "manifest.json": b"old manifest"}


def test_two_rename_swap_puts_the_old_folder_back_when_the_second_rename_fails(
        tmp_path, monkeypatch):
    # Where the exchange is unsupported the swap is two renames (POSIX rename(2)).
    folder = tmp_path / "A"
    folder.mkdir()
    (folder / "b.stl").write_bytes(b"old b")
    real_rename = os.rename
    calls = []

    def second_fails(src, dst):
        calls.append((os.path.basename(src), os.path.basename(dst)))
        if len(calls) == 2:
            raise OSError("disk gone")
        real_rename(src, dst)

    monkeypatch.setattr(files, "_exchange", lambda a, b: False)
    monkeypatch.setattr(files.os, "rename", second_fails)
    with pytest.raises(OSError, match="disk gone"):
        write_file_set(folder, {"b.stl": b"new b"})
    tag = calls[0][1].split(".")[2:4]
    assert calls[:2] == [("A", f".A.{tag[0]}.{tag[1]}.old"), (f".A.{tag[0]}.{tag[1]}.new", "A")]
    assert _read(folder) == {"b.stl": b"old b"}
    assert _listing(tmp_path) == ["A"]


def test_two_rename_swap_replaces_the_folder_whole(tmp_path, monkeypatch):
    folder = tmp_path / "A"
    folder.mkdir()
    (folder / "old.stl").write_bytes(b"old")
    monkeypatch.setattr(files, "_exchange", lambda a, b: False)
    write_file_set(folder, {"new.stl": b"new"})
    assert _read(folder) == {"new.stl": b"new"}
    assert _listing(tmp_path) == ["A"]


def test_exchange_is_available_on_this_linux_file_system(tmp_path):
    # renameat2(2) with RENAME_EXCHANGE (Linux man-pages): both names stay, contents swap.
    if not sys.platform.startswith("linux"):
        pytest.skip("renameat2 is Linux only")
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    (tmp_path / "a" / "1").write_bytes(b"")
    assert files._exchange(tmp_path / "a", tmp_path / "b") is True
    assert _listing(tmp_path / "b") == ["1"] and _listing(tmp_path / "a") == []


def test_write_file_set_refuses_to_replace_a_plain_file(tmp_path):
    (tmp_path / "A").write_bytes(b"not a folder")
    with pytest.raises(NotADirectoryError):
        write_file_set(tmp_path / "A", {"a.stl": b"x"})
    assert (tmp_path / "A").read_bytes() == b"not a folder"
    assert _listing(tmp_path) == ["A"]


def test_write_file_set_inside_a_claim_of_the_same_folder_reuses_it(tmp_path):
    with files.claim_folder(tmp_path / "A") as claim:
        write_file_set(tmp_path / "A", {"a.stl": b"x"})
        assert claim.lock_path.exists()  # still held by the outer claim
    assert _listing(tmp_path) == ["A"]


def test_rewriting_the_same_set_gives_the_same_bytes_and_nothing_else(tmp_path):
    new = {"a.stl": bytes(range(256)) * 3, "manifest.json": json_bytes({"x": 0.1})}
    write_file_set(tmp_path / "A", new, last="manifest.json")
    first = _read(tmp_path / "A")
    write_file_set(tmp_path / "A", new, last="manifest.json")
    assert _read(tmp_path / "A") == first == new
    assert _listing(tmp_path) == ["A"]


def test_leftover_temporaries_of_an_older_writer_go_with_the_replaced_folder(tmp_path):
    # what a writer that renamed file by file left when killed: hidden temporaries
    folder = tmp_path / "A"
    folder.mkdir()
    (folder / "a.stl").write_bytes(b"half old")
    (folder / f".a.stl.{_dead_pid()}.0.tmp").write_bytes(b"partial")
    write_file_set(folder, {"a.stl": b"new"})
    assert _listing(folder) == ["a.stl"]


def _dead_pid():
    p = subprocess.Popen([sys.executable, "-c", ""])
    p.wait()
    return p.pid


def test_write_atomic_removes_temporaries_of_a_killed_writer_of_the_same_file(tmp_path):
    dead = tmp_path / f".a.stl.{_dead_pid()}.7.tmp"
    dead.write_bytes(b"partial")
    other = tmp_path / f".b.stl.{_dead_pid()}.7.tmp"  # another file's: not this writer's job
    other.write_bytes(b"partial")
    write_atomic(tmp_path / "a.stl", b"new")
    assert _listing(tmp_path) == [other.name, "a.stl"]


def test_a_temporary_whose_writer_holds_its_lock_is_kept(tmp_path):
    # a writer on another machine of a shared file system: its pid means nothing here,
    # its flock on the temporary does
    live = tmp_path / f".a.stl.{_dead_pid()}.7.tmp"
    live.write_bytes(b"being written")
    with open(live, "rb") as fh:
        fcntl.flock(fh.fileno(), fcntl.LOCK_EX)
        write_atomic(tmp_path / "a.stl", b"new")
        assert files.remove_stale_temps(tmp_path) == 0
        assert live.read_bytes() == b"being written"
    assert files.remove_stale_temps(tmp_path) == 1
    assert _listing(tmp_path) == ["a.stl"]


def test_write_file_set_failure_while_staging_touches_nothing(tmp_path):
    (tmp_path / "a.stl").write_bytes(b"old a")
    with pytest.raises(TypeError):
        write_file_set(tmp_path, {"a.stl": b"new a", "b.stl": object()}, last=None)
    assert _listing(tmp_path) == ["a.stl"]
    assert (tmp_path / "a.stl").read_bytes() == b"old a"


@pytest.mark.parametrize("name", ["../x", "sub/x.stl", "..", "a..b", "", "x\\y"])
def test_write_file_set_refuses_unsafe_names(tmp_path, name):
    with pytest.raises(ValueError):
        write_file_set(tmp_path / "out", {name: b"x"})
    assert not (tmp_path / "out").exists()  # refused before creating anything
    assert not (tmp_path / "x").exists()


def test_write_file_set_refuses_last_not_in_set(tmp_path):
    with pytest.raises(ValueError):
        write_file_set(tmp_path, {"a.stl": b"x"}, last="manifest.json")


def test_json_bytes_is_deterministic_ordered_and_round_trips():
    obj = {"z": 0.1, "a": [1, 2.5e-7, "Shore A10 \u00b0"], "m": {"k": 1e22, "j": -0.0}}
    text = json_bytes(obj)
    assert text == json_bytes(dict(obj))
    assert text.endswith(b"}\n") and not text.endswith(b"\n\n")
    decoded = text.decode("utf-8")
    assert list(json.loads(decoded)) == ["z", "a", "m"]  # given order, not sorted
    assert "\u00b0" in decoded  # ensure_ascii=False
    assert '\n  "z": 0.1,' in decoded  # indent 2, shortest repr (Python docs)
    assert json.loads(decoded) == obj  # floats round-trip exactly


def test_json_bytes_converts_numpy_scalars_exactly():
    out = json.loads(json_bytes({"v": np.float32(0.1), "n": np.int64(3), "a": np.arange(2)}))
    assert out == {"v": float(np.float32(0.1)), "n": 3, "a": [0, 1]}


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf, np.float32("nan")])
def test_json_bytes_refuses_non_finite(bad):
    # RFC 8259 section 6: NaN and Infinity are not permitted.
    with pytest.raises(ValueError):
        json_bytes({"part": {"volume_mm3": [1.0, bad]}})
