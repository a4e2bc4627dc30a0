"""Calibration of the motion model against measurements: one modulus factor f with
measured = predicted / f, fitted by least squares, and the ranking of variants.

Outside references: the least-squares solution is checked against numpy.linalg.lstsq;
the interval is the textbook one-parameter OLS t-interval (any statistics text, e.g.
the standard error of a regression through the origin), its quantile from scipy.stats.t;
its coverage is checked by simulation (seeded) against the nominal 95 %.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from soft_molds.analysis.calibration import (
    Candidate,
    Pairs,
    fit_factor,
    interpolate,
    pair_up,
    rank,
)

PRESSURES = (10.0, 20.0, 30.0, 40.0, 50.0, 60.0)


def _curve(gain_deg_per_kpa: float) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """A stiffening curve like the model's: slope growing with pressure (made up here)."""
    p = np.linspace(0.0, 90.0, 31)
    return tuple(p), tuple(gain_deg_per_kpa * p * (1 + p / 200.0))


def _synthetic(factor: float, sd: float, seed: int) -> list[Pairs]:
    """Five variants of different stiffness measured at six pressures: the model's
    prediction divided by ``factor`` plus seeded normal noise of ``sd`` degrees."""
    rng = np.random.default_rng(seed)
    out = []
    for i, gain in enumerate((0.15, 0.2, 0.28, 0.38, 0.5)):
        kpa, deg = _curve(gain)
        rows = [(p, float(np.interp(p, kpa, deg)) / factor + rng.normal(0.0, sd))
                for p in PRESSURES]
        out.append(pair_up("ABCDE"[i], kpa, deg, rows))
    return out


def test_calibration_recovers_a_known_factor_within_its_interval():
    fit = fit_factor(_synthetic(0.8, sd=0.5, seed=11))
    assert fit.points == 30
    assert fit.low < 0.8 < fit.high
    assert fit.factor == pytest.approx(0.8, abs=0.02)
    assert fit.high - fit.low < 0.05          # 30 points, 0.5 deg noise on up to 50 deg
    assert fit.residual_sd == pytest.approx(0.5, rel=0.35)
    assert [lb for lb, _ in fit.per_variant_rms] == list("ABCDE")


def test_noise_free_data_gives_the_factor_exactly():
    fit = fit_factor(_synthetic(1.25, sd=0.0, seed=0))
    assert fit.factor == pytest.approx(1.25, rel=1e-12)
    assert fit.low == pytest.approx(1.25, rel=1e-9) and fit.high == pytest.approx(1.25, rel=1e-9)


def test_closed_form_agrees_with_numpy_lstsq():
    pairs = _synthetic(0.9, sd=1.0, seed=3)
    p = np.array([x for v in pairs for x in v.predicted])
    m = np.array([x for v in pairs for x in v.measured])
    # numpy.linalg.lstsq: min |A g - m| with A the predictions as one column.
    (g,), rss, _, _ = np.linalg.lstsq(p[:, None], m, rcond=None)
    fit = fit_factor(pairs)
    assert fit.gain == pytest.approx(g, rel=1e-12)
    assert fit.factor == pytest.approx(1 / g, rel=1e-12)
    assert fit.residual_sd == pytest.approx(math.sqrt(rss[0] / (p.size - 1)), rel=1e-10)
    # the interval: g +- t(0.975, n - 1) s / sqrt(sum p^2), inverted for f
    half = stats.t.ppf(0.975, p.size - 1) * fit.residual_sd / math.sqrt(p @ p)
    assert fit.low == pytest.approx(1 / (g + half), rel=1e-10)
    assert fit.high == pytest.approx(1 / (g - half), rel=1e-10)


def test_the_interval_covers_the_true_factor_about_95_percent_of_the_time():
    hits = sum(fit.low < 0.8 < fit.high
               for fit in (fit_factor(_synthetic(0.8, sd=2.0, seed=s)) for s in range(400)))
    # binomial(400, 0.95): standard deviation 1.1 %; 3.5 sd either side
    assert 0.91 < hits / 400 < 0.99


def test_rows_above_the_model_range_and_at_zero_pressure_are_left_out():
    kpa, deg = _curve(0.2)
    pairs = pair_up("A", kpa, deg, [(0.0, 0.0), (45.0, 11.0), (95.0, 30.0)])
    assert pairs.pressure_kpa == (45.0,) and pairs.beyond_model == 1
    assert pairs.predicted[0] == pytest.approx(np.interp(45.0, kpa, deg))
    assert interpolate(kpa, deg, 91.0) is None


def test_too_few_points_or_a_backward_response_are_refused():
    kpa, deg = _curve(0.2)
    with pytest.raises(ValueError, match="at least two"):
        fit_factor([pair_up("A", kpa, deg, [(30.0, 7.0)])])
    with pytest.raises(ValueError, match="do not move"):
        fit_factor([pair_up("A", kpa, deg, [(30.0, -7.0), (60.0, -15.0)])])


def test_ranking_puts_the_margin_first_then_the_score_then_fewer_defects():
    ranked = rank([Candidate("A", 8.5, True, None, 0),       # never burst: holds
                   Candidate("B", 13.5, True, 2.5, 1),
                   Candidate("C", 13.5, True, 2.25, 0),      # ties B, fewer defects
                   Candidate("D", 26.0, True, 1.42, 1),      # bends most, bursts too soon
                   Candidate("E", None, False, 1.03, 2)], 1.5)
    assert [r.candidate.label for r in ranked] == ["C", "B", "A", "D", "E"]
    assert [r.eligible for r in ranked] == [True, True, True, False, False]
    assert ranked[3].why_not == "burst margin 1.42 < 1.5"
    assert [r.place for r in ranked] == [1, 2, 3, 4, 5]


def test_a_leak_by_the_goal_pressure_misses_the_goal():
    ranked = rank([Candidate("A", 30.0, True, 3.0, 1, leaks_by_goal=True),
                   Candidate("B", 10.0, True, 3.0, 0)], 1.5)
    assert [(r.candidate.label, r.eligible) for r in ranked] == [("B", True), ("A", False)]
    assert ranked[1].why_not == "leaks at or below the goal pressure"
