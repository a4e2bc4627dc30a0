"""Whether a lost core stays put while the silicone is poured and cures: the liquid
silicone lifts a core lighter than itself and lets a heavier one sink, and a core held
at one end only takes that force as a cantilever on its print.

Net force on the core (Archimedes' principle): F = (rho_silicone - rho_core) g V, V the
core's volume standing in the silicone (the part inside the body: its voids and the
socket plug), positive when it floats up (along the pour's up), in newtons.

Supports: what holds the core in the closed mold. Today each core has one, its core print
seated in the two shells at the socket's face (:class:`Support` of kind ``print``), and
a disc magnet pair in its key and seat (kind ``magnets``, with ``core.support`` magnets
or both); a further kind (a second print, a peg) adds to :func:`supports_of`'s tuple. A core held by
two or more supports spans between them and is not checked here.

Criterion for one support (from memory, kept simple): the print is a round cantilever
fixed where it leaves the cavity wall; the net force acts at the immersed volume's
centroid, at lever arm L along x from that wall, so the moment at the wall is M = |F| L.
The print holds M_hold = sigma_hold Z, with Z = pi r^3 / 4 the section modulus of a solid
circle of radius r (the socket's; closed form of elementary beam theory) and sigma_hold
the sustained bending stress the core's material is taken to bear for the hours of a cure
(:data:`HOLD_STRESS_MPA`: from memory, chosen well below short-term strength, because
wax and printed plastic creep under a steady load). M > M_hold is a warning.

Units: mm, mm3, g/cm3, N, N mm (= N/mm2 x mm3). Frame: world, the body along +x from the
start face x = 0; up is the pour's up.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import manifold3d
import numpy as np

from ..constants import CORE_DENSITY_G_CM3, DISSOLVED_CORE_DENSITY_G_CM3
from ..meshdata import TriMesh
from ..recipe.model import Recipe

#: Standard gravity (m/s2; the conventional value, CGPM 1901).
G_M_S2 = 9.80665

#: Sustained bending stress a core's material is taken to bear in its print (MPa = N/mm2),
#: by what the core is made of: paraffin-type wax is weak and creeps (short-term
#: strength of the order of 1-3 MPa), a bismuth-based alloy holds tens of MPa, a printed
#: water-soluble filament tens of MPa; each taken at a fraction (from memory, low
#: confidence: a warning threshold, not a rating).
HOLD_STRESS_MPA = {"wax": 0.5, "low-melt-alloy": 10.0, "soluble-filament": 5.0}


@dataclass(frozen=True)
class Support:
    """One thing holding a core in the closed mold: ``kind`` ("print": its core print,
    seated in both shells; "magnets": a disc magnet pair in the print's key and its
    seat), where it meets the cavity (``at_mm``, world) and the radius of its section
    there (the magnet's for a pair; mm)."""

    kind: str
    at_mm: tuple[float, float, float]
    radius_mm: float


@dataclass(frozen=True)
class CoreSupportFigures:
    """The support check's figures for one lost core (units in the names; force positive
    up). ``holding_nmm`` is what a single support holds (None: two or more supports)."""

    part: str
    material: str
    core_density_g_cm3: float
    silicone_density_g_cm3: float
    immersed_mm3: float
    centroid_mm: tuple[float, float, float]
    net_force_n: float
    supports: tuple[Support, ...]
    lever_mm: float
    moment_nmm: float
    holding_nmm: float | None

    @property
    def floats(self) -> bool:
        return self.net_force_n > 0.0

    @property
    def overloaded(self) -> bool:
        return self.holding_nmm is not None and self.moment_nmm > self.holding_nmm


@dataclass(frozen=True)
class CoreSupports:
    """What the support check keeps: the figures of every lost core, in core order."""

    cores: tuple[CoreSupportFigures, ...]


def core_material(r: Recipe) -> str:
    """What a lost core is made of: ``core.material`` when melted, a printed soluble
    filament when dissolved."""
    return r.core.material if r.core.melted else "soluble-filament"


def core_density_g_cm3(r: Recipe) -> float:
    return (CORE_DENSITY_G_CM3[r.core.material] if r.core.melted
            else DISSOLVED_CORE_DENSITY_G_CM3)


def net_force_n(silicone_g_cm3: float, core_g_cm3: float, volume_mm3: float) -> float:
    """(rho_s - rho_c) g V in newtons: g/cm3 x 1000 = kg/m3, mm3 x 1e-9 = m3."""
    return (silicone_g_cm3 - core_g_cm3) * 1e3 * G_M_S2 * volume_mm3 * 1e-9


def print_holding_nmm(stress_mpa: float, radius_mm: float) -> float:
    """sigma Z, Z = pi r^3 / 4 (solid circle), N mm."""
    return stress_mpa * math.pi * radius_mm ** 3 / 4.0


def _manifold(mesh: TriMesh) -> manifold3d.Manifold:
    m = manifold3d.Mesh64(
        vert_properties=np.array(mesh.vertices, dtype=np.float64),  # a writable copy
        tri_verts=np.array(mesh.faces, dtype=np.uint64))
    return manifold3d.Manifold(m)


def volume_centroid(vertices: np.ndarray, faces: np.ndarray) -> tuple[float, np.ndarray]:
    """Volume and centroid of a closed, outward-wound triangle mesh: the signed tetrahedra
    to the origin (divergence theorem)."""
    a, b, c = (vertices[faces[:, k]] for k in range(3))
    vol = np.einsum("ij,ij->i", a, np.cross(b, c)) / 6.0
    total = float(vol.sum())
    centre = ((a + b + c) * vol[:, None]).sum(axis=0) / (4.0 * total)
    return total, centre


def immersed(core: TriMesh, face_x_mm: float, outward: float
             ) -> tuple[float, tuple[float, float, float]]:
    """Volume (mm3) and centroid (world) of the part of ``core`` inside the body: beyond
    the socket's face plane x = ``face_x_mm``, away from ``outward`` (-1: the start face,
    the body at x > 0). Cut with manifold3d."""
    inside = _manifold(core).trim_by_plane([-outward, 0.0, 0.0], -outward * face_x_mm)
    mesh = inside.to_mesh()
    v, c = volume_centroid(np.asarray(mesh.vert_properties, dtype=np.float64)[:, :3],
                           np.asarray(mesh.tri_verts, dtype=np.int64))
    return v, (float(c[0]), float(c[1]), float(c[2]))


def supports_of(r: Recipe, inlet_index: int) -> tuple[Support, ...]:
    """What holds the core that leaves through ``r.inlets[inlet_index]``: its print
    (``core.support`` prints or both) and its magnet pair (magnets or both; ``radius_mm``
    the magnet's), both where the print meets the cavity wall."""
    inlet = r.inlets[inlet_index]
    cy, cz = inlet.center_mm
    at = (inlet.face_x_mm(r.body_length_mm), cy, cz)
    out = []
    if r.core.support in ("prints", "both"):
        out.append(Support("print", at, inlet.socket_diameter_mm / 2.0))
    if r.core.magnets:
        out.append(Support("magnets", at, r.core.magnet_diameter_mm / 2.0))
    return tuple(out)


def core_support(r: Recipe, part: str, core: TriMesh, inlet_index: int
                 ) -> CoreSupportFigures:
    """The support figures of the lost core ``part`` (its mesh, print included), which
    leaves through ``r.inlets[inlet_index]``."""
    inlet = r.inlets[inlet_index]
    face_x = inlet.face_x_mm(r.body_length_mm)
    outward = inlet.pull_dir()[0]
    vol, centre = immersed(core, face_x, outward)
    rho_s = r.material.silicone.density_g_cm3
    rho_c = core_density_g_cm3(r)
    force = net_force_n(rho_s, rho_c, vol)
    sups = supports_of(r, inlet_index)
    lever = abs(centre[0] - face_x)
    # A magnet pair's pull is the supplier's figure, not one this check knows: it is
    # counted, not rated.
    holding = (print_holding_nmm(HOLD_STRESS_MPA[core_material(r)], sups[0].radius_mm)
               if len(sups) == 1 and sups[0].kind == "print" else None)
    return CoreSupportFigures(part, core_material(r), rho_c, rho_s, vol, centre, force,
                              sups, lever, abs(force) * lever, holding)
