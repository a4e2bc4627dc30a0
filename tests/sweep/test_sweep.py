"""The sweep runner on a small three-variant family (demo scenario): same bytes whatever
the number of workers, failures recorded while the rest go on, resume after a kill, the
morning report, and the same outputs on a two-worker Dask cluster on loopback."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from soft_molds.sweep import plan_tasks, run_sweep, write_reports

ROOT = Path(__file__).resolve().parents[2]

#: A stem cushion (bar with a bore) swept over three bore diameters: quick to build.
FAMILY = """
name: cushion-sweep
description: Three bore sizes of the stem cushion (Shore A10).
body: {kind: bar, length_mm: 30, width_mm: 20, height_mm: 12, edge_radius_mm: 2}
voids:
  - kind: bore
    diameter_mm: 4
    length_mm: 22
    end_round_mm: 1.5
inlet: {socket_diameter_mm: 5, socket_depth_mm: 5}
mold: {clamp_bolt: M3}
inflate: {working_pressure_kpa: 20}
variants:
  vary:
    voids[0].diameter_mm: [3, 4, 5]
"""


class Quiet:
    """A progress sink for tests."""

    def __init__(self):
        self.lines = []

    def step(self, o):
        self.lines.append((o.label, o.status))

    stream = sys.stderr


def _files(root: Path) -> dict[str, bytes]:
    return {str(p.relative_to(root)): p.read_bytes() for p in sorted(root.rglob("*"))
            if p.is_file() and p.parent.name in ("A", "B", "C")}


@pytest.fixture(scope="module")
def recipe_file(tmp_path_factory) -> Path:
    p = tmp_path_factory.mktemp("recipes") / "cushion-sweep.yaml"
    p.write_text(FAMILY)
    return p


@pytest.fixture(scope="module")
def one_job(recipe_file, tmp_path_factory):
    out = tmp_path_factory.mktemp("jobs1")
    outcomes, stopped = run_sweep(plan_tasks([recipe_file]), out, jobs=1, progress=Quiet())
    return out, outcomes, stopped


def test_every_variant_is_built_and_labelled_a_to_c(one_job):
    out, outcomes, stopped = one_job
    assert not stopped
    assert [(o.label, o.status) for o in outcomes] == [("A", "built"), ("B", "built"),
                                                       ("C", "built")]
    assert [o.changed for o in outcomes] == [{"voids[0].diameter_mm": d} for d in (3, 4, 5)]
    for o in outcomes:
        man = json.loads((Path(o.out_dir) / "manifest.json").read_text())
        assert man["label"] == o.label and man["params"]["voids"][0]["diameter_mm"] == \
            o.changed["voids[0].diameter_mm"]


def test_two_workers_write_the_same_bytes_as_one(one_job, recipe_file, tmp_path):
    out1, _, _ = one_job
    outcomes, _ = run_sweep(plan_tasks([recipe_file]), tmp_path, jobs=2, progress=Quiet())
    assert all(o.status == "built" for o in outcomes)
    a, b = _files(out1), _files(tmp_path)
    # 4 STL, 4 STEP, a print plate and its picture, two assembly pictures, the preview
    # page, 2 cards, the manifest
    assert sorted(a) == sorted(b) and len(a) == 3 * 16
    assert all(a[k] == b[k] for k in a)


def test_a_rerun_rebuilds_nothing_that_is_up_to_date(one_job, recipe_file):
    out, _, _ = one_job
    before = {p: p.stat().st_mtime_ns for p in out.rglob("manifest.json")}
    outcomes, _ = run_sweep(plan_tasks([recipe_file]), out, jobs=1, progress=Quiet())
    assert [o.status for o in outcomes] == ["up to date"] * 3
    assert {p: p.stat().st_mtime_ns for p in out.rglob("manifest.json")} == before
    # The summary's predicted motion reads the same from the manifest as from the build
    # (a centred bore: an extender, so an extension and no angle).
    built = one_job[1]
    assert [(o.bend_deg, o.extension_mm) for o in outcomes] == [
        (o.bend_deg, o.extension_mm) for o in built]
    assert all(o.bend_deg is None and o.extension_mm is not None and o.extension_mm > 0
               for o in outcomes)


def test_a_changed_or_damaged_variant_is_rebuilt(one_job, recipe_file, tmp_path):
    out, _, _ = one_job
    import shutil

    copy = tmp_path / "out"
    shutil.copytree(out, copy)
    stl = copy / "cushion-sweep" / "B" / "core.stl"
    stl.write_bytes(stl.read_bytes()[:-50])  # a truncated file no longer matches its digest
    outcomes, _ = run_sweep(plan_tasks([recipe_file]), copy, jobs=1, progress=Quiet())
    assert [o.status for o in outcomes] == ["up to date", "built", "up to date"]
    assert stl.read_bytes() == (out / "cushion-sweep" / "B" / "core.stl").read_bytes()


def test_a_kernel_failure_in_one_variant_is_reported_and_the_rest_complete(recipe_file,
                                                                           tmp_path):
    import faulty_worker

    outcomes, _ = run_sweep(plan_tasks([recipe_file]), tmp_path, jobs=2, progress=Quiet(),
                            worker=faulty_worker.worker)
    status = {o.label: o for o in outcomes}
    assert status["A"].status == status["C"].status == "built"
    assert status["B"].status == "failed"
    assert "injected kernel failure" in status["B"].reason
    assert "variant B" in status["B"].reason  # the kernel error names the variant
    assert not (tmp_path / "cushion-sweep" / "B").exists() or not list(
        (tmp_path / "cushion-sweep" / "B").iterdir())
    written = write_reports(outcomes, tmp_path)
    rows = json.loads((tmp_path / "summary.json").read_text())["variants"]
    assert [(r["label"], r["status"]) for r in rows] == [("A", "built"), ("B", "failed"),
                                                         ("C", "built")]
    csv = (tmp_path / "summary.csv").read_text().splitlines()
    assert csv[0].startswith("recipe,label,family,status") and len(csv) == 4
    assert "injected kernel failure" in csv[2]
    names = {p.name for p in written}
    assert {"family-sheet.png", "family-sheet.svg", "casting-card.md",
            "casting-card.html"} <= names


def test_a_killed_run_resumes_to_complete_with_no_partial_file(recipe_file, tmp_path):
    out = tmp_path / "out"
    cmd = [sys.executable, "-m", "soft_molds", "sweep", str(recipe_file), "--jobs", "1",
           "--out", str(out)]
    proc = subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL, start_new_session=True)
    first = out / "cushion-sweep" / "A" / "manifest.json"
    deadline = time.monotonic() + 120
    while not first.exists() and time.monotonic() < deadline and proc.poll() is None:
        time.sleep(0.05)
    assert first.exists(), "the first variant never finished"
    os.kill(proc.pid, signal.SIGKILL)  # the parent, mid-run
    proc.wait()
    try:  # and whatever worker it left behind, wherever it was
        os.killpg(proc.pid, signal.SIGKILL)
    except ProcessLookupError:
        pass
    time.sleep(0.2)
    done_before = {p.parent.name for p in out.rglob("manifest.json")}
    assert "A" in done_before and done_before != {"A", "B", "C"}
    outcomes, _ = run_sweep(plan_tasks([recipe_file]), out, jobs=1, progress=Quiet())
    assert all(o.ok for o in outcomes)
    for o in outcomes:
        expect = "up to date" if o.label in done_before else "built"
        assert o.status == expect, (o.label, o.status)
    leftovers = [p for p in out.rglob("*") if p.name.endswith(".tmp")]
    assert leftovers == []
    for d in ("A", "B", "C"):
        man = json.loads((out / "cushion-sweep" / d / "manifest.json").read_text())
        assert set(man["files"]) | {"manifest.json"} == {
            p.name for p in (out / "cushion-sweep" / d).iterdir()}


def test_a_two_worker_dask_cluster_on_loopback_writes_the_same_bytes(one_job, recipe_file,
                                                                     tmp_path):
    distributed = pytest.importorskip("distributed")
    out1, _, _ = one_job
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address="127.0.0.1:0") as cluster:
        outcomes, _ = run_sweep(plan_tasks([recipe_file]), tmp_path, progress=Quiet(),
                                scheduler=cluster.scheduler_address)
    assert [o.status for o in outcomes] == ["built"] * 3
    a, b = _files(out1), _files(tmp_path)
    assert sorted(a) == sorted(b) and all(a[k] == b[k] for k in a)


def _sigint_at_default() -> None:
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def test_ctrl_c_finishes_the_running_variant_and_reports_what_is_done(recipe_file,
                                                                      tmp_path):
    out = tmp_path / "out"
    cmd = [sys.executable, "-m", "soft_molds", "sweep", str(recipe_file), "--jobs", "1",
           "--out", str(out)]
    # Started as a shell starts a foreground command: Ctrl-C at its default, whatever the
    # test process inherited (Python installs its KeyboardInterrupt handler only over the
    # default, so an inherited "ignore" would make the sweep deaf to the signal).
    proc = subprocess.Popen(cmd, cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            text=True, preexec_fn=_sigint_at_default)
    first = out / "cushion-sweep" / "A" / "manifest.json"
    deadline = time.monotonic() + 120
    while not first.exists() and time.monotonic() < deadline and proc.poll() is None:
        time.sleep(0.05)
    assert first.exists(), "the first variant never finished"
    proc.send_signal(signal.SIGINT)  # what Ctrl-C sends to the foreground process
    stdout, stderr = proc.communicate(timeout=120)
    assert proc.returncode == 130, stderr
    assert "interrupted" in stderr and "Traceback" not in stderr
    rows = json.loads((out / "summary.json").read_text())["variants"]
    assert rows and all(r["status"] == "built" for r in rows) and len(rows) < 3
    assert [p for p in out.rglob("*") if p.name.endswith(".tmp")] == []


def test_a_worker_that_dies_fails_only_its_variant_and_loses_none(recipe_file, tmp_path):
    import faulty_worker

    outcomes, _ = run_sweep(plan_tasks([recipe_file]), tmp_path, jobs=2, progress=Quiet(),
                            worker=faulty_worker.dying_worker)
    got = {o.label: o.status for o in outcomes}
    assert got == {"A": "built", "B": "failed", "C": "built"}


def test_two_files_writing_the_same_folder_are_refused(recipe_file, tmp_path):
    from soft_molds.sweep import SweepInputError

    other = tmp_path / "copy.yaml"
    other.write_text(FAMILY.replace("mold: {clamp_bolt: M3}", "mold: {clamp_bolt: M4}"))
    with pytest.raises(SweepInputError) as e:
        plan_tasks([recipe_file, other])
    assert len(e.value.lines) == 3 and "both would write cushion-sweep/A/" in e.value.lines[0]
