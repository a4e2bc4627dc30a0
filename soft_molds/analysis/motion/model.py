"""The typed result of the motion model: how one variant is predicted to move as its
voids are inflated. Pressures kPa, angles degrees, lengths mm, modulus MPa; (y, z)
directions are unit vectors across the body's long axis x (world frame)."""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum


class MotionKind(StrEnum):
    """What the actuator does: bends (the pressure acts off the neutral axis) or extends
    (it acts on the axis)."""

    BENDING = "bending"
    EXTENDING = "extending"


class StopReason(StrEnum):
    """Why the curve ends where it does."""

    BALLOON_LIMIT = "balloon limit"     # the lowest limit pressure of the pressure check
    BREAK_STRETCH = "elongation at break"  # a fibre reached the grade's elongation at break
    RANGE_END = "range end"             # no limit known: twice the working pressure
    NO_EQUILIBRIUM = "no beam equilibrium"  # a section's equilibrium could not be solved


@dataclass(frozen=True)
class MotionPoint:
    """The predicted state at ``pressure_kpa``: tip bend angle (degrees, toward the side
    away from the voids), extension of the active length (mm) and the largest fibre stretch
    anywhere in it."""

    pressure_kpa: float
    angle_deg: float
    extension_mm: float
    max_stretch: float


@dataclass(frozen=True)
class MotionInputs:
    """What the model read off the cast and the recipe. ``active_from_mm``/``active_to_mm``:
    the x range of the pressurised length (past the tube socket to the voids' far end),
    cut into ``sections`` sections. ``bend_dir``: unit (y, z) from the neutral axis toward
    the pressure's resultant (the side that lengthens). The section figures are those of
    the governing section at ``at_x_mm`` (the largest linear curvature per pressure for a
    bender, the largest pressure area per silicone area for an extender): silicone area,
    second moment about the bending axis through its centroid, pressure (void) area and
    lever arm e (void centroid to neutral axis along ``bend_dir``)."""

    youngs_modulus_mpa: float
    active_from_mm: float
    active_to_mm: float
    sections: int
    bend_dir: tuple[float, float]
    at_x_mm: float
    silicone_area_mm2: float
    second_moment_mm4: float
    pressure_area_mm2: float
    lever_arm_mm: float


@dataclass(frozen=True)
class MotionCurve:
    """One variant's predicted motion: the ``model`` (registry name) that made it, what it
    read, the curve from zero pressure up to ``valid_to_kpa`` (where it stopped, for
    ``stop``), the lowest balloon limit of the pressure check (``limit_kpa``, None when no
    wall has one), the small-pressure slopes (linear beam: degrees and mm per kPa) and the
    point at the working pressure (None when none is given or it lies beyond the curve)."""

    model: str
    kind: MotionKind
    inputs: MotionInputs
    points: tuple[MotionPoint, ...]
    valid_to_kpa: float
    stop: StopReason
    limit_kpa: float | None
    linear_deg_per_kpa: float
    linear_mm_per_kpa: float
    working_pressure_kpa: float | None
    at_working: MotionPoint | None

    @property
    def headline(self) -> str:
        """The figure a summary shows: the angle (bender) or extension (extender) at the
        working pressure, or why there is none."""
        w = self.at_working
        if w is None:
            if self.working_pressure_kpa is None:
                return "no working pressure"
            return f"beyond the {self.stop} ({self.valid_to_kpa:.0f} kPa)"
        if self.kind is MotionKind.BENDING:
            return f"bends {w.angle_deg:.0f} deg at {w.pressure_kpa:.0f} kPa"
        return f"extends {w.extension_mm:.1f} mm at {w.pressure_kpa:.0f} kPa"
