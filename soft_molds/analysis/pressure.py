"""Will each pressurised wall hold the working pressure, or balloon?

An estimate for choosing sweep ranges, not a rating. Each wall a void kind lists
(:mod:`soft_molds.recipe.membranes`) is treated as a neo-Hookean membrane of the cast
silicone (Young's modulus from its measured value or from Shore A by Gent's relation,
shear modulus mu = E/3):

- a ``bulge`` (a flat chamber face that domes outward) as a sphere of the wall's half
  span R and wall H, by the exact thick-sphere solution (inner radius R, outer R + H),
  whose thin limit is P_max = 2 mu (H/R)(l^-1 - l^-7) at l = 7^(1/6) (Treloar);
- a ``tube`` (a round bore with closed ends, free to lengthen) by the thin closed-end tube,
  whose limit point is about 0.750 mu H/R at mid-surface radius R (derived; a tube held at
  constant length has no limit point at all).

H is the wall's thickness at its middle, measured through the silicone along the wall's own
outward normal (the direction it bulges): from the middle of the void's face to the body's
outer surface, found by marching along that ray on the exact signed distance of the
body's primitives (:func:`thickness_along`). Other voids are not subtracted: the wall is
the plate between its void and the outside, and a passage through it (the feed channel
piercing a chamber's end wall) is not counted. Pressures kPa.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from soft_molds.recipe.model import Recipe
from soft_molds.recipe.primitives import Primitive, union_sdf
from soft_molds.units import kpa_to_psi

from .findings import Finding, Severity, finding
from .rubber import (
    MAX_STRETCH,
    THIN_WALL_RATIO,
    closed_tube_limit,
    shear_modulus_mpa,
    thick_sphere_limit,
    thin_sphere_limit,
)

ESTIMATE = "an estimate for choosing sweep ranges, not a rating"

MARCH_TOL_MM = 1e-6
"""The march along a wall's normal stops this close to the outer surface (mm)."""

MARCH_STEPS = 200
"""At most this many steps per march (a ray square to a face needs one or two)."""


def thickness_along(body: tuple[Primitive, ...], at: np.ndarray, normal: np.ndarray
                    ) -> np.ndarray:
    """Distance (mm) from each point ``at`` (n, 3) along its unit ``normal`` (n, 3) to where
    the ray first leaves the union of ``body``; 0 for a point on or outside it.

    Sphere tracing: step by the distance bound ``-union_sdf`` (exact for one primitive, a
    lower bound of the distance to the union's surface inside it), which never steps past
    the surface, and stop within MARCH_TOL_MM of it.
    """
    p = np.asarray(at, dtype=np.float64).reshape(-1, 3)
    n = np.asarray(normal, dtype=np.float64).reshape(-1, 3)
    n = n / np.linalg.norm(n, axis=1, keepdims=True)
    t = np.zeros(len(p))
    for _ in range(MARCH_STEPS):
        step = np.maximum(-union_sdf(body, p + t[:, None] * n), 0.0)
        if not (step > MARCH_TOL_MM).any():
            break
        t += step
    return t


@dataclass(frozen=True)
class WallPressure:
    """The weakest wall of one group: its limit (peak) pressure in kPa (``None`` when the
    inflation curve has no peak, a thick wall that stiffens as it grows)."""

    group: str
    shape: str
    thickness_mm: float               # along the wall's outward normal (module docstring)
    radius_mm: float
    at_mm: tuple[float, float, float]
    limit_kpa: float | None
    thin_estimate_kpa: float
    thick: bool                       # H/R beyond the thin-membrane range

    def margin(self, working_kpa: float | None) -> float | None:
        if working_kpa is None or working_kpa <= 0.0 or self.limit_kpa is None:
            return None
        return self.limit_kpa / working_kpa


