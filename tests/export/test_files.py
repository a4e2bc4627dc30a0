"""Atomic writing of single files and file sets, and deterministic JSON.

Outside references: POSIX rename(2) / Python ``os.replace`` semantics (the target is either
the old or the new file); RFC 8259 (JSON has no NaN or Infinity); Python's float ``repr`` is
the shortest string that round-trips (Python docs, "Floating Point Arithmetic").
"""

from __future__ import annotations

import json
import math
import os

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


def test_write_file_set_renames_manifest_last(tmp_path, monkeypatch):
    order = []
    real_replace = os.replace

    def recording_replace(src, dst):
        # every temporary of the set exists before the first rename
        if not order:
            hidden = [n for n in os.listdir(os.path.dirname(dst)) if n.startswith(".")]
            assert len(hidden) == 3
        order.append(os.path.basename(dst))
        real_replace(src, dst)

    monkeypatch.setattr(files.os, "replace", recording_replace)
    out = tmp_path / "new" / "dir"
    paths = write_file_set(
        out, {"manifest.json": b"{}\n", "shell_a.stl": b"A", "core.stl": b"C"},
        last="manifest.json",
    )
    assert order == ["shell_a.stl", "core.stl", "manifest.json"]
    assert [p.name for p in paths] == ["manifest.json", "shell_a.stl", "core.stl"]
    assert (out / "core.stl").read_bytes() == b"C"
    assert _listing(out) == ["core.stl", "manifest.json", "shell_a.stl"]


def test_write_file_set_failure_leaves_no_temp_and_no_stale_manifest(tmp_path, monkeypatch):
    (tmp_path / "manifest.json").write_bytes(b"old manifest")
    (tmp_path / "b.stl").write_bytes(b"old b")
    real_replace = os.replace

    def failing_replace(src, dst):
        if os.path.basename(dst) == "b.stl":
            raise OSError("quota")
        real_replace(src, dst)

    monkeypatch.setattr(files.os, "replace", failing_replace)
    with pytest.raises(OSError, match="quota"):
        write_file_set(tmp_path, {"a.stl": b"new a", "b.stl": b"new b",
                                  "manifest.json": b"new manifest"}, last="manifest.json")
    # no temporaries; each file either old or complete new; old manifest not left vouching
    assert _listing(tmp_path) == ["a.stl", "b.stl"]
    assert (tmp_path / "a.stl").read_bytes() == b"new a"
    assert (tmp_path / "b.stl").read_bytes() == b"old b"


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
