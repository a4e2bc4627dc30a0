"""Build benchmark (not collected by pytest): time per stage and peak memory for every
bundled recipe, and how build time grows with the number of chambers.

    .venv/bin/python tests/bench/bench_build.py

Each measurement runs in a fresh process so peak memory (ru_maxrss) belongs to that build
alone. Ratios are taken within one run, since absolute times on shared machines drift.
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, resource, sys, tempfile, time
t0 = time.perf_counter()
from soft_molds import build, load_recipe
from soft_molds.recipe import recipe_from_text
t = time.perf_counter()
import cadquery  # noqa: F401  (import cost reported apart from the build)
imp = time.perf_counter() - t
t = time.perf_counter()
src = sys.argv[1]
if src.endswith('.yaml'):
    r = load_recipe(src)
else:
    r = recipe_from_text(open(src).read(), src, 'bench')
load = time.perf_counter() - t
t = time.perf_counter()
m = build(r)
b = time.perf_counter() - t
from soft_molds.export import write_mold_set
with tempfile.TemporaryDirectory() as d:
    write = write_mold_set(m, d).write_s
out = dict(m.timings_s, write=write, load=load, import_kernel=imp, build_total=b,
           peak_rss_mb=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0,
           triangles=sum(p.mesh.triangle_count for p in m.parts))
print(json.dumps(out))
"""

STAGES = ["load", "body", "core", "tessellate", "features", "shell", "write"]


def run(src: str) -> dict:
    res = subprocess.run([sys.executable, "-c", CHILD, src], capture_output=True, text=True,
                         check=True, cwd=ROOT)
    return json.loads(res.stdout.strip().splitlines()[-1])


def chambers_recipe(n: int) -> str:
    length = n * 8 + 17
    return f"""
name: bench-{n}
body: {{kind: bar, length_mm: {length}, width_mm: 16, height_mm: 14, edge_radius_mm: 2}}
voids:
  - {{kind: chambers, count: {n}, pitch_mm: 8, depth_mm: 5, width_mm: 12, height_mm: 8,
     corner_radius_mm: 1, center_mm: [0, 1], feed_diameter_mm: 2}}
parting: {{axis: z, offset_mm: 1}}
"""


def main() -> None:
    print(f"{'recipe':<18}" + "".join(f"{s:>11}" for s in STAGES)
          + f"{'total s':>9}{'peak MB':>9}{'tris':>8}")
    for path in sorted((ROOT / "recipes").glob("*.yaml")):
        r = run(str(path))
        print(f"{path.stem:<18}" + "".join(f"{r.get(s, 0.0):>11.3f}" for s in STAGES)
              + f"{r['build_total'] + r['load'] + r['write']:>9.2f}{r['peak_rss_mb']:>9.0f}"
              f"{r['triangles']:>8}")
    with tempfile.TemporaryDirectory() as d:
        times = {}
        for n in (8, 32):
            p = Path(d) / f"bench-{n}.txt"
            p.write_text(chambers_recipe(n))
            times[n] = run(str(p))
            print(f"chambers {n:>2}: build {times[n]['build_total']:.2f} s "
                  f"(core {times[n]['core']:.2f} s, shell {times[n]['shell']:.2f} s, "
                  f"tessellate {times[n]['tessellate']:.2f} s), "
                  f"{times[n]['triangles']} triangles")
        ratio = times[32]["build_total"] / times[8]["build_total"]
        print(f"build time ratio 32 / 8 chambers: {ratio:.2f} (target <= 4.0)")


if __name__ == "__main__":
    main()
