"""Motion model against the nonlinear plane-stress FE (not collected by pytest): the mesh
convergence of the reference behind tests/analysis/test_motion_nonlinear_fe.py, and where
the model's gap comes from.

    PYTHONPATH=. .venv/bin/python tests/bench/bench_motion_fe.py [h_mm ...] [--3d h_mm ...]

Prints, per mesh size h (default 2, 1, 0.5 mm), the FE tip angle at each of the test's
pressures, the model's, their ratio and the seconds the FE took; then, at 1 kPa, the FE
angle with the pressure on the chambers' end faces alone and on their roofs and floors
alone, for the seedling section and for one with the same pitch and 2 mm chambers (walls
6 mm): a gap that does not shrink with the chambers' length is the end faces' local
bulging, which the model leaves out. Last, with ``--3d h ...``, a linear 3-D FE of the
finger's whole body (the seedling finger's bar and chambers without the edge rounding,
corner radii and feed channel; triquadratic hexahedra, Poisson's ratio 0.45, half the body
by its symmetry plane y = 0, the pressure on every chamber wall) at 1 kPa against the model
on the same body: the side walls the plane-stress section lacks. Minutes per size, and
gigabytes at h = 1.
"""

from __future__ import annotations

import math
import sys
import time
from dataclasses import replace

import numpy as np
import scipy.sparse as sp
from skfem import Basis, BilinearForm, ElementHex2, FacetBasis, LinearForm, MeshHex, condense, solve
from skfem.helpers import dot
from skfem.models.elasticity import lame_parameters

from tests.analysis.test_motion_nonlinear_fe import (
    BAR,
    E_MPA,
    PRESSURES_KPA,
    X1,
    X2,
    slab_profile,
)
from tests.meshes import box, from_manifold
from tests.plane_stress_fe import ChamberedBar, grid, inflate

WIDTH_MM, CHAMBER_WIDTH_MM = 16.0, 12.0     # the seedling finger's bar and chambers (y)


def model_angles(bar: ChamberedBar, pressures: np.ndarray) -> np.ndarray:
    from soft_molds.analysis.motion.registry import model_for

    prof = slab_profile(bar)
    model = model_for(prof)
    assert model is not None
    return model.solve(prof, E_MPA, np.r_[0.0, pressures]).angle_deg[1:]


def finger_model_deg(p_kpa: float) -> float:
    """The model on the finger's body as a box less its chambers (module docstring)."""
    from soft_molds.analysis.motion import profile_of
    from soft_molds.analysis.motion.registry import model_for

    body = box((0.0, -WIDTH_MM / 2, -BAR.height_mm / 2),
               (BAR.length_mm, WIDTH_MM / 2, BAR.height_mm / 2))
    for x0, x1 in BAR.chambers():
        body = body - box((x0, -CHAMBER_WIDTH_MM / 2, BAR.chamber_z0_mm),
                          (x1, CHAMBER_WIDTH_MM / 2, BAR.chamber_z1_mm))
    mesh = from_manifold(body)
    c = mesh.triangles().mean(axis=1)
    tol = 1e-6
    void = ((c[:, 0] > tol) & (c[:, 0] < BAR.length_mm - tol)
            & (np.abs(c[:, 1]) < WIDTH_MM / 2 - tol) & (np.abs(c[:, 2]) < BAR.height_mm / 2 - tol))
    prof = profile_of(mesh, void, X1, X2, ["chambers"])
    model = model_for(prof)
    assert model is not None
    return float(model.solve(prof, E_MPA, np.array([0.0, p_kpa])).angle_deg[1])


