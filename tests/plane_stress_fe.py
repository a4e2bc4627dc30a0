"""A nonlinear finite-element reference for the motion model: the longitudinal section of a
chambered bar in plane stress, incompressible neo-Hookean, inflated by a follower pressure.

Independent of the model (scikit-fem for the mesh, the biquadratic elements and their
quadrature; the rest written out here from the textbook formulas, not from the model's
code):

- Plane stress of an incompressible neo-Hookean solid (Treloar 1975,
  W = mu/2 (I1 - 3), mu = E/3): with the in-plane deformation gradient F (2 x 2) and
  J = det F, the thickness stretch is 1/J, so W = mu/2 (F:F + J^-2 - 3). Its first
  Piola-Kirchhoff stress is P = mu (F - J^-2 F^-T) and its tangent
  dP_ij/dF_kl = mu [d_ik d_jl + J^-2 (2 Finv_ji Finv_lk + Finv_jk Finv_li)]. In uniaxial
  tension it gives the nominal stress (E/3)(l - l^-2), the model's fibre law, which is why
  plane stress (a slab free to thin across, as the beam's fibres are) is the reduction used
  here and not plane strain (which stiffens every fibre by 4/3).
- Pressure as a follower load (total Lagrangian): on a chamber wall with reference
  tangent T (dS), the deformed edge is F T dS and the force on the solid is
  -p rot(F T) dS, rot(a) = (a_1, -a_0) turning the tangent onto the outward normal. The
  load is linear in F (two dimensions), so its share of the tangent matrix is exact and
  unsymmetric; it acts per unit undeformed thickness (the chamber held at its width, as
  the side walls of a cast chamber hold it).
- Newton's method on the total-Lagrangian residual, load stepping in pressure (each step
  starting from the last; a step that does not converge is halved).

Frame: x along the bar from the clamped inlet face, z across it; mm, MPa, kPa where a name
says so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from skfem import Basis, ElementQuad2, FacetBasis, MeshQuad


@dataclass(frozen=True)
class ChamberedBar:
    """Bar x in [0, length], z in [-height/2, height/2]; ``count`` chambers of ``depth``
    along x at ``pitch``, spanning z in [chamber_z0, chamber_z1], the row starting at
    ``first`` (mm)."""

    length_mm: float
    height_mm: float
    first_mm: float
    pitch_mm: float
    depth_mm: float
    count: int
    chamber_z0_mm: float
    chamber_z1_mm: float

    def chambers(self) -> list[tuple[float, float]]:
        return [(self.first_mm + i * self.pitch_mm, self.first_mm + i * self.pitch_mm
                 + self.depth_mm) for i in range(self.count)]


@dataclass(frozen=True)
class Inflated:
    """Per pressure (kPa): the rotation (degrees, bending away from the chambers
    positive) of section ``x2`` relative to section ``x1``, Newton iterations used, the
    largest in-plane principal stretch anywhere (at quadrature points; it sits at a
    chamber's corner, where the stress is singular, so it grows as the mesh is refined),
    and the number of elements."""

    pressures_kpa: np.ndarray
    rotation_deg: np.ndarray
    iterations: int
    max_stretch: np.ndarray
    elements: int


def grid(lo: float, hi: float, h: float, marks: list[float]) -> np.ndarray:
    """Lines from lo to hi no farther apart than h, through every mark."""
    pts = sorted({lo, hi, *[m for m in marks if lo <= m <= hi]})
    out = [pts[0]]
    for a, b in zip(pts[:-1], pts[1:], strict=True):
        n = max(int(math.ceil((b - a) / h - 1e-9)), 1)
        out.extend(np.linspace(a, b, n + 1)[1:])
    return np.array(out)


def mesh_of(bar: ChamberedBar, h_mm: float, marks_x: list[float]) -> MeshQuad:
    """Quadrilaterals of side at most ``h_mm`` with lines on every chamber face and at
    every x in ``marks_x`` (where rotations are read); chambers removed."""
    xs = grid(0.0, bar.length_mm, h_mm,
               [x for c in bar.chambers() for x in c] + list(marks_x))
    zs = grid(-bar.height_mm / 2, bar.height_mm / 2, h_mm,
               [bar.chamber_z0_mm, bar.chamber_z1_mm])
    m = MeshQuad.init_tensor(xs, zs)
    c = m.p[:, m.t].mean(axis=1)
    inside = np.zeros(m.t.shape[1], dtype=bool)
    for x0, x1 in bar.chambers():
        inside |= ((c[0] > x0) & (c[0] < x1) & (c[1] > bar.chamber_z0_mm)
                   & (c[1] < bar.chamber_z1_mm))
    return m.remove_elements(np.flatnonzero(inside))


def _material(grads: np.ndarray, mu: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """P (2, 2, ...), tangent (2, 2, 2, 2, ...) and F of displacement gradients
    grads[i, j] = d u_i / d X_j (module docstring)."""
    f = grads + np.eye(2)[:, :, None, None]
    j = f[0, 0] * f[1, 1] - f[0, 1] * f[1, 0]
    finv = np.array([[f[1, 1], -f[0, 1]], [-f[1, 0], f[0, 0]]]) / j
    finv_t = finv.transpose(1, 0, 2, 3)
    j2 = j ** -2
    p = mu * (f - j2 * finv_t)
    eye = np.eye(2)
    a = (np.einsum("ik,jl->ijkl", eye, eye)[..., None, None] * np.ones_like(j)
         + j2 * (2.0 * np.einsum("jiab,lkab->ijklab", finv, finv)
                 + np.einsum("jkab,liab->ijklab", finv, finv)))
    return p, mu * a, f


def inflate(bar: ChamberedBar, e_mpa: float, pressures_kpa: np.ndarray, x1_mm: float,
            x2_mm: float, h_mm: float = 1.0, end_walls_only: bool = False,
            max_step_kpa: float = 10.0, tol: float = 1e-7, max_iter: int = 15) -> Inflated:
    """Clamp the face x = 0, put the pressure on every chamber wall and step it through
    ``pressures_kpa`` (ascending, from above zero); the rotation of section ``x2_mm``
    relative to ``x1_mm`` at each. ``end_walls_only``: the pressure on the chambers' faces
    square to x alone (a check of the reference against beam theory). Steps of at most
    ``max_step_kpa``, each started from the last two solutions' secant; Newton stops when
    the update is below ``tol`` times the bar's height. Raises ``ArithmeticError`` when a
    step cannot be found even halved eight times."""
    mu = e_mpa / 3.0
    m = mesh_of(bar, h_mm, [x1_mm, x2_mm])
    basis = Basis(m, ElementQuad2())
    n = basis.N
    grads_phi = np.array([basis.basis[a][0].grad for a in range(len(basis.basis))])
    dx = basis.dx
    edofs = basis.element_dofs                     # (local, elements)
    # Chamber walls: boundary facets not on the bar's outer edges.
    bf = m.boundary_facets()
    mid = m.p[:, m.facets[:, bf]].mean(axis=1)
    outer = ((np.abs(mid[0]) < 1e-9) | (np.abs(mid[0] - bar.length_mm) < 1e-9)
             | (np.abs(np.abs(mid[1]) - bar.height_mm / 2) < 1e-9))
    if end_walls_only:
        ends = m.p[:, m.facets[:, bf]]
        outer |= np.abs(ends[1, 0] - ends[1, 1]) < 1e-9     # roof and floor facets
    fb = FacetBasis(m, ElementQuad2(), facets=bf[~outer])
    nrm = fb.normals.astype(np.float64)            # outward from the solid, into a chamber
    tan = np.array([-nrm[1], nrm[0]])              # rot(tan) = nrm
    phi_f = np.array([np.asarray(fb.basis[a][0]) for a in range(len(fb.basis))])
    dphi_t = np.array([np.einsum("jeq,jeq->eq", fb.basis[a][0].grad, tan)
                       for a in range(len(fb.basis))])
    fdofs = fb.element_dofs
    # Pressure stiffness per unit pressure (constant: the load is linear in F).
    kp = np.einsum("aeq,beq,eq->abe", phi_f, dphi_t, fb.dx)
    rows_p = np.concatenate([fdofs[:, None, :].repeat(len(fb.basis), 1).ravel(),
                             n + fdofs[:, None, :].repeat(len(fb.basis), 1).ravel()])
    cols_p = np.concatenate([n + fdofs[None, :, :].repeat(len(fb.basis), 0).ravel(),
                             fdofs[None, :, :].repeat(len(fb.basis), 0).ravel()])
    k_press = sp.coo_matrix((np.concatenate([kp.ravel(), -kp.ravel()]), (rows_p, cols_p)),
                            shape=(2 * n, 2 * n)).tocsr()
    # Reference load per unit pressure: the rot(T) part of rot(F T) = rot(T + grad u T).
    f0 = np.zeros(2 * n)
    for i, comp in ((0, tan[1]), (1, -tan[0])):
        np.add.at(f0, i * n + fdofs, np.einsum("aeq,eq,eq->ae", phi_f, comp, fb.dx))

    fixed_dofs = basis.get_dofs(lambda x: np.abs(x[0]) < 1e-9).all()
    fixed = np.concatenate([fixed_dofs, fixed_dofs + n])
    free = np.setdiff1d(np.arange(2 * n), fixed)
    loc = len(basis.basis)
    ii, kk = np.meshgrid(np.arange(2), np.arange(2), indexing="ij")
    rows_k = (ii[:, :, None, None, None] * n + edofs[None, None, :, None, :]).repeat(
        loc, 3)
    cols_k = (kk[:, :, None, None, None] * n + edofs[None, None, None, :, :]).repeat(
        loc, 2)

    def grads_of(u: np.ndarray) -> np.ndarray:
        ue = np.stack([u[:n][edofs], u[n:][edofs]])          # (2, local, elements)
        return np.einsum("iae,ajeq->ijeq", ue, grads_phi)

    def residual_and_tangent(u: np.ndarray, p_mpa: float) -> tuple[np.ndarray, sp.csr_matrix]:
        g = grads_of(u)
        pk, a, _ = _material(g, mu)
        r = np.zeros(2 * n)
        re = np.einsum("ijeq,ajeq,eq->iae", pk, grads_phi, dx)
        for i in range(2):
            np.add.at(r, i * n + edofs, re[i])
        ke = np.einsum("ajeq,ijkleq,bleq,eq->ikabe", grads_phi, a, grads_phi, dx,
                       optimize=True)
        k = sp.coo_matrix((ke.ravel(), (rows_k.ravel(), cols_k.ravel())),
                          shape=(2 * n, 2 * n)).tocsr()
        # Pressure: + p * integral of rot(F T) . v over the walls.
        r += p_mpa * (f0 + k_press @ u)
        return r, k + p_mpa * k_press

    def newton(u: np.ndarray, p_mpa: float) -> tuple[np.ndarray, int]:
        last = math.inf
        for it in range(1, max_iter + 1):
            r, k = residual_and_tangent(u, p_mpa)
            du = np.zeros(2 * n)
            du[free] = spla.spsolve(k[free][:, free].tocsc(), -r[free])
            size = float(np.abs(du).max())
            if not math.isfinite(size) or (it > 3 and size > last):
                break                      # diverging: the caller halves the step
            u, last = u + du, size
            if size < tol * bar.height_mm:
                return u, it
        raise ArithmeticError("Newton's method did not converge")

    verts = m.p
    nodal = basis.nodal_dofs[0]

    def rotation(u: np.ndarray, x: float) -> float:
        # Best-fit rigid rotation of the section's nodes (a least-squares fit:
        # theta = atan2(sum X x u, sum X . u) over centred reference X and deformed x).
        sel = np.flatnonzero(np.abs(verts[0] - x) < 1e-9)
        ref = verts[:, sel]
        cur = ref + np.stack([u[nodal[sel]], u[n + nodal[sel]]])
        ref = ref - ref.mean(axis=1, keepdims=True)
        cur = cur - cur.mean(axis=1, keepdims=True)
        cross = float((ref[0] * cur[1] - ref[1] * cur[0]).sum())
        return math.atan2(cross, float((ref * cur).sum()))

    def max_stretch(u: np.ndarray) -> float:
        f = grads_of(u) + np.eye(2)[:, :, None, None]
        c = np.einsum("kiab,kjab->ijab", f, f)
        tr, det = c[0, 0] + c[1, 1], c[0, 0] * c[1, 1] - c[0, 1] ** 2
        return float(np.sqrt(tr / 2 + np.sqrt(np.maximum(tr * tr / 4 - det, 0.0))).max())

    u = np.zeros(2 * n)
    u_old, p_old = u, 0.0
    done_kpa = 0.0
    iters = 0
    rot, top = [], []
    for target in pressures_kpa:
        # From rest a full step's first Newton update overshoots (its largest displacement
        # five times the converged one at 5 kPa) and the iteration diverges: start with a
        # quarter step, then double.
        step = min(target - done_kpa, max_step_kpa if done_kpa > 0 else max_step_kpa / 4)
        while done_kpa < target - 1e-12:
            p_try = min(done_kpa + step, target)
            for _ in range(8):
                slope = (u - u_old) / (done_kpa - p_old) if done_kpa > p_old else 0.0 * u
                try:
                    u_new, it = newton(u + slope * (p_try - done_kpa), p_try / 1000.0)
                    break
                except (ArithmeticError, np.linalg.LinAlgError, RuntimeError):
                    step /= 2.0
                    p_try = done_kpa + step
            else:
                raise ArithmeticError(f"no equilibrium found near {done_kpa:.1f} kPa")
            u_old, p_old = u, done_kpa
            u, done_kpa, iters = u_new, p_try, iters + it
            step = min(2.0 * step, max_step_kpa)
        # Rotation from x1 to x2; bending away from the chambers (they sit above the
        # middle, z > 0) turns the sections clockwise in (x, z): negative atan2.
        rot.append(-math.degrees(rotation(u, x2_mm) - rotation(u, x1_mm)))
        top.append(max_stretch(u))
    return Inflated(np.asarray(pressures_kpa, dtype=float), np.array(rot), iters,
                    np.array(top), m.t.shape[1])
