"""The motion model's beam reduction against an independent 3-D finite-element solution
(scikit-fem, triquadratic hexahedra, linear elasticity).

The body: a bar with a rectangular channel raised off its axis, open at the inlet face and
closed by an end wall. The FE model clamps the inlet face and puts the pressure on the
channel's end wall only: the force P A_p along +x at the channel's centroid, which is the
load the beam model takes at every section (module docstring of
``soft_molds.analysis.motion.bending``). What is compared is therefore the section
reduction (neutral axis, second moment and lever arm read off the cast mesh) and the
plane-section assumption, not the neglected pressure on the channel's side walls.

Tolerance 3 %: the rotation is measured between two sections far from both ends (more
than two section depths: Saint-Venant's principle, the end effects decay over about one
depth), the bar is slender (length / depth about 4 between the sections) so shear
deformation (order (depth/length)^2 of Timoshenko's correction) stays below about 1 %, and
the triquadratic elements do not lock in bending; refining the mesh (12 x 4 x 4 elements
to 24 x 8 x 6, plus the lines on the channel's faces) moved the FE rotation by 0.004 %
when this test was written, and the two answers then differed by 0.1 %.
Poisson's ratio 0.45 (not 0.5: pure-displacement elements lock at incompressibility);
the slender beam's bending does not depend on it.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

skfem = pytest.importorskip("skfem")

import scipy.sparse as sp  # noqa: E402
from skfem import (  # noqa: E402
    Basis,
    BilinearForm,
    ElementHex2,
    FacetBasis,
    LinearForm,
    MeshHex,
    condense,
    solve,
)
from skfem.helpers import dot  # noqa: E402
from skfem.models.elasticity import lame_parameters  # noqa: E402

from soft_molds.analysis.motion import motion_curve, profile_of  # noqa: E402
from tests.meshes import box, from_manifold  # noqa: E402

E_MPA, NU = 0.413, 0.45
L, B, H = 60.0, 16.0, 12.0                  # bar (x, y, z), mm; inlet face at x = 0
CB, CZ0, CZ1, CX1 = 8.0, 0.0, 4.0, 56.0     # channel: |y| < 4, z in [0, 4], x in [0, 56]
P_KPA = 1.0
X1, X2 = 20.0, 44.0                         # sections the rotation is measured between


def _fe_rotation_deg(nx: int, ny: int, nz: int) -> float:
    # Grid lines on the channel's faces, so the channel is a set of whole elements.
    xs = np.unique(np.r_[np.linspace(0, CX1, nx + 1), np.linspace(CX1, L, 3), X1, X2])
    ys = np.unique(np.r_[np.linspace(-B / 2, B / 2, ny + 1), -CB / 2, CB / 2])
    zs = np.unique(np.r_[np.linspace(-H / 2, H / 2, nz + 1), CZ0, CZ1])
    m = MeshHex.init_tensor(xs, ys, zs)
    c = m.p[:, m.t].mean(axis=1)
    inside = (c[0] < CX1) & (np.abs(c[1]) < CB / 2) & (c[2] > CZ0) & (c[2] < CZ1)
    m = m.remove_elements(np.flatnonzero(inside))
    basis = Basis(m, ElementHex2())
    lam, mu = lame_parameters(E_MPA, NU)
    # Isotropic linear elasticity, a(u, v) = lambda div u div v + 2 mu eps(u):eps(v),
    # assembled per pair of displacement components (i: test, j: trial) on one scalar
    # basis: K_ij = lambda d_j(phi) d_i(psi) + mu d_i(phi) d_j(psi) + mu delta_ij
    # grad(phi).grad(psi). (The same matrix as skfem's vector form, far faster.)
    def block(i: int, j: int):
        @BilinearForm
        def kij(u, v, w):
            out = lam * u.grad[j] * v.grad[i] + mu * u.grad[i] * v.grad[j]
            return out + mu * dot(u.grad, v.grad) if i == j else out
        return kij.assemble(basis)

    k = sp.bmat([[block(i, j) for j in range(3)] for i in range(3)], format="csr")
    n = basis.N
    cap = m.facets_satisfying(lambda x: (np.abs(x[0] - CX1) < 1e-9) & (np.abs(x[1]) < CB / 2)
                              & (x[2] > CZ0) & (x[2] < CZ1))
    fb = FacetBasis(m, ElementHex2(), facets=cap)
    p_mpa = P_KPA / 1000.0

    @LinearForm
    def push(v, w):
        return p_mpa * v             # the fluid pushes the end wall along +x

    f = np.zeros(3 * n)
    f[:n] = push.assemble(fb)
    fixed = basis.get_dofs(lambda x: np.abs(x[0]) < 1e-9).all()
    u = solve(*condense(k, f, D=np.concatenate([fixed, fixed + n, fixed + 2 * n])))
    ux = u[basis.nodal_dofs[0]]
    pts = m.p

    def slope(x: float) -> float:
        sel = np.abs(pts[0] - x) < 1e-9
        # least-squares u_x = a + b y + t z over the section's corner nodes: t = -rotation
        a = np.c_[np.ones(sel.sum()), pts[1, sel], pts[2, sel]]
        return float(np.linalg.lstsq(a, ux[sel], rcond=None)[0][2])

    return math.degrees(slope(X2) - slope(X1))


@pytest.fixture(scope="module")
def model_angle_deg() -> float:
    body = box((0, -B / 2, -H / 2), (L, B / 2, H / 2)) - box(
        (-1.0, -CB / 2, CZ0), (CX1, CB / 2, CZ1))
    mesh = from_manifold(body)
    cen = mesh.triangles().mean(axis=1)
    void = ((cen[:, 0] < CX1 - 1e-3) & (np.abs(cen[:, 1]) < B / 2 - 1e-3)
            & (np.abs(cen[:, 2]) < H / 2 - 1e-3) & (cen[:, 0] > 1e-3))
    prof = profile_of(mesh, void, X1, X2, ["chambers"])
    cur = motion_curve(prof, E_MPA, P_KPA, None, steps=1)
    return cur.points[-1].angle_deg


def test_beam_rotation_matches_three_dimensional_elasticity(model_angle_deg):
    fe = _fe_rotation_deg(12, 4, 4)
    # Sign: the lengthened side is the channel's (z > 0), so u_x grows with z: the FE
    # slope is positive where the model's angle (bending away from the channel) is.
    assert fe == pytest.approx(model_angle_deg, rel=0.03)
