"""Writing output files: with :mod:`.claim`, the only module of soft_molds that touches the
file system. POSIX only (``fcntl``, ``rename(2)``).

Single files (:func:`write_atomic`): written under a hidden temporary name beside the target
(``.<name>.<pid>.<n>.tmp``, flock'ed by its writer while it exists), fsync'ed, then moved into
place with :func:`os.replace`, which is atomic when source and target share a directory. A
reader sees the previous file or the complete new one.

Folders (:func:`write_file_set`): one variant folder ``P/name`` is replaced as a whole, by one
writer at a time.

1. Claim ``P/name`` (:func:`.claim.claim_folder`: flock on ``P/.name.lock``); a live
   holder makes this fail at once with :class:`.claim.FolderBusyError`.
2. Under the claim, deal with what killed writers left (:func:`remove_stale_temps`).
3. Write every file into a fresh sibling ``P/.name.<pid>.<n>.new`` (O_EXCL, fsync each
   file, then fsync the folder).
4. Swap it in. On Linux ``renameat2(RENAME_EXCHANGE)`` exchanges the two directory entries
   in one step: at every instant ``P/name`` is the complete old folder or the complete new
   one. Where the exchange is unsupported (other systems, some network file systems) two
   renames do it, ``name -> .name.<pid>.<n>.old`` then ``.new -> name``; between them
   ``P/name`` is missing (never mixed), and a writer killed there leaves both halves whole,
   so the next claim puts the new folder in place (step 2).
5. fsync ``P``, remove the old folder, release the claim (the lock file is removed).

A kill at any step therefore leaves ``P/name`` holding the old set or the new set (with the
two-rename fallback, a kill between the renames leaves no ``P/name`` until the next claim).
What is left beside it (``.new``/``.old`` folders, a lock file no live process holds) is
removed by the next writer. A reader that opens files one by one by path while a swap happens can
still read the old manifest and a new part: a careful reader opens the folder once
(``os.open`` + ``dir_fd``) or checks the manifest's digests, as the sweep does.

Bytes are written exactly as given; nothing here adds a time stamp or reorders content.
"""

from __future__ import annotations

import ctypes
import errno
import fcntl
import functools
import itertools
import json
import math
import os
import re
import shutil
import sys
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import Any

import numpy as np

from .claim import FolderBusyError, claim_folder, pid_alive, same_file

__all__ = ["FolderBusyError", "claim_folder", "json_bytes", "remove_stale_temps",
           "write_atomic", "write_file_set"]

# Distinguishes temporaries of concurrent writers inside one process (threads); the pid
# distinguishes processes.
_counter = itertools.count()

_TEMP = re.compile(r"^\.(?P<name>.+)\.(?P<pid>\d+)\.(?P<n>\d+)\.tmp$")
_SIDE = re.compile(r"^\.(?P<name>.+)\.(?P<pid>\d+)\.(?P<n>\d+)\.(?P<kind>new|old)$")


def _remove_quietly(path: Path) -> None:
    try:
        os.unlink(path)
    except FileNotFoundError:
        pass


def _fsync_directory(directory: Path) -> None:
    """Make the entries of ``directory`` (renames, new files) durable."""
    fd = os.open(directory, os.O_RDONLY | os.O_CLOEXEC)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _write_all(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        view = view[os.write(fd, view):]


# ------------------------------------------------------------------------- single files


def write_atomic(path: Path, data: bytes) -> None:
    """Replace the file at ``path`` with ``data`` atomically.

    The parent directory must exist. Temporaries of this file left by killed writers are
    removed first. On any exception (including KeyboardInterrupt) the temporary is removed,
    the previous file (if any) is left untouched, and the exception propagates.
    """
    path = Path(path)
    _remove_dead_temps(path.parent, path.name)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.{next(_counter)}.tmp")
    # O_EXCL: never write through a stale temporary (or a symlink planted under its name).
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_CLOEXEC, 0o666)
    try:
        # Held until closed: tells remove_stale_temps that this temporary is alive.
        fcntl.flock(fd, fcntl.LOCK_EX)
        _write_all(fd, data)
        os.fsync(fd)
        os.replace(tmp, path)
    except BaseException:
        _remove_quietly(tmp)
        raise
    finally:
        os.close(fd)
    _fsync_directory(path.parent)


