"""When the sweep itself is killed outright (``kill -9``, an out-of-memory kill), its
fork server and workers end within seconds instead of finishing their variants and then
waiting for work forever (each holding the CAD kernel's memory).

The processes are followed by pid through /proc (Linux): every process of the sweep's
session (it is started in a session of its own). One that has exited but was not yet
reaped by its new parent (a zombie) holds no memory and counts as ended.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from dataclasses import dataclass

import pytest

pytestmark = pytest.mark.skipif(not sys.platform.startswith("linux"),
                                reason="follows processes through /proc")

#: How long the helpers may outlive the sweep. Common practice for "promptly": the
#: kernel delivers the parent-death signal at once; this leaves room for a loaded machine.
GRACE_S = 5.0


@dataclass(frozen=True)
class Proc:
    pid: int
    ppid: int
    args: str


def _session(sid: int) -> dict[int, Proc]:
    """Live (not zombie) processes of session ``sid``."""
    out = {}
    for name in os.listdir("/proc"):
        if not name.isdigit():
            continue
        try:
            with open(f"/proc/{name}/stat") as f:
                stat = f.read()
            with open(f"/proc/{name}/cmdline", "rb") as f:
                args = f.read().replace(b"\0", b" ").decode(errors="replace")
        except OSError:
            continue
        # Fields after the command name, which is in parentheses and may hold spaces:
        # state, ppid, pgrp, session (proc(5)).
        state, ppid, _pgrp, session = stat[stat.rindex(")") + 2:].split()[:4]
        if int(session) == sid and state != "Z":
            out[int(name)] = Proc(int(name), int(ppid), args)
    return out


def _alive(pids: set[int]) -> set[int]:
    found = set()
    for pid in pids:
        try:
            with open(f"/proc/{pid}/stat") as f:
                stat = f.read()
        except OSError:
            continue
        if stat[stat.rindex(")") + 2] != "Z":
            found.add(pid)
    return found


def test_killing_the_sweep_ends_its_fork_server_and_workers_within_seconds(recipes,
                                                                           command):
    proc = subprocess.Popen(command("sweep", "pair.yaml", "--jobs", "2", "--out", "out"),
                            cwd=recipes, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                            start_new_session=True)
    try:
        deadline = time.monotonic() + 120
        servers, workers = set(), set()
        while time.monotonic() < deadline and proc.poll() is None:
            procs = _session(proc.pid)
            servers = {p.pid for p in procs.values() if "multiprocessing.forkserver" in p.args
                       and p.ppid == proc.pid}
            workers = {p.pid for p in procs.values() if p.ppid in servers}
            if len(workers) == 2:
                break
            time.sleep(0.1)
        assert len(servers) == 1 and len(workers) == 2, "the pool never started"
        time.sleep(1.0)  # both are building now
        helpers = set(_session(proc.pid)) - {proc.pid}
        assert servers | workers <= helpers
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait()
        killed = time.monotonic()
        while _alive(helpers) and time.monotonic() - killed < GRACE_S:
            time.sleep(0.05)
        left = _alive(helpers)
        assert left == set(), f"still running {GRACE_S} s after the sweep was killed: " + \
            "; ".join(f"{pid} {_session(proc.pid).get(pid)}" for pid in left)
    finally:
        try:
            os.killpg(proc.pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        if proc.poll() is None:
            proc.wait()