def wall_pressures(r: Recipe) -> tuple[float | None, tuple[WallPressure, ...]]:
    """Young's modulus used (MPa, None when unknown) and the weakest wall per group."""
    e = r.material.silicone.youngs_modulus_mpa()
    if e is None:
        return None, ()
    mu = shear_modulus_mpa(e)
    body = r.body_primitives()
    length = r.body_length_mm
    worst: dict[str, WallPressure] = {}
    # An outside cut that inflates (an open groove, closed by its collar) loads its walls
    # too; a slit row has no membranes.
    for v in (*r.voids, *r.outer):
        for m in v.membranes(length):
            h = float(thickness_along(body, np.asarray([m.at_mm]), np.asarray([m.normal]))[0])
            if h <= 0.0:
                continue
            if m.shape == "bulge":
                lim = thick_sphere_limit(mu, m.radius_mm, m.radius_mm + h)
                p = lim.pressure if lim.has_peak else None
                thin = thin_sphere_limit(mu, h / m.radius_mm)
                thick = h / m.radius_mm > THIN_WALL_RATIO
            else:
                rm = m.radius_mm + h / 2.0
                lim = closed_tube_limit(mu, h / rm)
                p = lim.pressure
                thin = p
                thick = h / rm > THIN_WALL_RATIO
            wp = WallPressure(m.group, m.shape, h, m.radius_mm, m.at_mm,
                              None if p is None else p * 1000.0, thin * 1000.0, thick)
            old = worst.get(m.group)
            if old is None or _weaker(wp, old):
                worst[m.group] = wp
    return e, tuple(worst[g] for g in sorted(worst))


def _weaker(a: WallPressure, b: WallPressure) -> bool:
    pa = a.limit_kpa if a.limit_kpa is not None else float("inf")
    pb = b.limit_kpa if b.limit_kpa is not None else float("inf")
    return (pa, a.thin_estimate_kpa, a.at_mm) < (pb, b.thin_estimate_kpa, b.at_mm)


def pressure_findings(r: Recipe, e_mpa: float | None, walls: tuple[WallPressure, ...]
                      ) -> list[Finding]:
    work = r.inflate.working_pressure_kpa
    g = r.material.silicone
    if e_mpa is None:
        return [finding("pressure", Severity.INFO, "cast",
                        f"no pressure estimate: {g.name} is on the Shore {g.scale} scale, which "
                        "has no closed-form link to a modulus; give material.youngs_modulus_mpa "
                        "or material.shore_a")]
    out = []
    for w in walls:
        rough = " (thick wall: rough)" if w.thick else ""
        where = f"{w.group} ({w.thickness_mm:.2f} mm over a {2 * w.radius_mm:g} mm span)"
        if w.limit_kpa is None:
            out.append(finding(
                "pressure", Severity.INFO, "cast",
                f"{where}: no limit point up to a stretch of {MAX_STRETCH:g} (a wall this "
                f"thick stiffens as it grows; thin-wall "
                f"estimate {w.thin_estimate_kpa:.0f} kPa); {ESTIMATE}", value=None,
                limit=work, where=w.at_mm))
            continue
        m = w.margin(work)
        if m is None and work is not None:
            out.append(finding(
                "pressure", Severity.INFO, "cast",
                f"{where} balloons at about {w.limit_kpa:.0f} kPa{rough} (E {e_mpa:.3f} MPa); "
                f"working pressure {work:g} kPa; {ESTIMATE}", value=w.limit_kpa, limit=work,
                where=w.at_mm))
            continue
        if m is None or work is None:
            out.append(finding(
                "pressure", Severity.INFO, "cast",
                f"{where} balloons at about {w.limit_kpa:.0f} kPa{rough} (E {e_mpa:.3f} MPa); "
                f"no working pressure given (inflate.working_pressure_kpa); {ESTIMATE}",
                value=w.limit_kpa, limit=None, where=w.at_mm))
            continue
        sev = Severity.WARNING if m < 1.0 else Severity.INFO
        verdict = "balloons below the working pressure" if m < 1.0 else "holds"
        out.append(finding(
            "pressure", sev, "cast",
            f"{where} {verdict}: limit about {w.limit_kpa:.0f} kPa{rough} against "
            f"{work:.0f} kPa ({kpa_to_psi(work):.1f} psi), margin {m:.2f} (E {e_mpa:.3f} MPa); "
            f"{ESTIMATE}", value=w.limit_kpa, limit=work, where=w.at_mm))
    return out
