"""One writer per output folder: an advisory lock file beside the folder.

The claim on folder ``P/name`` is an exclusive ``fcntl.flock`` on the file ``P/.name.lock``.
The lock file sits beside the folder, not inside it, because :mod:`.files` replaces the
folder as a whole by swapping directories: a lock inside would travel with the old folder.

- Taking it: open (creating) the lock file, ``flock(LOCK_EX | LOCK_NB)``, check the path
  still names the locked file (see releasing), then write ``"<pid> <host>"`` into it so a
  refused writer can say who holds the folder.
- Busy: a writer that finds the lock held fails at once with :class:`FolderBusyError`
  (folder and holder pid in one line); it never waits.
- Crash: the kernel drops a flock when the last descriptor of its holder closes, so a holder
  killed with SIGKILL leaves the file but no lock. The next writer takes it over and can
  read the dead holder's pid from it (:attr:`FolderClaim.took_over_from`).
- Releasing: the holder unlinks the file while it still holds the lock, then closes it. A
  writer that locked the unlinked file in between sees that the path now names another
  file (or none) and tries again, so two writers never both believe they hold the folder.

A claim is re-entrant within one thread (``write_file_set`` inside ``claim_folder`` of the
same folder); another thread of the same process is refused like another process. flock is
per open file, so a child forked while a claim is held shares it; the child drops its copy.
On NFS, Linux emulates flock with byte-range locks, which the server arbitrates across
machines; the holder's host is written beside its pid for that case.
"""

from __future__ import annotations

import errno
import fcntl
import os
import threading
import time
from collections.abc import Iterable, Iterator
from contextlib import ExitStack, contextmanager
from dataclasses import dataclass
from pathlib import Path

from ..errors import SoftMoldsError

_HOST = os.uname().nodename


@dataclass(frozen=True)
class Holder:
    """Who wrote a lock file: process id and host name ("" when it could not be read)."""

    pid: int
    host: str

    def describe(self) -> str:
        return f"process {self.pid}" + ("" if self.host == _HOST else f" on host {self.host}")

    def alive(self) -> bool:
        """True when the process is running (always assumed for another host)."""
        return self.host != _HOST or pid_alive(self.pid)


class FolderBusyError(SoftMoldsError, OSError):
    """Another live writer holds the output folder. Also an OSError (EBUSY), so every
    handler of "cannot write" reports it without a traceback."""

    def __init__(self, folder: Path, holder: Holder | None):
        self.folder = Path(folder)
        self.holder = holder
        who = holder.describe() if holder is not None else "another process"
        text = (f"output folder {self.folder} is being written by {who}; "
                "wait for it to finish or write to another output root")
        OSError.__init__(self, errno.EBUSY, text)

    def __str__(self) -> str:
        return str(self.strerror)

    def __reduce__(self) -> tuple[type[FolderBusyError], tuple[Path, Holder | None]]:
        return (type(self), (self.folder, self.holder))


@dataclass(frozen=True)
class FolderClaim:
    """A held claim. ``took_over_from``: the dead holder whose lock was left behind by a
    crash, when there was one."""

    folder: Path
    lock_path: Path
    took_over_from: Holder | None


def lock_path(directory: Path) -> Path:
    """Where the lock of ``directory`` lives: ``.<name>.lock`` in its parent (parent
    resolved, so two spellings of one folder share one lock)."""
    directory = Path(directory)
    if directory.name in ("", ".", ".."):
        raise ValueError(f"cannot claim {directory!s}: it has no folder name")
    return directory.parent.resolve() / f".{directory.name}.lock"


def pid_alive(pid: int) -> bool:
    """True when a process with this id exists on this machine."""
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # exists, owned by someone else
        return True
    return True


@dataclass
class _Held:
    fd: int
    thread: int
    depth: int
    claim: FolderClaim


_held: dict[Path, _Held] = {}
_held_guard = threading.Lock()