def write_new(path: Path, data: bytes) -> bool:
    """Create the file at ``path`` with ``data`` unless a file of that name exists; True
    when written. The bytes are staged and fsynced in a temporary, then hard-linked to
    ``path``: the link fails when the name is taken, so a person's file that appears
    meanwhile is never overwritten, and a reader never sees a half-written file."""
    path = Path(path)
    if path.exists():
        return False
    _remove_dead_temps(path.parent, path.name)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.{next(_counter)}.tmp")
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_CLOEXEC, 0o666)
    try:
        fcntl.flock(fd, fcntl.LOCK_EX)
        _write_all(fd, data)
        os.fsync(fd)
        try:
            os.link(tmp, path)
        except FileExistsError:
            return False
    finally:
        os.close(fd)
        _remove_quietly(tmp)
    _fsync_directory(path.parent)
    return True


def _remove_dead_temps(directory: Path, name: str | None = None) -> int:
    """Remove the temporaries (of file ``name``, or of any file) in ``directory`` whose
    writer is gone; returns how many."""
    try:
        entries = os.listdir(directory)
    except (FileNotFoundError, NotADirectoryError):
        return 0
    n = 0
    for entry in sorted(entries):
        m = _TEMP.match(entry)
        if m and (name is None or m["name"] == name) and _remove_if_dead(
                Path(directory) / entry, int(m["pid"])):
            n += 1
    return n


def _remove_if_dead(path: Path, pid: int) -> bool:
    # Its pid alive on this machine: maybe a writer between creating and locking it (or a
    # reused pid); leave it. Otherwise the lock tells (a writer on another host holds it).
    if pid == os.getpid() or pid_alive(pid):
        return False
    try:
        fd = os.open(path, os.O_RDONLY | os.O_NOFOLLOW | os.O_CLOEXEC)
    except OSError:
        return False
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False
        if not same_file(fd, path):
            return False
        os.unlink(path)
        return True
    finally:
        os.close(fd)


# -------------------------------------------------------------------------- whole folders


def _check_name(name: str) -> None:
    seps = {"/", "\\", os.sep} | ({os.altsep} if os.altsep else set())
    if not isinstance(name, str) or not name or name in (".",):
        raise ValueError(f"invalid output file name {name!r}")
    if any(s in name for s in seps) or ".." in name or "\x00" in name:
        raise ValueError(
            f"output file name {name!r} must be a plain name without path separators or '..'"
        )


def _check_nested(name: str) -> None:
    """``step/file``: one plain folder name and one plain file name."""
    parts = name.split("/")
    if len(parts) > 2:
        raise ValueError(f"output file name {name!r} is nested more than one folder deep")
    for p in parts:
        _check_name(p)


def write_file_set(
    directory: Path, files: Mapping[str, bytes], last: str | None = None,
    subfolders: bool = False
) -> list[Path]:
    """Replace the folder ``directory`` as a whole by one holding exactly ``files``.

    The parent is created if missing. The folder is claimed for the write (re-entrant: a
    caller may hold :func:`claim_folder` around a longer job); a live other writer makes
    this raise :class:`FolderBusyError` at once. Files in the old folder that are not in
    ``files`` go with it. ``last`` (e.g. ``"manifest.json"``) is written last into the
    staging folder; readers cannot tell the order, since the folder appears whole.

    On failure or a kill at any point, ``directory`` is the complete old folder (or absent,
    if there was none) or the complete new one. Returns the final paths in the mapping's
    order. ``subfolders``: names may be ``folder/file`` (one level; the folders are made in
    the staging folder, so they appear with the rest).
    """
    directory = Path(directory)
    names = list(files)
    for name in names:
        (_check_nested if subfolders else _check_name)(name)
    if last is not None and last not in files:
        raise ValueError(f"last={last!r} is not one of the files to write: {names}")
    if directory.name in ("", ".", ".."):
        raise ValueError(f"cannot replace {directory!s}: it has no folder name")
    order = [n for n in names if n != last] + ([last] if last is not None else [])
    directory.parent.mkdir(parents=True, exist_ok=True)
    with claim_folder(directory):
        _recover(directory)
        _replace_folder(directory, [(n, files[n]) for n in order])
    return [directory / n for n in names]


def _replace_folder(final: Path, items: list[tuple[str, bytes]]) -> None:
    if os.path.lexists(final) and not final.is_dir():
        raise NotADirectoryError(errno.ENOTDIR, "an output folder was expected here",
                                 str(final))
    tag = f"{os.getpid()}.{next(_counter)}"
    new = final.with_name(f".{final.name}.{tag}.new")
    os.mkdir(new)
    try:
        subs = sorted({name.split("/")[0] for name, _ in items if "/" in name})
        for sub in subs:
            os.mkdir(new / sub)
        for name, data in items:
            fd = os.open(new / name, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_CLOEXEC, 0o666)
            try:
                _write_all(fd, data)
                os.fsync(fd)
            finally:
                os.close(fd)
        for sub in subs:
            _fsync_directory(new / sub)
        _fsync_directory(new)
        old = _swap_in(new, final, tag)
    except BaseException:
        _remove_tree(new)
        raise
    _fsync_directory(final.parent)
    if old is not None:
        try:
            _remove_tree(old)
        except OSError:  # the new set is in place; the next writer removes the rest
            pass


