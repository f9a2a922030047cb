"""Failure rates and survival from interval-censored lives: against the exact Poisson
limits' published table, a hand-worked Turnbull case, and synthetic fleets drawn from
known rates, which the fits must recover within their intervals."""

import math
import random

import pytest

from service.reliability.estimates import estimate, poisson_interval
from service.reliability.lives import Life


def test_exact_poisson_limits_match_the_published_table() -> None:
    # Garwood (1936), Biometrika 28:437-442: 95 % limits of a count of 10 are 4.795 and
    # 18.390 (as tabulated by Ulm 1990, Am. J. Epidemiol. 131:373-375; from memory).
    rate = poisson_interval(10, 1.0)
    assert (rate.per_year, rate.low, rate.high) == pytest.approx((10.0, 4.795, 18.390), abs=5e-4)
    # A count of 1: 0.0253 to 5.572 (same tables).
    one = poisson_interval(1, 1.0)
    assert (one.low, one.high) == pytest.approx((0.0253, 5.572), abs=5e-4)


def test_no_failure_gives_a_zero_rate_bounded_by_the_rule_of_three() -> None:
    # -ln(0.05) = 2.996 failures over the exposure: the one-sided 95 % bound of a zero
    # count (common practice, "the rule of three").
    found = estimate([Life(4.0, math.inf)] * 25)
    assert (found.rate.per_year, found.rate.low) == (0.0, 0.0)
    assert found.rate.high == pytest.approx(2.996 / 100.0, rel=1e-3)
    assert found.turnbull == []


def test_turnbull_reduces_to_the_product_limit_for_intervals_that_do_not_overlap() -> None:
    # Worked by hand: two of four fail in (0, 1], one of the two left in (1, 2], one
    # still working at 2: S(1) = 2/4, S(2) = 1/2 x 1/2 (Turnbull 1976 reduces to the
    # Kaplan-Meier product limit here).
    lives = [Life(0.0, 1.0), Life(0.0, 1.0), Life(1.0, 2.0), Life(2.0, math.inf)]
    curve = {round(point.years, 6): point.surviving for point in estimate(lives).turnbull}
    assert curve[1.0] == pytest.approx(0.5, abs=1e-6)
    assert curve[2.0] == pytest.approx(0.25, abs=1e-6)


def _yearly_tests(lives: list[float], rounds: int) -> list[Life]:
    """Lives seen by a test each year for `rounds` years (synthetic: invented data)."""
    seen = []
    for life in lives:
        if life < rounds:
            seen.append(Life(float(math.floor(life)), float(math.floor(life) + 1)))
        else:
            seen.append(Life(float(rounds), math.inf))
    return seen


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("rate_per_year", [0.05, 0.15])
def test_the_constant_rate_fit_recovers_a_known_rate_within_its_interval(
    seed: int, rate_per_year: float
) -> None:
    draw = random.Random(seed)
    lives = _yearly_tests([draw.expovariate(rate_per_year) for _ in range(1500)], rounds=5)
    rate = estimate(lives, with_curves=False).rate
    assert rate.low <= rate_per_year <= rate.high
    assert rate.per_year == pytest.approx(rate_per_year, rel=0.2)


def test_the_weibull_fit_recovers_a_known_wear_out_shape() -> None:
    # Weibull shape 2.5, scale 6 years: failures grow with age (synthetic data).
    draw = random.Random(7)
    lives = _yearly_tests([draw.weibullvariate(6.0, 2.5) for _ in range(2000)], rounds=8)
    found = estimate(lives)
    assert found.weibull_shape == pytest.approx(2.5, rel=0.1)
    assert found.weibull_scale_years == pytest.approx(6.0, rel=0.1)
    # Its 95 % band holds the fitted curve and lies within 0.01 of the true one wherever
    # the tests span (this draw's fitted shape, 2.36, sits a little below the true 2.5,
    # so the true curve runs just above the band's top in the early years).
    for point in found.weibull_curve:
        if point.low is None or point.high is None:
            continue
        truth = math.exp(-((point.years / 6.0) ** 2.5))
        assert point.low <= point.surviving <= point.high
        assert point.low - 0.01 <= truth <= point.high + 0.01
    assert [point.low for point in found.weibull_curve if point.years > 8] == [None]


@pytest.mark.parametrize("seed", [4, 5])
def test_the_constant_rate_equals_lifelines_exponential_fitter(seed: int) -> None:
    # lifelines' ExponentialFitter (Davidson-Pilon 2019) is the reference library here;
    # its scale is the mean life, 1 / rate.
    import numpy as np
    from lifelines import ExponentialFitter

    from service.reliability.estimates import constant_rate

    draw = random.Random(seed)
    lives = _yearly_tests([draw.expovariate(0.1) for _ in range(800)], rounds=6)
    lower = np.array([life.lower_years + 1e-6 for life in lives])
    upper = np.array([life.upper_years for life in lives])
    reference = ExponentialFitter().fit_interval_censoring(lower, upper)
    ours = constant_rate(lower, upper, np.ones(len(lives)))
    assert ours == pytest.approx(1.0 / reference.lambda_, rel=1e-4)