def finger_fe_3d_deg(h_mm: float, p_kpa: float = 1.0, nu: float = 0.45) -> tuple[float, int]:
    """Linear 3-D FE rotation (deg) of section X2 relative to X1 of the finger's body (module
    docstring), and the number of unknowns. Isotropic linear elasticity assembled per pair
    of displacement components on one scalar basis, as tests/analysis/test_motion_fe.py."""
    xs = grid(0.0, BAR.length_mm, h_mm, [x for c in BAR.chambers() for x in c] + [X1, X2])
    ys = grid(0.0, WIDTH_MM / 2, h_mm, [CHAMBER_WIDTH_MM / 2])
    zs = grid(-BAR.height_mm / 2, BAR.height_mm / 2, h_mm,
               [BAR.chamber_z0_mm, BAR.chamber_z1_mm])
    m = MeshHex.init_tensor(xs, ys, zs)
    c = m.p[:, m.t].mean(axis=1)
    inside = np.zeros(m.t.shape[1], dtype=bool)
    for x0, x1 in BAR.chambers():
        inside |= ((c[0] > x0) & (c[0] < x1) & (c[1] < CHAMBER_WIDTH_MM / 2)
                   & (c[2] > BAR.chamber_z0_mm) & (c[2] < BAR.chamber_z1_mm))
    m = m.remove_elements(np.flatnonzero(inside))
    basis = Basis(m, ElementHex2())
    lam, mu = lame_parameters(E_MPA, nu)

    def block(i: int, j: int):
        @BilinearForm
        def kij(u, v, w):
            out = lam * u.grad[j] * v.grad[i] + mu * u.grad[i] * v.grad[j]
            return out + mu * dot(u.grad, v.grad) if i == j else out
        return kij.assemble(basis)

    k = sp.bmat([[block(i, j) for j in range(3)] for i in range(3)], format="csr")
    n = basis.N
    bf = m.boundary_facets()
    mid = m.p[:, m.facets[:, bf]].mean(axis=1)
    outer = ((np.abs(mid[0]) < 1e-9) | (np.abs(mid[0] - BAR.length_mm) < 1e-9)
             | (np.abs(mid[1]) < 1e-9) | (np.abs(mid[1] - WIDTH_MM / 2) < 1e-9)
             | (np.abs(np.abs(mid[2]) - BAR.height_mm / 2) < 1e-9))
    fb = FacetBasis(m, ElementHex2(), facets=bf[~outer])

    def push(i: int) -> np.ndarray:
        @LinearForm
        def fi(v, w):
            return -p_kpa / 1000.0 * w.n[i] * v    # the fluid pushes each wall outward
        return fi.assemble(fb)

    f = np.concatenate([push(i) for i in range(3)])
    clamp = basis.get_dofs(lambda x: np.abs(x[0]) < 1e-9).all()
    mirror = basis.get_dofs(lambda x: np.abs(x[1]) < 1e-9).all()     # u_y = 0 on y = 0
    fixed = np.unique(np.concatenate([clamp, clamp + n, clamp + 2 * n, mirror + n]))
    u = solve(*condense(k, f, D=fixed))
    ux = u[basis.nodal_dofs[0]]

    def slope(x: float) -> float:
        sel = np.abs(m.p[0] - x) < 1e-9
        a = np.c_[np.ones(sel.sum()), m.p[2, sel]]
        return float(np.linalg.lstsq(a, ux[sel], rcond=None)[0][1])

    return math.degrees(slope(X2) - slope(X1)), 3 * n


def main() -> None:
    args = sys.argv[1:]
    cut = args.index("--3d") if "--3d" in args else len(args)
    sizes = [float(a) for a in args[:cut]] or [2.0, 1.0, 0.5]
    sizes_3d = [float(a) for a in args[cut + 1:]]
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
    if sizes_3d:
        ours_3d = finger_model_deg(1.0)
        print()
        print("| finger body at 1 kPa, linear 3-D FE h mm | unknowns | FE deg | model deg | "
              "ratio | s |")
        print("|---|---|---|---|---|---|")
        for h in sizes_3d:
            t0 = time.perf_counter()
            deg, dofs = finger_fe_3d_deg(h)
            print(f"| {h:g} | {dofs} | {deg:.4f} | {ours_3d:.4f} | {ours_3d / deg:.3f} | "
                  f"{time.perf_counter() - t0:.0f} |")


if __name__ == "__main__":
    main()
