"""Review benchmark (not collected by pytest): time of the manufacturability review
against the time of the build it checks, for every bundled recipe.

    .venv/bin/python tests/bench/bench_analysis.py

Each recipe is built in a fresh process (after the CAD kernel import, which is reported
apart). "build" is everything the pipeline does except the review; the target is a review
of at most half the build time, measured as a ratio within one run.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, sys, time
from soft_molds import build, load_recipe
import cadquery  # noqa: F401
r = load_recipe(sys.argv[1])
t = time.perf_counter()
m = build(r)
total = time.perf_counter() - t
try:
    import embreex  # noqa: F401
    backend = "embree"
except ImportError:
    backend = "trimesh"
print(json.dumps(dict(total=total, analysis=m.timings_s.get("analysis", 0.0),
                      findings=len(m.findings), backend=backend,
                      triangles=sum(p.mesh.triangle_count for p in m.parts))))
"""


def main() -> None:
    rows = []
    for path in sorted((ROOT / "recipes").glob("*.yaml")):
        res = subprocess.run([sys.executable, "-c", CHILD, str(path)], capture_output=True,
                             text=True, check=True, cwd=ROOT)
        d = json.loads(res.stdout.strip().splitlines()[-1])
        build_s = d["total"] - d["analysis"]
        rows.append((path.stem, build_s, d["analysis"], d["analysis"] / build_s,
                     d["triangles"], d["findings"], d["backend"]))
    print("| recipe | build s | review s | review / build | triangles | findings | rays |")
    print("|---|---|---|---|---|---|---|")
    for name, b, a, ratio, tri, nf, be in rows:
        print(f"| {name} | {b:.2f} | {a:.2f} | {ratio:.2f} | {tri} | {nf} | {be} |")
    worst = max(r[3] for r in rows)
    print(f"worst review / build: {worst:.2f} (target <= 0.5)")


if __name__ == "__main__":
    main()
