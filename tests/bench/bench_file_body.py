"""File body benchmark (not collected by pytest): the drawn finger against the bar recipe.

    .venv/bin/python tests/bench/bench_file_body.py

The seedling finger's bar is written as a STEP file (tests/stepfiles.py) and named by a
``file`` body; both recipes are validated and built in this process (after the CAD
kernel's import) and the signed distance of the mesh primitive is timed against the
closed-form rounded box on the same points. Prints seconds and ratios, asserts nothing.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path[:0] = [str(ROOT), str(ROOT / "tests")]

BAR = "  kind: bar\n  length_mm: 70\n  width_mm: 16\n  height_mm: 14\n  edge_radius_mm: 2"


def timed(fn):
    t = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t


def main() -> int:
    import cadquery  # noqa: F401  (the kernel's import is not the file body's cost)
    import numpy as np
    import stepfiles

    from soft_molds import build, load_recipe

    finger = ROOT / "recipes" / "seedling-finger.yaml"
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        (folder / "bar.step").write_bytes(stepfiles.rounded_box_bytes(70, 16, 14, 2))
        drawn = folder / "finger.yaml"
        drawn.write_text(finger.read_text().replace(BAR, "  kind: file\n  path: bar.step"))
        r_bar, t_load_bar = timed(lambda: load_recipe(finger))
        r_file, t_load_file = timed(lambda: load_recipe(drawn))
        _, t_build_bar = timed(lambda: build(r_bar))
        _, t_build_file = timed(lambda: build(r_file))
        pts = np.random.default_rng(1).uniform([-5, -12, -10], [75, 12, 10], (20000, 3))
        (box,), (mesh,) = r_bar.body_primitives(), r_file.body_primitives()
        _, t_box = timed(lambda: box.sdf(pts))
        _, t_mesh = timed(lambda: mesh.sdf(pts))
    print(f"validate: bar {t_load_bar:.2f} s, file {t_load_file:.2f} s "
          f"(x{t_load_file / t_load_bar:.1f})")
    print(f"build:    bar {t_build_bar:.2f} s, file {t_build_file:.2f} s "
          f"(x{t_build_file / t_build_bar:.2f})")
    print(f"sdf of 20000 points: closed form {t_box * 1e3:.1f} ms, mesh {t_mesh * 1e3:.0f} ms "
          f"(x{t_mesh / t_box:.0f})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
