"""Build benchmark (not collected by pytest): time per stage and peak memory for every
bundled recipe, where the time of a warm build goes (the CAD kernel or our own work), and
how build time grows with the number of chambers.

    .venv/bin/python tests/bench/bench_build.py

Each recipe runs in a fresh process so peak memory (ru_maxrss) belongs to that build
alone. The first build in the process is the cold one (stage table); the same recipe is
then built and written again, warm (the kernel imported, caches filled, as in a sweep
worker), with every kernel entry point timed:

- kernel: time inside OCCT calls that make geometry (booleans, cleaning, fillets,
  primitives, moves, meshing) and the STEP translator, counted once at the outermost
  call;
- check: validity and mass-property (volume, centre) calls made to check what the kernel
  returned;
- convert: the rest of the tessellation (triangulation read into arrays, vertex welding);
- mesh check: the integrity check of every part's mesh (closed, consistent, volume);
- analysis: sprue/vent planning and the review, less any kernel time inside them;
- write: encoding and writing files, less the STEP translator;
- other: everything else (layout, label planning, bookkeeping).

Ratios are taken within one run, since absolute times on shared machines drift.
"""

from __future__ import annotations

import functools
import json
import resource
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]

STAGES = ["load", "body", "core", "tessellate", "features", "shell", "write"]
SPLIT = ["kernel", "step", "check", "convert", "mesh check", "analysis", "write", "other"]

#: cadquery methods that run OCCT construction algorithms (class name, method name).
KERNEL_METHODS = [
    ("Shape", "_bool_op"), ("Shape", "clean"), ("Shape", "fix"), ("Shape", "intersect"),
    ("Shape", "_apply_transform"), ("Shape", "moved"), ("Shape", "BoundingBox"),
    ("Mixin3D", "fillet"), ("Mixin3D", "chamfer"),
    ("Solid", "makeBox"), ("Solid", "makeCylinder"), ("Solid", "makeCone"),
    ("Compound", "makeCompound"), ("Face", "makePlane"),
    ("Workplane", "revolve"), ("Workplane", "radiusArc"), ("Workplane", "lineTo"),
]
#: cadquery methods that only measure or check a shape.
CHECK_METHODS = [("Shape", "isValid"), ("Shape", "Volume"), ("Shape", "Center")]


class Meter:
    """Seconds per category, counted at the outermost timed call only (a kernel method
    that calls another one is counted once)."""

    def __init__(self) -> None:
        self.seconds = dict.fromkeys(["kernel", "step", "check"], 0.0)
        self.calls = dict.fromkeys(["kernel", "step", "check"], 0)
        self._depth = 0

    def timed(self, category: str, fn: Callable[..., Any]) -> Callable[..., Any]:
        @functools.wraps(fn)
        def wrapper(*args: Any, **kwargs: Any) -> Any:
            if self._depth:
                return fn(*args, **kwargs)
            self._depth += 1
            t = time.perf_counter()
            try:
                return fn(*args, **kwargs)
            finally:
                self.seconds[category] += time.perf_counter() - t
                self.calls[category] += 1
                self._depth -= 1

        return wrapper

    def total(self) -> float:
        return sum(self.seconds.values())

    @contextmanager
    def envelope(self, into: dict[str, float], name: str) -> Iterator[None]:
        """Add to ``into[name]`` the time inside the block less the kernel time in it."""
        before = self.total()
        t = time.perf_counter()
        try:
            yield
        finally:
            into[name] = (into.get(name, 0.0) + time.perf_counter() - t
                          - (self.total() - before))


def _patch_method(meter: Meter, cls: type, name: str, category: str) -> None:
    raw = cls.__dict__[name]
    if isinstance(raw, classmethod):
        fn = raw.__func__
        setattr(cls, name, classmethod(meter.timed(category, fn)))
    elif isinstance(raw, staticmethod):
        setattr(cls, name, staticmethod(meter.timed(category, raw.__func__)))
    else:
        setattr(cls, name, meter.timed(category, raw))


def instrument() -> tuple[Meter, dict[str, float]]:
    """Time every kernel entry point the build uses; returns the meter and the dict the
    tessellation envelope adds its own (non-kernel) seconds to."""
    import cadquery as cq
    from cadquery.occ_impl import shapes

    from soft_molds.geometry import tessellate as tess

    meter = Meter()
    for methods, category in ((KERNEL_METHODS, "kernel"), (CHECK_METHODS, "check")):
        for cls_name, name in methods:
            owner = getattr(shapes, cls_name, None) or getattr(cq, cls_name)
            _patch_method(meter, owner, name, category)
    tess.BRepMesh_IncrementalMesh = meter.timed("kernel", tess.BRepMesh_IncrementalMesh)
    tess.step_bytes = meter.timed("step", tess.step_bytes)
    own: dict[str, float] = {}
    _envelope(meter, own, tess, "tessellate", "convert")
    from soft_molds import pipeline

    # The pipeline's mesh integrity check (closedness, winding, volume against the BRep).
    if hasattr(pipeline, "check_mesh"):
        _envelope(meter, own, pipeline, "check_mesh", "mesh check")
    return meter, own


