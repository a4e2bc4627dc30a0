"""Helper processes of a sweep die with the process that started them.

A sweep's pool is a fork server (started by the sweep) and workers forked from it. When
the sweep is killed outright (``kill -9``, an out-of-memory kill) nothing tells them: the
workers would finish their variant and then wait for work forever, and the fork server
waits for its workers. So:

- the fork server asks the kernel for SIGKILL when the sweep dies (Linux parent-death
  signal, ``prctl(PR_SET_PDEATHSIG)``); elsewhere a thread polls its parent's pid;
- each worker asks for SIGKILL when the fork server dies, and also watches the sweep
  itself (the pipe multiprocessing leaves it is closed when the sweep dies): belt and
  braces where there is no parent-death signal.

The fork server can only import modules, so it arms itself when it imports this module
and finds :data:`PARENT_ENV` naming its parent; nothing else sets that variable.

The kernel sends the parent-death signal when the *thread* that started the process
ends: start sweeps from a thread that outlives them (the main thread, as the command
does). A fork server lost that way is started again by the next pool.
"""

from __future__ import annotations

import ctypes
import multiprocessing
import os
import signal
import sys
import threading
import time
from multiprocessing.connection import wait

PARENT_ENV = "SOFT_MOLDS_SWEEP_PARENT"
"""Set (to the sweep's pid) only while the sweep starts its pool's processes."""

_PR_SET_PDEATHSIG = 1  # linux/prctl.h


def die_with_parent() -> bool:
    """Ask the kernel to SIGKILL this process when its parent ends; False where there is
    no such request (not Linux, or it failed)."""
    if not sys.platform.startswith("linux"):
        return False
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        return int(libc.prctl(_PR_SET_PDEATHSIG, int(signal.SIGKILL), 0, 0, 0)) == 0
    except (OSError, AttributeError):
        return False


def _poll_parent(parent: int) -> None:
    while os.getppid() == parent:
        time.sleep(0.5)
    os._exit(1)


def bind_to_parent(parent: int) -> None:
    """End this process when ``parent`` (its parent now) ends, and at once if it already
    has (then this process was re-parented before it could ask)."""
    armed = die_with_parent()
    if os.getppid() != parent:
        os._exit(1)
    if not armed:
        threading.Thread(target=_poll_parent, args=(parent,), daemon=True,
                         name="soft-molds-parent-watch").start()


def bind_worker() -> None:
    """In a pool worker: end with the fork server (its parent) and with the sweep."""
    bind_to_parent(os.getppid())
    sweep = multiprocessing.parent_process()
    if sweep is None:
        return
    if not sweep.is_alive():
        os._exit(1)
    sentinel = sweep.sentinel

    def watch() -> None:
        wait([sentinel])  # ready once the sweep's end of the pipe is closed: it is gone
        os._exit(1)

    threading.Thread(target=watch, daemon=True, name="soft-molds-sweep-watch").start()


def _arm_fork_server() -> None:
    wanted = os.environ.pop(PARENT_ENV, None)
    if wanted is None:
        return
    # Importing this module imports the package first (about a second): the sweep that
    # started this process may have died meanwhile, and then this process was re-parented.
    if wanted != str(os.getppid()):
        os._exit(1)
    bind_to_parent(int(wanted))


_arm_fork_server()
