"""The test interval of least yearly cost against its closed form and a numerical
minimum; the DOE pressure classes at their boundaries."""

import math

import pytest
from scipy.optimize import minimize_scalar

from service.reliability.intervals import (
    PSIG_KPA,
    best_test_interval_years,
    chance_failed_by,
    pressure_class,
    yearly_testing_cost,
)


@pytest.mark.parametrize(
    ("test_cost", "rate", "loss"), [(10.0, 0.1, 2000.0), (25.0, 0.04, 300.0), (5.0, 0.2, 9000.0)]
)
def test_the_best_interval_is_the_closed_forms_and_the_cost_curves_minimum(
    test_cost: float, rate: float, loss: float
) -> None:
    best = best_test_interval_years(test_cost, rate, loss)
    assert best == pytest.approx(math.sqrt(2 * test_cost / (rate * loss)), rel=1e-12)
    found = minimize_scalar(
        lambda years: yearly_testing_cost(years, test_cost, rate, loss),
        bounds=(1e-3, 20.0),
        method="bounded",
        options={"xatol": 1e-9},
    )
    assert found.x == pytest.approx(best, rel=1e-4)
    # At the best interval, testing costs what the undetected failures waste.
    assert test_cost / best == pytest.approx(rate * loss * best / 2, rel=1e-9)


def test_nothing_failing_needs_no_testing_and_a_bad_interval_is_refused() -> None:
    assert best_test_interval_years(10.0, 0.0, 2000.0) == math.inf
    with pytest.raises(ValueError, match="above zero"):
        yearly_testing_cost(0.0, 10.0, 0.1, 2000.0)


@pytest.mark.parametrize(
    ("psig", "expected"),
    # US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": 150 psig and above,
    # 30 to 150 psig, below 30 psig.
    [(150.0, "high"), (149.9, "medium"), (30.0, "medium"), (29.9, "low"), (0.0, "low")],
)
def test_pressure_classes_as_the_doe_tip_sheet(psig: float, expected: str) -> None:
    assert pressure_class(psig * PSIG_KPA) == expected


def test_the_chance_of_a_failure_by_a_day_is_the_exponential_distributions() -> None:
    assert chance_failed_by(0.1, 1.0) == pytest.approx(1 - math.exp(-0.1), rel=1e-12)
    assert chance_failed_by(0.1, -1.0) == 0.0
