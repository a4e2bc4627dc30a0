"""Every file a build writes, for every bundled recipe and variant, is byte-identical to the
digests recorded in ``tests/data/build-digests.json``.

The record was taken before the stage refactor; a difference means the output changed. When
a change is intended, record again (``python tests/export/test_build_digests.py --record``)
and say in the commit which files changed and why. ``manifest.json`` is compared without
``timings_s`` (seconds differ from run to run) after a canonical JSON dump.
"""

from __future__ import annotations

import hashlib
import json
import sys
import tempfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
RECORD = ROOT / "tests" / "data" / "build-digests.json"
RECIPES = sorted((ROOT / "recipes").glob("*.yaml"))


def _digests_of_folder(folder: Path, prefix: str) -> dict[str, str]:
    out = {}
    # Files of step folders (multi-step recipes) are named by their path in the folder.
    for path in sorted(p for p in folder.rglob("*") if p.is_file()):
        data = path.read_bytes()
        if path.name == "manifest.json":
            man = json.loads(data)
            man.pop("timings_s", None)
            data = json.dumps(man, sort_keys=True).encode()
        out[f"{prefix}/{path.relative_to(folder).as_posix()}"] = hashlib.sha256(data).hexdigest()
    return out


def _variants():
    from soft_molds import load_variants

    return [(p, r) for p in RECIPES for _, r in load_variants(p)]


def _digests_of(recipe, molds=None) -> dict[str, str]:
    from soft_molds import build
    from soft_molds.export.overmold import write_steps
    from soft_molds.pipeline import build_steps

    with tempfile.TemporaryDirectory() as tmp:
        if recipe.multi_step:
            write_steps(molds if molds is not None else build_steps(recipe), tmp)
        else:
            (molds if molds is not None else build(recipe)).export(tmp)
        return _digests_of_folder(Path(tmp) / recipe.name / recipe.label,
                                  f"{recipe.name}/{recipe.label}")


def record() -> dict[str, str]:
    out: dict[str, str] = {}
    for _, r in _variants():
        out.update(_digests_of(r))
    return out


_IDS = [f"{p.stem}-{r.label}" for p, r in _variants()]


@pytest.mark.parametrize("index", range(len(_IDS)), ids=_IDS)
def test_every_written_file_matches_the_recorded_digest(index):
    from conftest import MULTI_STEP, built_steps, built_variant

    path, recipe = _variants()[index]
    # Every variant is built once per session and shared with the other tests.
    shared = (built_steps(path.stem) if path.stem in MULTI_STEP
              else built_variant(path.stem, recipe.label))
    got = _digests_of(recipe, shared)
    want = {k: v for k, v in json.loads(RECORD.read_text()).items()
            if k.startswith(f"{recipe.name}/{recipe.label}/")}
    assert sorted(got) == sorted(want), "a different set of files was written"
    changed = sorted(k for k in got if got[k] != want[k])
    assert changed == [], f"files whose bytes changed: {changed}"


if __name__ == "__main__" and "--record" in sys.argv:
    RECORD.write_text(json.dumps(record(), indent=1, sort_keys=True) + "\n")
    print(f"recorded {RECORD}")
