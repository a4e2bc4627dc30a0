"""Motion model against the nonlinear plane-stress FE (not collected by pytest): the mesh
convergence of the reference behind tests/analysis/test_motion_nonlinear_fe.py, and where
the model's gap comes from.

    PYTHONPATH=. .venv/bin/python tests/bench/bench_motion_fe.py [h_mm ...]

Prints, per mesh size h (default 2, 1, 0.5 mm), the FE tip angle at each of the test's
pressures, the model's, their ratio and the seconds the FE took; then, at 1 kPa, the FE
angle with the pressure on the chambers' end faces alone and on their roofs and floors
alone, for the seedling section and for one with the same pitch and 2 mm chambers (walls
6 mm): a gap that does not shrink with the chambers' length is the end faces' local
bulging, which the model leaves out.
"""

from __future__ import annotations

import sys
import time
from dataclasses import replace

import numpy as np

from tests.analysis.test_motion_nonlinear_fe import (
    BAR,
    E_MPA,
    PRESSURES_KPA,
    X1,
    X2,
    slab_profile,
)
from tests.plane_stress_fe import ChamberedBar, inflate


def model_angles(bar: ChamberedBar, pressures: np.ndarray) -> np.ndarray:
    from soft_molds.analysis.motion.registry import model_for

    prof = slab_profile(bar)
    model = model_for(prof)
    assert model is not None
    return model.solve(prof, E_MPA, np.r_[0.0, pressures]).angle_deg[1:]


def main() -> None:
    sizes = [float(a) for a in sys.argv[1:]] or [2.0, 1.0, 0.5]
    ours = model_angles(BAR, PRESSURES_KPA)
    print("| h mm | elements | " + " | ".join(f"{p:.0f} kPa" for p in PRESSURES_KPA)
          + " | FE s |")
    print("|---" * (len(PRESSURES_KPA) + 3) + "|")
    print("| model | | " + " | ".join(f"{a:.2f}" for a in ours) + " | |")
    for h in sizes:
        t0 = time.perf_counter()
        fe = inflate(BAR, E_MPA, PRESSURES_KPA, X1, X2, h_mm=h)
        dt = time.perf_counter() - t0
        cells = [f"{b:.2f} ({a / b:.3f})" for a, b in zip(ours, fe.rotation_deg, strict=True)]
        print(f"| {h:g} | {fe.elements} | " + " | ".join(cells) + f" | {dt:.1f} |")
    print()
    print("| section at 1 kPa | model deg | FE all walls | FE end faces only | "
          "FE all less end faces |")
    print("|---|---|---|---|---|")
    short = replace(BAR, first_mm=BAR.first_mm + 1.5, depth_mm=2.0)
    for name, bar in (("seedling (5 mm chambers)", BAR), ("2 mm chambers", short)):
        one = np.array([1.0])
        m = model_angles(bar, one)[0]
        full = inflate(bar, E_MPA, one, X1, X2).rotation_deg[0]
        ends = inflate(bar, E_MPA, one, X1, X2, end_walls_only=True).rotation_deg[0]
        print(f"| {name} | {m:.3f} | {full:.3f} | {ends:.3f} | {full - ends:.3f} |")


if __name__ == "__main__":
    main()
