"""How often to test a group of traps, and what a test on a given day will find.

A trap fails at a constant rate lambda [1/year]; a failed trap wastes L a year until it
is found; a test costs C a trap. Tested every T years, a failure waits on average T/2 to
be found, so a trap's yearly cost is C/T + lambda*L*T/2, least at T* = sqrt(2*C /
(lambda*L)), where testing costs exactly what the undetected failures waste (the classic
inspection-interval model, e.g. Barlow and Proschan, Mathematical Theory of Reliability,
1965, from memory; applied to steam traps by Hooper and Gillette, International District
Energy Association, 1994, not checked here). It holds while lambda*T is small (a trap
fails at most once between tests).

US DOE Steam Tip Sheet "Inspect and Repair Steam Traps" suggests testing by pressure:
150 psig and above weekly to monthly, 30 to 150 psig monthly to quarterly, below 30 psig
annually (`DOE_INTERVALS`).
"""

import math

PSIG_KPA = 6.894757  # kPa a psi (NIST SP 811, exact to the digits shown)

# Pressure class -> (lowest inlet kPa(g) of the class, the DOE interval in words)
DOE_INTERVALS: dict[str, tuple[float, str]] = {
    "high": (150 * PSIG_KPA, "weekly to monthly"),
    "medium": (30 * PSIG_KPA, "monthly to quarterly"),
    "low": (0.0, "annually"),
}


def pressure_class(inlet_pressure_kpa_g: float) -> str:
    """The DOE tip sheet's pressure class of a trap: high (150 psig and above), medium
    (30 to 150 psig) or low (below 30 psig).

    >>> pressure_class(1100.0), pressure_class(1000.0), pressure_class(100.0)
    ('high', 'medium', 'low')
    """
    for name, (lowest_kpa_g, _) in DOE_INTERVALS.items():
        if inlet_pressure_kpa_g >= lowest_kpa_g:
            return name
    return "low"


def yearly_testing_cost(
    interval_years: float, test_cost: float, failures_per_year: float, failure_loss: float
) -> float:
    """A trap's yearly cost of testing every `interval_years` [years]: C/T + lambda*L*T/2.

    `test_cost` [money a test], `failures_per_year` [1/year], `failure_loss` [money a year
    of a failed trap].

    >>> yearly_testing_cost(1.0, 10.0, 0.1, 2000.0)
    110.0
    """
    if interval_years <= 0:
        raise ValueError("the test interval must be above zero")
    return test_cost / interval_years + failures_per_year * failure_loss * interval_years / 2


def best_test_interval_years(
    test_cost: float, failures_per_year: float, failure_loss: float
) -> float:
    """T* = sqrt(2*C / (lambda*L)) [years]: the interval of least yearly cost; infinite
    where nothing fails or a failure costs nothing.

    >>> round(best_test_interval_years(10.0, 0.1, 2000.0), 4)
    0.3162
    """
    if test_cost < 0:
        raise ValueError("a test cannot cost less than nothing")
    risk = failures_per_year * failure_loss
    return math.inf if risk <= 0 else math.sqrt(2 * test_cost / risk)


def chance_failed_by(failures_per_year: float, years_since_found_working: float) -> float:
    """The chance a trap found working has failed `years_since_found_working` later, at
    a constant rate: 1 - exp(-lambda*t).

    >>> round(chance_failed_by(0.1, 1.0), 4)
    0.0952
    """
    return 1.0 - math.exp(-failures_per_year * max(years_since_found_working, 0.0))