def _forget_in_child() -> None:
    # The child shares the parent's locked files; it must neither keep the lock alive after
    # the parent releases it nor believe it holds the folder itself.
    for h in _held.values():
        try:
            os.close(h.fd)
        except OSError:
            pass
    _held.clear()


os.register_at_fork(after_in_child=_forget_in_child)


def _parse_holder(text: bytes) -> Holder | None:
    parts = text.decode("utf-8", "replace").split()
    if not parts or not parts[0].isdigit():
        return None
    return Holder(int(parts[0]), parts[1] if len(parts) > 1 else "")


def _read_holder(fd: int, patience_s: float = 0.5) -> Holder | None:
    """The holder named in a lock file someone else holds. A writer that has just taken
    the lock may not have written its pid yet (the file may still name a dead earlier
    holder), so read again for up to ``patience_s`` until it names a live process."""
    deadline = time.monotonic() + patience_s
    while True:
        holder = _parse_holder(os.pread(fd, 256, 0))
        if (holder is not None and holder.alive()) or time.monotonic() >= deadline:
            return holder
        time.sleep(0.01)


def same_file(fd: int, path: Path) -> bool:
    """True when ``path`` names the file open as ``fd`` (not unlinked or replaced)."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        return False
    fst = os.fstat(fd)
    return (st.st_dev, st.st_ino) == (fst.st_dev, fst.st_ino)


def _lock(folder: Path, path: Path) -> tuple[int, Holder | None]:
    """Take the lock file at ``path``; return its descriptor and a dead holder left in it."""
    while True:
        fd = os.open(path, os.O_RDWR | os.O_CREAT | os.O_CLOEXEC, 0o644)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            holder = _read_holder(fd)
            os.close(fd)
            raise FolderBusyError(folder, holder) from None
        except BaseException:
            os.close(fd)
            raise
        if not same_file(fd, path):  # its holder released (unlinked) it meanwhile
            os.close(fd)
            continue
        try:
            previous = _parse_holder(os.pread(fd, 256, 0))
            os.ftruncate(fd, 0)
            os.write(fd, f"{os.getpid()} {_HOST}\n".encode())
        except BaseException:
            os.close(fd)
            raise
        return fd, previous


def _unlock(path: Path, fd: int) -> None:
    try:
        if same_file(fd, path):
            os.unlink(path)
    finally:
        os.close(fd)  # drops the flock


@contextmanager
def claim_folder(directory: Path) -> Iterator[FolderClaim]:
    """Hold ``directory`` (which need not exist; its parent must) for this thread.

    Raises :class:`FolderBusyError` at once when a live writer holds it. Nested claims of
    the same folder in the same thread share the outer one.
    """
    folder = Path(directory)
    path = lock_path(folder)
    me = threading.get_ident()
    with _held_guard:
        held = _held.get(path)
        if held is not None:
            if held.thread != me:
                raise FolderBusyError(folder, Holder(os.getpid(), _HOST))
            held.depth += 1
        else:
            fd, previous = _lock(folder, path)
            gone = previous if previous is not None and not previous.alive() else None
            held = _Held(fd, me, 1, FolderClaim(folder, path, gone))
            _held[path] = held
    try:
        yield held.claim
    finally:
        with _held_guard:
            held.depth -= 1
            if held.depth == 0:
                del _held[path]
                _unlock(path, held.fd)


@contextmanager
def claim_recipe_folders(root: Path, recipes: Iterable[str]) -> Iterator[None]:
    """Hold ``root/<recipe>`` for every recipe named (the root is made if missing), so two
    runs that would fill the same family folder cannot interleave: the second fails at once
    with :class:`FolderBusyError`. The variant folders under them are claimed one by one
    as they are written (different lock files), so the workers of this run are not held."""
    Path(root).mkdir(parents=True, exist_ok=True)
    with ExitStack() as stack:
        for name in sorted(set(recipes)):
            stack.enter_context(claim_folder(Path(root) / name))
        yield
