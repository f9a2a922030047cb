"""Failure rates and survival of a group of traps from their interval-censored lives,
through `lifelines` (Davidson-Pilon, 2019, J. Open Source Softw. 4(40):1317):

- the Turnbull nonparametric estimate of the survival curve (Turnbull 1976, J. R. Stat.
  Soc. B 38:290-295), `KaplanMeierFitter.fit_interval_censoring`;
- an exponential fit: its constant yearly failure rate maximises the interval-censored
  likelihood, sum of log(exp(-rate L) - exp(-rate U)) over failed lives and -rate L over
  working ones (one parameter, maximised here with scipy; lifelines' ExponentialFitter,
  which the tests hold it to, takes some 50 ms a group for the same); its 95 % interval
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
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from lifelines import KaplanMeierFitter, WeibullFitter
from scipy.optimize import minimize_scalar
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
CURVE_TIMES = np.array([max(years, EARLIEST_YEARS) for years in CURVE_YEARS])


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


def constant_rate(lower: np.ndarray, upper: np.ndarray, weights: np.ndarray) -> float:
    """The yearly failure rate [1/year] of greatest likelihood for lives in (lower, upper]
    [years] (upper infinite: still working), each counted `weights` times.

    >>> round(constant_rate(np.array([0.0, 1.0]), np.array([1.0, np.inf]), np.ones(2)), 4)
    0.6931
    """
    failed = np.isfinite(upper)

    def negative_log_likelihood(log_rate: float) -> float:
        rate = math.exp(log_rate)
        ends = np.exp(-rate * lower[failed]) - np.exp(-rate * upper[failed])
        failing = np.sum(weights[failed] * np.log(np.maximum(ends, 1e-300)))
        return float(-(failing - rate * np.sum(weights[~failed] * lower[~failed])))

    found = minimize_scalar(
        negative_log_likelihood,
        bounds=(math.log(1e-6), math.log(100.0)),
        method="bounded",
        options={"xatol": 1e-10},
    )
    return math.exp(float(found.x))


def _bounds(lives: Sequence[Life]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Each distinct (lower, upper] interval once, with how many lives share it: the
    fits' weights. Tests on fixed days give many lives the same interval, so a fleet of
    thousands fits as a few hundred weighted intervals, with the same estimates."""
    counted = Counter((life.lower_years, life.upper_years) for life in lives)
    lower = np.array([low + EARLIEST_YEARS for low, _ in counted])
    upper = np.array([max(high, 2 * EARLIEST_YEARS) for _, high in counted])
    return lower, upper, np.array(list(counted.values()), dtype=float)


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
    lower, upper, weights = _bounds(lives)
    with warnings.catch_warnings():  # lifelines warns of data that suits it poorly
        warnings.simplefilter("ignore")
        rate = poisson_interval(failures, failures / constant_rate(lower, upper, weights))
        turnbull = _turnbull(lower, upper, weights) if with_curves else []
        shape = scale_years = None
        weibull_curve: list[CurvePoint] = []
        if with_curves and failures >= WEIBULL_FAILURES_AT_LEAST:
            weibull = WeibullFitter().fit_interval_censoring(
                lower, upper, weights=weights, timeline=CURVE_TIMES
            )
            shape, scale_years = float(weibull.rho_), float(weibull.lambda_)
            data_span = float(np.max(np.where(np.isfinite(upper), upper, lower)))
            weibull_curve = _weibull_curve(weibull, data_span)
    return GroupEstimate(
        len(lives), failures, exposure, rate, shape, scale_years, turnbull, weibull_curve
    )


def _turnbull(lower: np.ndarray, upper: np.ndarray, weights: np.ndarray) -> list[CurvePoint]:
    fitter = KaplanMeierFitter().fit_interval_censoring(lower, upper, weights=weights)
    curve = fitter.survival_function_["NPMLE_estimate_lower"]
    points = [CurvePoint(0.0, 1.0)]
    for years, surviving in curve.items():
        if math.isfinite(years) and years > EARLIEST_YEARS:
            points.append(CurvePoint(float(years), float(surviving)))
    return points


def _weibull_curve(weibull: WeibullFitter, data_span_years: float) -> list[CurvePoint]:
    """The Weibull survival curve at `CURVE_YEARS`, with lifelines' 95 % band (delta
    method) where the data reach; past their span, the curve alone."""
    surviving = weibull.survival_function_at_times(CURVE_TIMES).to_numpy()
    band = weibull.confidence_interval_survival_function_.to_numpy()
    points = []
    for years, value, (one, other) in zip(CURVE_YEARS, surviving, band, strict=True):
        within = years <= data_span_years
        low = max(0.0, float(min(one, other))) if within else None
        high = min(1.0, float(max(one, other))) if within else None
        points.append(CurvePoint(years, float(value), low, high))
    return points