def _swap_in(new: Path, final: Path, tag: str) -> Path | None:
    """Put the complete folder ``new`` at ``final``; return where the old folder went
    (None if there was none). Raises only with ``final`` as it was."""
    if not os.path.lexists(final):
        os.rename(new, final)
        return None
    if _exchange(new, final):
        return new
    old = final.with_name(f".{final.name}.{tag}.old")
    os.rename(final, old)
    try:
        os.rename(new, final)
    except BaseException:
        os.rename(old, final)
        raise
    return old


_RenameAt2 = Callable[[int, bytes, int, bytes, int], int]
_AT_FDCWD = -100
_RENAME_EXCHANGE = 2  # linux/fs.h


@functools.cache
def _renameat2() -> _RenameAt2 | None:
    # Python's os module has no renameat2; glibc has had it since 2.28 (Linux 3.15).
    if not sys.platform.startswith("linux"):
        return None
    try:
        fn = ctypes.CDLL(None, use_errno=True).renameat2
    except (OSError, AttributeError):
        return None
    fn.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    fn.restype = ctypes.c_int
    rename: _RenameAt2 = fn
    return rename


def _exchange(a: Path, b: Path) -> bool:
    """Atomically exchange the directory entries ``a`` and ``b``; False when this system or
    file system cannot (nothing changed then)."""
    fn = _renameat2()
    if fn is None:
        return False
    if fn(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.EINVAL, errno.ENOSYS, errno.ENOTSUP, errno.EOPNOTSUPP):
        return False
    raise OSError(err, os.strerror(err), str(b))


def _remove_tree(path: Path) -> None:
    if not os.path.lexists(path):
        return
    if path.is_symlink() or not path.is_dir():
        os.unlink(path)
    else:
        shutil.rmtree(path)


def _side_folders(final: Path) -> dict[str, dict[tuple[int, int], Path]]:
    """The ``.new`` and ``.old`` folders writers of ``final`` left beside it, by kind and
    (pid, counter)."""
    out: dict[str, dict[tuple[int, int], Path]] = {"new": {}, "old": {}}
    for entry in sorted(os.listdir(final.parent)):
        m = _SIDE.match(entry)
        if m and m["name"] == final.name:
            out[m["kind"]][(int(m["pid"]), int(m["n"]))] = final.parent / entry
    return out


def _recover(final: Path) -> int:
    """Under the claim of ``final``: finish a swap a killed writer left half done, remove
    every other leftover of earlier writers; returns how many leftovers went."""
    side = _side_folders(final)
    n = 0
    if not os.path.lexists(final):
        # Killed between the two renames of the fallback swap: its .new is complete (it
        # was fsync'ed before the first rename), so the swap is finished.
        both = sorted(set(side["new"]) & set(side["old"]))
        if both:
            os.rename(side["new"].pop(both[-1]), final)
            _fsync_directory(final.parent)
            n += 1
    for path in [*side["new"].values(), *side["old"].values()]:
        _remove_tree(path)
        n += 1
    if final.is_dir():
        n += _remove_dead_temps(final)  # single-file temporaries of older writers
    return n


def remove_stale_temps(directory: Path) -> int:
    """Remove what killed writers left for the folder ``directory``: its staging and old
    folders beside it (a half-done swap is finished first), and temporaries inside it whose
    writer is gone. Returns how many.

    Never touches a live writer's files: when another process holds the folder, nothing
    is done and 0 is returned. Finished files are never touched.
    """
    directory = Path(directory)
    if not directory.parent.is_dir():
        return 0
    try:
        with claim_folder(directory):
            return _recover(directory)
    except FolderBusyError:
        return 0


# --------------------------------------------------------------------------------- JSON


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


def probe_writable(root: Path) -> str | None:
    """Why files cannot be written under ``root``, or None when they can: a file is created
    and removed in ``root`` or, while it does not exist, in its nearest existing parent
    (where it would be created). Nothing is left behind."""
    where = Path(root)
    try:
        while not where.exists() and where.parent != where:
            where = where.parent
        if not where.is_dir():
            return f"{where} is not a folder"
        probe = where / f".write-probe.{os.getpid()}"
        fd = os.open(probe, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644)
        os.close(fd)
        _remove_quietly(probe)
    except OSError as exc:
        return exc.strerror or str(exc)
    return None
