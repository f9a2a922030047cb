"""Failure rates and survival of a group of traps from their interval-censored lives,
through `lifelines` (Davidson-Pilon, 2019, J. Open Source Softw. 4(40):1317):

- the Turnbull nonparametric estimate of the survival curve (Turnbull 1976, J. R. Stat.
  Soc. B 38:290-295), `KaplanMeierFitter.fit_interval_censoring`;
- an exponential fit, whose constant yearly failure rate is 1/scale; its 95 % interval
  is the exact Poisson interval of the failure count (Garwood 1936, Biometrika 28:437-442)
  over the exposure the fit implies (failures / rate), which holds for few failures
  where the fit's own Wald interval does not;
- a Weibull fit (shape above 1: failures grow with age) with a 95 % band on its survival
  curve, where the group has failures enough to shape it.

With no failure the rate is 0, and its upper end is the exact one-sided 95 % bound for a
Poisson count of zero, -ln(0.05) / exposure = 2.996 / exposure (common practice, "the
rule of three").
"""

import math
import warnings
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from lifelines import ExponentialFitter, KaplanMeierFitter, WeibullFitter
from scipy.stats import chi2

from service.reliability.lives import Life

# A life's interval is (lower, upper]: the trap worked at the lower test and failed after
# it. lifelines takes closed intervals, so each lower end moves a sliver up; otherwise two
# traps tested on one day would share that day as a point of both their intervals, and
# Turnbull's estimate would put failures there (and the fitters take only positive times).
EARLIEST_YEARS = 1e-6
WEIBULL_FAILURES_AT_LEAST = 5
ZERO_FAILURES_UPPER = -math.log(0.05)  # 2.996: one-sided 95 % upper bound of a zero count
CURVE_YEARS = (0.0, 0.5, 1.0, 1.5, 2.0, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0)


@dataclass(frozen=True, slots=True)
class Rate:
    """A yearly failure rate [1/year] with its 95 % interval."""

    per_year: float
    low: float
    high: float


@dataclass(frozen=True, slots=True)
class CurvePoint:
    years: float
    surviving: float  # share still working [0-1]
    low: float | None = None  # 95 % band, where the fit gives one
    high: float | None = None


@dataclass(frozen=True, slots=True)
class GroupEstimate:
    """What a group's lives say: counts, the constant-rate fit, the Weibull fit and the
    Turnbull curve."""

    lives: int
    failures: int
    exposure_years: float  # the lives' known working years (their lower ends)
    rate: Rate
    weibull_shape: float | None
    weibull_scale_years: float | None
    turnbull: list[CurvePoint]
    weibull_curve: list[CurvePoint]


def poisson_interval(failures: int, exposure_years: float) -> Rate:
    """A rate of `failures` over `exposure_years` with its exact 95 % interval (Garwood
    1936): chi-squared quantiles of 2k and 2k + 2 degrees of freedom, halved.

    >>> rate = poisson_interval(10, 100.0)
    >>> round(rate.per_year, 3), round(rate.low, 4), round(rate.high, 4)
    (0.1, 0.048, 0.1839)
    """
    if failures == 0:
        return Rate(0.0, 0.0, ZERO_FAILURES_UPPER / exposure_years)
    return Rate(
        failures / exposure_years,
        float(chi2.ppf(0.025, 2 * failures)) / 2 / exposure_years,
        float(chi2.ppf(0.975, 2 * failures + 2)) / 2 / exposure_years,
    )


def _bounds(lives: Sequence[Life]) -> tuple[np.ndarray, np.ndarray]:
    lower = np.array([life.lower_years + EARLIEST_YEARS for life in lives])
    upper = np.array([max(life.upper_years, 2 * EARLIEST_YEARS) for life in lives])
    return lower, upper


def estimate(lives: Sequence[Life], with_curves: bool = True) -> GroupEstimate:
    """The estimates of one group of lives (at least one); the survival curves (Turnbull,
    Weibull) only `with_curves`, as each fit takes some 50 ms.

    >>> from service.reliability.lives import Life
    >>> rate = estimate([Life(5.0, math.inf)] * 10).rate  # 50 trap-years, no failure
    >>> rate.per_year, round(rate.high, 4)
    (0.0, 0.0599)
    """
    failures = sum(life.failed for life in lives)
    exposure = sum(life.lower_years for life in lives)
    if failures == 0:
        rate = Rate(0.0, 0.0, ZERO_FAILURES_UPPER / exposure if exposure else math.inf)
        return GroupEstimate(len(lives), 0, exposure, rate, None, None, [], [])
    lower, upper = _bounds(lives)
    with warnings.catch_warnings():  # lifelines warns of data that suits it poorly
        warnings.simplefilter("ignore")
        exponential = ExponentialFitter().fit_interval_censoring(lower, upper)
        rate = poisson_interval(failures, failures * float(exponential.lambda_))
        turnbull = _turnbull(lower, upper) if with_curves else []
        shape = scale_years = None
        weibull_curve: list[CurvePoint] = []
        if with_curves and failures >= WEIBULL_FAILURES_AT_LEAST:
            weibull = WeibullFitter().fit_interval_censoring(lower, upper)
            shape, scale_years = float(weibull.rho_), float(weibull.lambda_)
            weibull_curve = _weibull_curve(weibull)
    return GroupEstimate(
        len(lives), failures, exposure, rate, shape, scale_years, turnbull, weibull_curve
    )


def _turnbull(lower: np.ndarray, upper: np.ndarray) -> list[CurvePoint]:
    fitter = KaplanMeierFitter().fit_interval_censoring(lower, upper)
    curve = fitter.survival_function_["NPMLE_estimate_lower"]
    points = [CurvePoint(0.0, 1.0)]
    for years, surviving in curve.items():
        if math.isfinite(years) and years > EARLIEST_YEARS:
            points.append(CurvePoint(float(years), float(surviving)))
    return points


def _weibull_curve(weibull: WeibullFitter) -> list[CurvePoint]:
    times = np.array([max(years, EARLIEST_YEARS) for years in CURVE_YEARS])
    surviving = weibull.survival_function_at_times(times)
    low_high = _weibull_band(weibull, times)
    return [
        CurvePoint(float(years), float(value), low, high)
        for years, value, (low, high) in zip(CURVE_YEARS, surviving, low_high, strict=True)
    ]


def _weibull_band(
    weibull: WeibullFitter, times: np.ndarray
) -> list[tuple[float | None, float | None]]:
    """The 95 % band of the Weibull survival curve at `times`, from lifelines' delta-method
    interval; none past the data's own span, where lifelines gives none."""
    frame = weibull.confidence_interval_survival_function_
    grid = np.asarray(frame.index, dtype=float)
    lows = np.interp(times, grid, frame.iloc[:, 0].to_numpy())
    highs = np.interp(times, grid, frame.iloc[:, 1].to_numpy())
    return [
        (max(0.0, float(min(a, b))), min(1.0, float(max(a, b)))) if at <= grid[-1] else (None, None)
        for at, a, b in zip(times, lows, highs, strict=True)
    ]
