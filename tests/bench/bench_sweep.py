"""Sweep benchmark (not collected by pytest): throughput of ``--jobs 2`` against
``--jobs 1`` on a 20-variant sweep of the bundled seedling finger, peak memory per
worker, resident memory drift of the workers across a 100-variant run, and how long the
pool's processes outlive a sweep killed with ``kill -9`` (Linux).

    .venv/bin/python tests/bench/bench_sweep.py [--only kill]

Both throughput runs happen in this one process run, back to back, so their ratio is
measured under the same machine load. Targets: ratio >= 1.8 on two cores; drift <= 10 %;
helpers gone well under a second after the kill.
"""

from __future__ import annotations

import os
import signal
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from soft_molds.sweep import plan_tasks, run_sweep  # noqa: E402

FINGER = (ROOT / "recipes" / "seedling-finger.yaml").read_text()
SWEEP20 = FINGER + "variants:\n  vary:\n    voids[0].height_mm: {from: 6, to: 10, count: 20}\n"
CUSHION = """
name: cushion-drift
body: {kind: bar, length_mm: 30, width_mm: 20, height_mm: 12, edge_radius_mm: 2}
voids:
  - {kind: bore, diameter_mm: 4, length_mm: 22, end_round_mm: 1.5}
inlet: {socket_diameter_mm: 5, socket_depth_mm: 5}
mold: {clamp_bolt: M3}
variants:
  vary:
    voids[0].diameter_mm: {from: 3, to: 4.98, count: 100}
"""


class Quiet:
    stream = sys.stderr

    def step(self, o):
        pass


def timed(text: str, name: str, jobs: int, **kw):
    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / f"{name}.yaml"
        p.write_text(text)
        tasks = plan_tasks([p])
        t = time.perf_counter()
        outcomes, _ = run_sweep(tasks, Path(d) / "out", jobs=jobs, progress=Quiet(), **kw)
        return time.perf_counter() - t, outcomes


def _session(sid: int) -> set[int]:
    """Live (not zombie) processes of session ``sid`` (proc(5): state, ppid, pgrp, sid)."""
    out = set()
    for name in filter(str.isdigit, os.listdir("/proc")):
        try:
            with open(f"/proc/{name}/stat") as f:
                fields = f.read().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if fields[0] != "Z" and int(fields[3]) == sid:
            out.add(int(name))
    return out


def outlive_kill() -> None:
    """Kill a two-worker sweep mid-variant; time until its last helper process ends."""
    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / "cushion2.yaml"
        p.write_text(CUSHION.replace("count: 100", "count: 2"))
        proc = subprocess.Popen([sys.executable, "-m", "soft_molds", "sweep", str(p),
                                 "--jobs", "2", "--out", str(Path(d) / "out")], cwd=d,
                                stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                                start_new_session=True)
        try:
            while len(_session(proc.pid)) < 5 and proc.poll() is None:  # + tracker, server
                time.sleep(0.05)
            time.sleep(1.0)
            helpers = _session(proc.pid) - {proc.pid}
            os.kill(proc.pid, signal.SIGKILL)
            proc.wait()
            t = time.perf_counter()
            while _session(proc.pid) & helpers and time.perf_counter() - t < 60:
                time.sleep(0.005)
            print(f"kill -9 of a two-worker sweep: its {len(helpers)} helper processes "
                  f"(resource tracker, fork server, workers) gone after "
                  f"{time.perf_counter() - t:.3f} s")
        finally:
            try:
                os.killpg(proc.pid, signal.SIGKILL)
            except ProcessLookupError:
                pass


def main() -> None:
    if sys.argv[1:] == ["--only", "kill"]:
        outlive_kill()
        return
    t1, o1 = timed(SWEEP20, "finger20", 1)
    t2, o2 = timed(SWEEP20, "finger20", 2)
    assert all(o.status == "built" for o in o1 + o2), [o.reason for o in o1 + o2 if o.reason]
    print("| run | variants | wall s | variants/min | peak RSS per worker MB |")
    print("|---|---|---|---|---|")
    for name, t, o in (("--jobs 1", t1, o1), ("--jobs 2", t2, o2)):
        print(f"| {name} | {len(o)} | {t:.1f} | {len(o) / t * 60:.1f} | "
              f"{max(x.worker_peak_mb for x in o):.0f} |")
    print(f"throughput --jobs 2 / --jobs 1: {t1 / t2:.2f} (target >= 1.8)")

    t, o = timed(CUSHION, "cushion100", 2, recycle_after=20)
    rss = [x.worker_rss_mb for x in o]
    first, last = statistics.median(rss[5:15]), statistics.median(rss[-10:])
    print(f"100-variant run, 2 workers recycled every 20: {t:.1f} s; worker RSS after a "
          f"variant: median {first:.0f} MB early, {last:.0f} MB late, max {max(rss):.0f} MB; "
          f"drift {100 * (last - first) / first:+.1f} % (target <= 10 %); "
          f"{len({x.worker_pid for x in o})} worker processes used")
    if sys.platform.startswith("linux"):
        outlive_kill()


if __name__ == "__main__":
    main()
