"""Writers in child processes that are killed (SIGKILL) or paused at a chosen step.

A *step* is one call that opens or changes something on disk: ``os.open``, ``os.write``,
``os.pwrite``, ``os.ftruncate``, ``os.fsync``, ``os.rename``, ``os.replace``, ``os.unlink``,
``os.remove``, ``os.mkdir``, ``os.rmdir``, ``fcntl.flock`` and the directory exchange of
``soft_molds.export.files`` (when it has one). The counter wraps those functions in the child
only, so it counts whatever the writer under test does, whichever protocol it follows.
``kill_at=k`` sends SIGKILL to the child just before its k-th step (k from 1).

Run as a script it is a killable command line: ``python writer_processes.py OPS -- ARGS``
runs ``soft-molds ARGS`` and kills itself before the first step named in OPS (comma
separated) taken inside ``write_file_set``.
"""

from __future__ import annotations

import fcntl
import os
import signal
import sys
import traceback
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

OS_STEPS = ("open", "write", "pwrite", "ftruncate", "fsync", "rename", "replace", "unlink",
            "remove", "mkdir", "rmdir")
#: Steps that make something visible under its final name.
SWAPS = frozenset({"rename", "replace", "exchange"})


class Counter:
    """Counts steps while ``on``; calls ``hook(index, op)`` before each."""

    def __init__(self, hook: Callable[[int, str], None]):
        self.n = 0
        self.on = False
        self.hook = hook

    def wrap(self, op: str, fn: Callable[..., Any]) -> Callable[..., Any]:
        def counted(*args: Any, **kw: Any) -> Any:
            if self.on:
                self.n += 1
                self.hook(self.n, op)
            return fn(*args, **kw)
        return counted


def install(hook: Callable[[int, str], None], exchange: bool = True) -> Counter:
    """Wrap every step function of this process (call in the child only). With
    ``exchange=False`` the directory exchange reports "unsupported", so the writer has to
    use its fallback."""
    from soft_molds.export import files

    c = Counter(hook)
    for op in OS_STEPS:
        setattr(os, op, c.wrap(op, getattr(os, op)))
    fcntl.flock = c.wrap("flock", fcntl.flock)  # type: ignore[assignment]
    if hasattr(files, "_exchange"):
        real = files._exchange if exchange else (lambda a, b: False)
        files._exchange = c.wrap("exchange", real)
    return c


def killer(kill_at: int = 0, kill_before: frozenset[str] = frozenset()
           ) -> Callable[[int, str], None]:
    def hook(i: int, op: str) -> None:
        if i == kill_at or op in kill_before:
            os.kill(os.getpid(), signal.SIGKILL)
    return hook


@dataclass(frozen=True)
class Outcome:
    pid: int
    killed: bool            # died of SIGKILL
    exit_code: int | None   # when it exited
    steps: int              # steps counted, when it ran to the end (else -1)


def run_forked(job: Callable[[], object], kill_at: int = 0, exchange: bool = True
               ) -> Outcome:
    """Run ``job`` in a forked child that counts its steps and is killed before step
    ``kill_at`` (0: never)."""
    r, w = os.pipe()
    pid = os.fork()
    if pid == 0:  # the child: never returns into the caller
        code = 1
        try:
            os.close(r)
            c = install(killer(kill_at), exchange)
            c.on = True
            job()
            c.on = False
            os.write(w, str(c.n).encode())
            code = 0
        except BaseException:
            traceback.print_exc()
        finally:
            os._exit(code)
    os.close(w)
    with os.fdopen(r, "rb") as fh:
        text = fh.read().decode()
    _, status = os.waitpid(pid, 0)
    killed = os.WIFSIGNALED(status) and os.WTERMSIG(status) == signal.SIGKILL
    return Outcome(pid, killed, os.WEXITSTATUS(status) if os.WIFEXITED(status) else None,
                   int(text) if text else -1)


@dataclass
class Paused:
    pid: int
    exit_code: int | None = None


@contextmanager
def paused_writer(job: Callable[[], object], before: frozenset[str] = SWAPS
                  ) -> Iterator[Paused]:
    """Run ``job`` in a forked child that stops before its first step in ``before`` (by
    default: everything written, nothing yet visible under a final name) until the block
    ends; then let it finish and record its exit code."""
    ready_r, ready_w = os.pipe()
    go_r, go_w = os.pipe()
    pid = os.fork()
    if pid == 0:
        code = 1
        try:
            os.close(ready_r)
            os.close(go_w)
            paused: list[int] = []
            signal_ready = os.write  # captured before it is wrapped (not a step)

            def hook(i: int, op: str) -> None:
                if op in before and not paused:
                    paused.append(i)
                    signal_ready(ready_w, b"p")
                    os.read(go_r, 1)

            c = install(hook)
            c.on = True
            job()
            c.on = False
            code = 0 if paused else 3
        except BaseException:
            traceback.print_exc()
        finally:
            os._exit(code)
    os.close(ready_w)
    os.close(go_r)
    state = Paused(pid)
    try:
        if os.read(ready_r, 1) != b"p":
            raise AssertionError("the writer ended before reaching its pause")
        yield state
    finally:
        os.write(go_w, b"g")
        os.close(go_w)
        os.close(ready_r)
        _, status = os.waitpid(pid, 0)
        state.exit_code = os.WEXITSTATUS(status) if os.WIFEXITED(status) else None


def snapshot(folder: Path) -> dict[str, bytes] | None:
    """Name -> bytes of every entry of ``folder``; None when it does not exist."""
    if not folder.exists():
        return None
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


def put(folder: Path, files: dict[str, bytes]) -> None:
    """Lay down a folder with plain writes (independent of the code under test)."""
    folder.mkdir(parents=True)
    for name, data in files.items():
        (folder / name).write_bytes(data)


def _main(argv: list[str]) -> int:
    ops, _, args = argv[0], argv[1], argv[2:]
    from soft_molds import cli
    from soft_molds.export import files, writer

    c = install(killer(kill_before=frozenset(ops.split(","))))
    real = files.write_file_set

    def counted_write(*a: Any, **kw: Any) -> Any:
        c.on = True
        try:
            return real(*a, **kw)
        finally:
            c.on = False

    # The mold-set writer calls it by its own name for it.
    files.write_file_set = counted_write  # type: ignore[assignment]
    writer.write_file_set = counted_write  # type: ignore[assignment]
    return cli.main(args)


if __name__ == "__main__":
    sys.exit(_main(sys.argv[1:]))
