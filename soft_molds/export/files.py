"""Writing output files: the only module of soft_molds that touches the file system.

Every file is written under a hidden temporary name in its final directory, flushed and
fsync'ed, then moved into place with :func:`os.replace` (atomic on POSIX and Windows when
source and target share a directory). A reader therefore sees either the previous file or the
complete new one, never a partial write. A set of files (the parts of one mold plus its
manifest) is staged completely before the first rename, and the manifest is renamed last, so
the presence of a fresh manifest implies its companions are complete.
"""

from __future__ import annotations

import itertools
import json
import math
import os
import re
from collections.abc import Mapping
from pathlib import Path
from typing import Any

import numpy as np

# Distinguishes temporaries of concurrent writers inside one process (threads); the pid
# distinguishes processes sharing an output directory.
_counter = itertools.count()


def _temp_path(path: Path) -> Path:
    return path.with_name(f".{path.name}.{os.getpid()}.{next(_counter)}.tmp")


def _remove_quietly(path: Path) -> None:
    try:
        os.unlink(path)
    except FileNotFoundError:
        pass


def _fsync_directory(directory: Path) -> None:
    # Makes the renames themselves durable; directories cannot be opened this way on
    # Windows, where the rename is already durable enough for our purpose.
    if os.name != "posix":
        return
    fd = os.open(directory, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _stage(path: Path, data: bytes) -> Path:
    """Write ``data`` completely to a fresh temporary beside ``path``; return its path."""
    tmp = _temp_path(path)
    # O_EXCL: never write through a stale temporary (or a symlink planted under its name).
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        _remove_quietly(tmp)
        raise
    return tmp


def write_atomic(path: Path, data: bytes) -> None:
    """Replace the file at ``path`` with ``data`` atomically.

    The parent directory must exist. On any exception (including KeyboardInterrupt) the
    temporary is removed, the previous file (if any) is left untouched, and the exception
    propagates.
    """
    path = Path(path)
    tmp = _stage(path, data)
    try:
        os.replace(tmp, path)
    except BaseException:
        _remove_quietly(tmp)
        raise
    _fsync_directory(path.parent)


def _check_name(name: str) -> None:
    seps = {"/", "\\", os.sep} | ({os.altsep} if os.altsep else set())
    if not isinstance(name, str) or not name or name in (".",):
        raise ValueError(f"invalid output file name {name!r}")
    if any(s in name for s in seps) or ".." in name or "\x00" in name:
        raise ValueError(
            f"output file name {name!r} must be a plain name without path separators or '..'"
        )


def write_file_set(
    directory: Path, files: Mapping[str, bytes], last: str | None = None
) -> list[Path]:
    """Write a set of files into ``directory`` (created with parents if missing).

    All files are staged to temporaries first; only when every temporary is complete are they
    renamed into place, in the mapping's order except that ``last`` (e.g. ``"manifest.json"``)
    goes last. An existing ``last`` file is removed before the first rename, so a manifest is
    never seen beside a half-replaced set. On failure no temporary remains and every file of
    the set is either its previous version or its complete new version.

    Returns the final paths in the mapping's order.
    """
    directory = Path(directory)
    names = list(files)
    for name in names:
        _check_name(name)
    if last is not None and last not in files:
        raise ValueError(f"last={last!r} is not one of the files to write: {names}")
    directory.mkdir(parents=True, exist_ok=True)

    staged: dict[str, Path] = {}
    try:
        for name in names:
            staged[name] = _stage(directory / name, files[name])
        order = [n for n in names if n != last] + ([last] if last is not None else [])
        if last is not None:
            # A stale manifest must not vouch for files that are about to change.
            _remove_quietly(directory / last)
        for name in order:
            os.replace(staged[name], directory / name)
            del staged[name]
    finally:
        for tmp in staged.values():
            _remove_quietly(tmp)
    _fsync_directory(directory)
    return [directory / n for n in names]


def _json_default(obj: Any) -> Any:
    # numpy scalars and arrays reach the manifest from geometry code; float32 is not a
    # Python float, so it needs converting (and then passes the NaN check like any float).
    if isinstance(obj, np.generic):
        return obj.item()
    if isinstance(obj, np.ndarray):
        return obj.tolist()
    raise TypeError(f"object of type {type(obj).__name__} is not JSON serialisable")


def _check_finite(obj: Any, where: str = "$") -> None:
    # json's own allow_nan=False message does not say where the bad value is.
    if isinstance(obj, float | np.floating):
        if not math.isfinite(float(obj)):
            raise ValueError(f"JSON cannot hold the non-finite number {obj!r} at {where}")
    elif isinstance(obj, Mapping):
        for k, v in obj.items():
            _check_finite(v, f"{where}.{k}")
    elif isinstance(obj, list | tuple):
        for i, v in enumerate(obj):
            _check_finite(v, f"{where}[{i}]")
    elif isinstance(obj, np.ndarray) and obj.dtype.kind in "fc":
        if not np.isfinite(obj).all():
            raise ValueError(f"JSON cannot hold non-finite numbers in the array at {where}")


def json_bytes(obj: Any) -> bytes:
    """Deterministic UTF-8 JSON: indent 2, keys in the given order, trailing newline.

    Floats use Python's shortest round-trip ``repr`` (stable across platforms). NaN and
    infinities are refused with ValueError (JSON has no spelling for them).
    """
    _check_finite(obj)
    text = json.dumps(
        obj,
        indent=2,
        ensure_ascii=False,
        sort_keys=False,
        allow_nan=False,
        separators=(",", ": "),
        default=_json_default,
    )
    return (text + "\n").encode("utf-8")


_STALE = re.compile(r"^\..+\.\d+\.\d+\.tmp$")


def remove_stale_temps(directory: Path) -> int:
    """Remove temporary files a killed writer left in ``directory`` (the names
    :func:`write_atomic` stages under); returns how many. Finished files are never
    touched."""
    if not directory.is_dir():
        return 0
    n = 0
    for p in directory.iterdir():
        if p.is_file() and _STALE.match(p.name):
            _remove_quietly(p)
            n += 1
    return n


def probe_writable(root: Path) -> str | None:
    """Why files cannot be written under ``root``, or None when they can: a file is staged
    and removed in ``root`` or, while it does not exist, in its nearest existing parent
    (where it would be created). Nothing is left behind."""
    where = Path(root)
    try:
        while not where.exists() and where.parent != where:
            where = where.parent
        if not where.is_dir():
            return f"{where} is not a folder"
        _remove_quietly(_stage(where / ".write-probe", b""))
    except OSError as exc:
        return exc.strerror or str(exc)
    return None
