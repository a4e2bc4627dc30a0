"""Motion model benchmark (not collected by pytest): the time the motion model takes per
variant (cutting the cast's sections, then solving every pressure step), against the whole
build, and what it predicts at the working pressure.

    .venv/bin/python tests/bench/bench_motion.py [recipe.yaml ...]

Default: every variant of recipes/finger-family.yaml and one variant of each other bundled
recipe. Each recipe is built in its own process; the model is then timed again alone on
the built cast, split into the cut and the solve.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, sys, time
from soft_molds import build
from soft_molds.recipe.load import load_variants
from soft_molds.analysis.motion import (motion_curve, predict_motion, profile_of,
                                        void_facet_mask)
pairs = load_variants(sys.argv[1])
if sys.argv[2] == "first":
    pairs = pairs[:1]
for _, r in pairs:
    t = time.perf_counter()
    m = build(r)
    total = time.perf_counter() - t
    cast = m.part("cast").mesh
    t = time.perf_counter()
    curve = predict_motion(m.recipe, cast, m.pressures)
    alone = time.perf_counter() - t
    cut = solve = 0.0
    if curve is not None:
        t = time.perf_counter()
        prof = profile_of(cast, void_facet_mask(r, cast), curve.inputs.active_from_mm,
                          curve.inputs.active_to_mm, [type(v).KIND for v in r.voids])
        cut = time.perf_counter() - t
        t = time.perf_counter()
        limits = [w.limit_kpa for w in m.pressures if w.limit_kpa is not None]
        motion_curve(prof, curve.inputs.youngs_modulus_mpa, min(limits) if limits else None,
                     r.inflate.working_pressure_kpa)
        solve = time.perf_counter() - t
    w = None if curve is None else curve.at_working
    print(json.dumps(dict(label=r.label, build=total, motion=m.timings_s.get("motion", 0.0),
                          alone=alone, cut=cut, solve=solve,
                          sections=0 if curve is None else curve.inputs.sections,
                          triangles=cast.triangle_count,
                          model=None if curve is None else curve.model,
                          headline=None if curve is None else curve.headline,
                          angle=None if w is None else w.angle_deg,
                          ext=None if w is None else w.extension_mm)))
"""


def main() -> None:
    if len(sys.argv) > 1:
        jobs = [(Path(a), "all") for a in sys.argv[1:]]
    else:
        recipes = sorted((ROOT / "recipes").glob("*.yaml"))
        jobs = [(p, "all" if p.stem == "finger-family" else "first") for p in recipes]
    print("| recipe | variant | model | cast triangles | sections | motion s | cut s | "
          "solve s | build s | at working pressure |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    for path, which in jobs:
        res = subprocess.run([sys.executable, "-c", CHILD, str(path), which],
                             capture_output=True, text=True, check=True, cwd=ROOT)
        for line in res.stdout.strip().splitlines():
            if not line.startswith("{"):
                continue
            d = json.loads(line)
            print(f"| {path.stem} | {d['label']} | {d['model']} | {d['triangles']} | "
                  f"{d['sections']} | {d['motion']:.2f} | {d['cut']:.2f} | {d['solve']:.2f} | "
                  f"{d['build']:.1f} | {d['headline']} |")


if __name__ == "__main__":
    main()