def _envelope(meter: Meter, own: dict[str, float], owner: Any, attr: str, key: str) -> None:
    """Replace ``owner.attr`` by a wrapper adding its non-kernel seconds to ``own[key]``."""
    inner = getattr(owner, attr)

    @functools.wraps(inner)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        with meter.envelope(own, key):
            return inner(*args, **kwargs)

    setattr(owner, attr, wrapper)


def _build_and_write(r: Any) -> tuple[Any, float, float]:
    """The mold set, the seconds to build and write it, and the seconds writing took."""
    from soft_molds import build
    from soft_molds.export import write_mold_set

    t = time.perf_counter()
    m = build(r)
    with tempfile.TemporaryDirectory() as d:
        write_s = write_mold_set(m, d).write_s
    return m, time.perf_counter() - t, write_s


def child(src: str) -> None:
    """Measure one recipe in this process and print one JSON line."""
    from soft_molds import build, load_recipe
    from soft_molds.recipe import recipe_from_text

    t = time.perf_counter()
    import cadquery  # noqa: F401  (import cost reported apart from the build)
    imp = time.perf_counter() - t
    t = time.perf_counter()
    r = load_recipe(src) if src.endswith(".yaml") else recipe_from_text(
        Path(src).read_text(), src, "bench")
    load = time.perf_counter() - t
    t = time.perf_counter()
    m = build(r)
    b = time.perf_counter() - t
    from soft_molds.export import write_mold_set

    with tempfile.TemporaryDirectory() as d:
        write_s = write_mold_set(m, d).write_s
    out: dict[str, Any] = dict(m.timings_s, write=write_s, load=load, import_kernel=imp,
                               build_total=b,
                               peak_rss_mb=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
                               / 1024.0,
                               triangles=sum(p.mesh.triangle_count for p in m.parts))
    meter, own = instrument()
    warm, total, warm_write = _build_and_write(r)
    ts = warm.timings_s
    split = dict(meter.seconds, convert=own.get("convert", 0.0))
    split["mesh check"] = own.get("mesh check", 0.0)
    # The analysis stages and writing hold no kernel call but the STEP translator (write).
    split["analysis"] = ts.get("analysis", 0.0) + ts.get("features", 0.0)
    split["write"] = warm_write - meter.seconds["step"]
    split["other"] = total - sum(split.values())
    out["warm"] = dict(split, total=total, calls=meter.calls)
    print(json.dumps(out))


def run(src: str) -> dict[str, Any]:
    res = subprocess.run([sys.executable, __file__, "--child", src], capture_output=True,
                         text=True, check=True, cwd=ROOT)
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


def _share_row(name: str, w: dict[str, Any]) -> str:
    total = w["total"]
    kernel = w["kernel"] + w["step"]
    return (f"{name:<18}{total:>8.2f}" + "".join(f"{w[s]:>11.3f}" for s in SPLIT)
            + f"{100 * kernel / total:>9.0f}%{100 * w['kernel'] / total:>9.0f}%"
            + f"{w['calls']['check']:>9}")


def main() -> None:
    print("cold build, stage seconds")
    print(f"{'recipe':<18}" + "".join(f"{s:>11}" for s in STAGES)
          + f"{'total s':>9}{'peak MB':>9}{'tris':>8}")
    rows: list[tuple[str, dict[str, Any]]] = []
    for path in sorted((ROOT / "recipes").glob("*.yaml")):
        r = run(str(path))
        rows.append((path.stem, r))
        print(f"{path.stem:<18}" + "".join(f"{r.get(s, 0.0):>11.3f}" for s in STAGES)
              + f"{r['build_total'] + r['load'] + r['write']:>9.2f}{r['peak_rss_mb']:>9.0f}"
              f"{r['triangles']:>8}")
    with tempfile.TemporaryDirectory() as d:
        times = {}
        for n in (8, 32):
            p = Path(d) / f"bench-{n}.txt"
            p.write_text(chambers_recipe(n))
            times[n] = run(str(p))
            rows.append((f"chambers-{n}", times[n]))
            print(f"chambers {n:>2}: build {times[n]['build_total']:.2f} s "
                  f"(core {times[n]['core']:.2f} s, shell {times[n]['shell']:.2f} s, "
                  f"tessellate {times[n]['tessellate']:.2f} s), "
                  f"{times[n]['triangles']} triangles")
        ratio = times[32]["build_total"] / times[8]["build_total"]
        print(f"build time ratio 32 / 8 chambers: {ratio:.2f} (target <= 4.0)")
    print()
    print("warm build and write, seconds: kernel (OCCT construction and meshing), step "
          "(STEP translator), our own work")
    print(f"{'recipe':<18}{'total':>8}" + "".join(f"{s:>11}" for s in SPLIT)
          + f"{'kernel':>10}{'w/o STEP':>10}{'checks#':>9}")
    for name, r in rows:
        print(_share_row(name, r["warm"]))
    shares = [(r["warm"]["kernel"] + r["warm"]["step"]) / r["warm"]["total"] for _, r in rows]
    print(f"kernel share (with STEP): lowest {100 * min(shares):.0f}%, "
          f"highest {100 * max(shares):.0f}% (target >= 70%)")


if __name__ == "__main__":
    if len(sys.argv) == 3 and sys.argv[1] == "--child":
        child(sys.argv[2])
    else:
        main()
