"""Two sweeps that would fill the same recipe's family folder cannot interleave: while one
holds it, a second fails at once naming the folder and the holder, and writes nothing."""

from __future__ import annotations

import os
import threading

import pytest

from soft_molds.export.claim import FolderBusyError, claim_folder
from soft_molds.sweep import plan_tasks, run_sweep
from soft_molds.sweep.outcome import Outcome, Status


def _never(recipe, root, force) -> Outcome:  # the sweep must refuse before any build
    raise AssertionError("a variant was built while another run held the family folder")


def test_a_second_run_on_a_held_family_folder_fails_at_once(tmp_path, recipes):
    tasks = plan_tasks([recipes / "pair.yaml"])
    out = tmp_path / "out"
    out.mkdir()
    held, release = threading.Event(), threading.Event()

    def other_run() -> None:  # a claim is per thread: another thread stands for another run
        with claim_folder(out / "cushion-pair"):
            held.set()
            release.wait(30)

    t = threading.Thread(target=other_run)
    t.start()
    try:
        assert held.wait(30)
        with pytest.raises(FolderBusyError) as err:
            run_sweep(tasks, out, jobs=1, worker=_never)
    finally:
        release.set()
        t.join()
    assert err.value.holder.pid == os.getpid()
    assert "cushion-pair" in str(err.value)
    assert not (out / "cushion-pair").exists()


def test_once_released_the_folder_serves_the_next_run(tmp_path, recipes):
    tasks = plan_tasks([recipes / "pair.yaml"])

    def fake(recipe, root, force) -> Outcome:
        return Outcome(recipe.name, recipe.label, "", Status.FAILED, reason="not built")

    outcomes, interrupted = run_sweep(tasks, tmp_path / "out", jobs=1, worker=fake,
                                      executor=None)
    assert [o.status for o in outcomes] == [Status.FAILED, Status.FAILED]
    assert not interrupted
