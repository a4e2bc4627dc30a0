"""Measured against predicted motion: one effective modulus factor, and a ranking.

Model relation. In the linear (small-pressure) range of the motion model the tip angle
(or extension) is proportional to pressure over Young's modulus, theta = k P / E (the
bending and extending models of :mod:`soft_molds.analysis.motion` both reduce to this;
k holds the geometry). If the cast silicone is stiffer or softer than the data sheet's
modulus by a factor f (E_eff = f E), every prediction scales by 1/f::

    measured(P) ~= predicted(P) / f

so with g = 1/f the least-squares fit through the origin over all variants and points is
the closed form g = sum(p_i m_i) / sum(p_i^2) (p the prediction at a measured row's
pressure, m the measurement). Beyond the linear range (large strain, neo-Hookean fibres)
the relation is an approximation: the model stiffens with stretch, so f fitted on high
pressures reads a little differently; rows with pressures up to the model's validity
range are used, rows above it are left out and counted.

Confidence interval (ordinary least squares with one parameter, any statistics text):
s^2 = RSS / (n - 1), se(g) = s / sqrt(sum p_i^2), g +- t(1 - a/2, n - 1) se(g) with
Student's t (scipy.stats.t); f's interval is the reciprocal of g's (f is monotone in g),
open above when g's lower end is not positive.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy import stats


@dataclass(frozen=True)
class Pairs:
    """One variant's rows that have a prediction: predicted and measured values at the
    same pressures (kPa), and how many rows lay above the model's range."""

    label: str
    pressure_kpa: tuple[float, ...]
    predicted: tuple[float, ...]
    measured: tuple[float, ...]
    beyond_model: int = 0


@dataclass(frozen=True)
class FactorFit:
    """The fitted factor ``factor`` (E_eff / E) with its ``low``-``high`` interval at
    ``confidence`` (``high`` may be inf), ``gain`` = 1/factor, ``points`` used, the
    residual standard deviation ``residual_sd`` (units of the measurement) and the RMS
    residual per variant label."""

    factor: float
    low: float
    high: float
    confidence: float
    gain: float
    points: int
    residual_sd: float
    per_variant_rms: tuple[tuple[str, float], ...]


def interpolate(pressures_kpa: Sequence[float], values: Sequence[float], at_kpa: float
                ) -> float | None:
    """Linear interpolation of a curve (pressures increasing) at ``at_kpa``; None outside
    its pressure range."""
    if not pressures_kpa or at_kpa < pressures_kpa[0] or at_kpa > pressures_kpa[-1]:
        return None
    return float(np.interp(at_kpa, pressures_kpa, values))


def pair_up(label: str, curve_kpa: Sequence[float], curve: Sequence[float],
            rows: Sequence[tuple[float, float]]) -> Pairs:
    """The rows (pressure kPa, measured) of one variant beside the predicted curve at the
    same pressures; rows above the curve's last pressure are counted, not paired, and rows
    at zero pressure carry no information on f and are skipped."""
    p, pred, meas, beyond = [], [], [], 0
    for kpa, m in rows:
        if kpa <= 0.0:
            continue
        y = interpolate(curve_kpa, curve, kpa)
        if y is None:
            beyond += 1
            continue
        p.append(kpa)
        pred.append(y)
        meas.append(m)
    return Pairs(label, tuple(p), tuple(pred), tuple(meas), beyond)


def fit_factor(pairs: Sequence[Pairs], confidence: float = 0.95) -> FactorFit:
    """Least-squares fit of measured = predicted / f over every pair; ValueError with
    fewer than two points or no non-zero prediction."""
    p = np.array([x for v in pairs for x in v.predicted], dtype=float)
    m = np.array([x for v in pairs for x in v.measured], dtype=float)
    n = p.size
    spp = float(p @ p)
    if n < 2 or spp == 0.0:
        raise ValueError(f"need at least two measured rows with a prediction (got {n})")
    g = float(p @ m) / spp
    resid = m - g * p
    s2 = float(resid @ resid) / (n - 1)
    se = math.sqrt(s2 / spp)
    half = float(stats.t.ppf(0.5 + confidence / 2, n - 1)) * se
    g_lo, g_hi = g - half, g + half
    if g <= 0.0:
        raise ValueError("the measurements do not move the way the model predicts "
                         f"(fitted 1/f = {g:.3g})")
    low = 1.0 / g_hi
    high = 1.0 / g_lo if g_lo > 0.0 else math.inf
    per = []
    for v in pairs:
        if v.predicted:
            r = np.array(v.measured) - g * np.array(v.predicted)
            per.append((v.label, float(math.sqrt(float(r @ r) / r.size))))
    return FactorFit(1.0 / g, low, high, confidence, g, n, math.sqrt(s2), tuple(per))


@dataclass(frozen=True)
class Candidate:
    """One variant as the ranking sees it: its ``score`` (measured value at the goal
    pressure, or the calibrated prediction there when no row reaches it; None: neither),
    whether the score was ``measured``, its burst margin (burst / goal pressure; None when
    not taken to burst), the number of defects and whether it leaked at or below the goal
    pressure."""

    label: str
    score: float | None
    measured: bool
    burst_margin: float | None
    defects: int
    leaks_by_goal: bool = False


@dataclass(frozen=True)
class Ranked:
    """A candidate with its place (1 = best), whether it meets the margin, and why not."""

    place: int
    candidate: Candidate
    eligible: bool
    why_not: str


def rank(candidates: Sequence[Candidate], min_burst_margin: float) -> tuple[Ranked, ...]:
    """Order: variants that meet the goal first (a score and a burst margin of at least
    ``min_burst_margin``, a variant never taken to burst taken as meeting it since it held
    every pressure tried, and no leak at or below the goal pressure), then the larger
    score, then fewer defects, then the label. Variants without a score come last."""
    def why(c: Candidate) -> str:
        if c.leaks_by_goal:
            return "leaks at or below the goal pressure"
        if c.burst_margin is not None and c.burst_margin < min_burst_margin:
            return f"burst margin {c.burst_margin:.2f} < {min_burst_margin:g}"
        if c.score is None:
            return "no measurement or prediction at the goal pressure"
        return ""

    def key(c: Candidate) -> tuple[int, float, int, str]:
        return (1 if why(c) else 0, -(c.score if c.score is not None else -math.inf),
                c.defects, c.label)

    ordered = sorted(candidates, key=key)
    return tuple(Ranked(i + 1, c, not why(c), why(c)) for i, c in enumerate(ordered))
