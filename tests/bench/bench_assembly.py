"""Assembly pictures benchmark (not collected by pytest): the time the exploded and
cut-away pictures and the preview page take per variant, against the whole build, and
the size of each file.

    .venv/bin/python tests/bench/bench_assembly.py [--keep DIR] [recipe.yaml ...]

Default: the first variant of every bundled recipe, each built in its own process.
``--keep DIR`` also writes the pictures and pages there (``<recipe>-<label>-<file>``).
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, sys, time
from pathlib import Path
from soft_molds import build
from soft_molds.recipe.load import load_variants
from soft_molds.export import assembly as A
_, r = load_variants(sys.argv[1])[0]
t = time.perf_counter()
m = build(r)
total = time.perf_counter() - t
man = m.manifest()
meshes = {p.name: p.mesh for p in m.parts}
t0 = time.perf_counter()
parts = A.view_parts(man, meshes)
t1 = time.perf_counter()
ex = A.exploded_view(parts, "x")
t2 = time.perf_counter()
cut = A.cutaway_view(parts, A.view_openings(man), "x")
t3 = time.perf_counter()
page = A.preview_html(parts, "x")
t4 = time.perf_counter()
pics, page = A.variant_pictures(man, meshes)
if sys.argv[2]:
    for name, data in [*((p.file, p.png) for p in pics), (A.PREVIEW_HTML, page)]:
        Path(sys.argv[2], f"{r.name}-{r.label}-{name}").write_bytes(data)
print(json.dumps(dict(recipe=r.name, label=r.label, build=total, decimate=t1 - t0,
                      exploded=t2 - t1, cutaway=t3 - t2, preview=t4 - t3,
                      triangles=[p.mesh.triangle_count for p in parts],
                      exploded_kb=len(ex) / 1024, cutaway_kb=len(cut) / 1024,
                      preview_kb=len(page) / 1024)))
"""


def main(argv: list[str]) -> None:
    keep = ""
    if argv[:1] == ["--keep"]:
        keep, argv = argv[1], argv[2:]
        Path(keep).mkdir(parents=True, exist_ok=True)
    recipes = argv or sorted(str(p) for p in (ROOT / "recipes").glob("*.yaml"))
    print(f"{'variant':28} {'build s':>8} {'decimate s':>10} {'pictures s':>10} {'ratio':>6} "
          f"{'exploded kB':>11} {'cutaway kB':>10} {'preview kB':>10}")
    for path in recipes:
        run = subprocess.run([sys.executable, "-c", CHILD, path, keep], cwd=ROOT,
                             capture_output=True, text=True)
        if run.returncode:
            print(f"{Path(path).stem:28} failed: {run.stderr.strip().splitlines()[-1]}")
            continue
        d = json.loads(run.stdout.strip().splitlines()[-1])
        pics = d["decimate"] + d["exploded"] + d["cutaway"] + d["preview"]
        print(f"{d['recipe'] + ' ' + d['label']:28} {d['build']:8.2f} {d['decimate']:10.2f} "
              f"{pics:10.2f} "
              f"{pics / d['build']:6.3f} {d['exploded_kb']:11.0f} {d['cutaway_kb']:10.0f} "
              f"{d['preview_kb']:10.0f}")


if __name__ == "__main__":
    main(sys.argv[1:])
