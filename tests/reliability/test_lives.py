"""A trap's tests and repairs as interval-censored lives (the data form of Turnbull
1976, J. R. Stat. Soc. B 38:290-295), worked by hand."""

import datetime as dt
import math

import pytest

from service.reliability.lives import DAYS_A_YEAR, Inspection, Life, lives_of

D = dt.date


def _years(days: int) -> float:
    return days / DAYS_A_YEAR


def test_a_failure_ends_a_life_between_the_last_working_test_and_the_failed_one() -> None:
    tests = [Inspection(D(2022, 3, 1), False), Inspection(D(2023, 3, 1), False)]
    tests.append(Inspection(D(2024, 3, 1), True))
    assert lives_of(tests, []) == [Life(_years(365), _years(731))]


def test_a_trap_still_working_is_right_censored_at_its_last_test() -> None:
    tests = [Inspection(D(2022, 3, 1), False), Inspection(D(2024, 3, 1), False)]
    (life,) = lives_of(tests, [])
    assert life == Life(_years(731), math.inf)
    assert not life.failed


def test_an_installation_date_starts_the_first_life() -> None:
    (life,) = lives_of([Inspection(D(2022, 3, 1), True)], [], installed_on=D(2020, 3, 1))
    assert life == Life(0.0, _years(730))


def test_a_failure_with_no_known_start_tells_nothing_of_a_lifes_length() -> None:
    assert lives_of([Inspection(D(2022, 3, 1), True), Inspection(D(2023, 3, 1), True)], []) == []


def test_a_repair_starts_a_new_life_and_its_confirming_test_on_the_day_counts_for_it() -> None:
    tests = [Inspection(D(2022, 3, 1), False), Inspection(D(2023, 3, 1), True)]
    tests += [Inspection(D(2023, 6, 1), False), Inspection(D(2024, 6, 1), True)]
    lives = lives_of(tests, [D(2023, 6, 1)])
    assert lives == [Life(0.0, _years(365)), Life(_years(0), _years(366))]


def test_a_working_test_after_a_failure_with_no_repair_recorded_starts_a_new_life() -> None:
    tests = [Inspection(D(2022, 3, 1), False), Inspection(D(2023, 3, 1), True)]
    tests += [Inspection(D(2024, 3, 1), False)]
    lives = lives_of(tests, [])
    assert lives == [Life(0.0, _years(365)), Life(0.0, math.inf)]


@pytest.mark.parametrize("order", [1, -1])
def test_the_order_events_come_in_does_not_matter(order: int) -> None:
    tests = [Inspection(D(2022, 3, 1), False), Inspection(D(2023, 3, 1), True)][::order]
    assert lives_of(tests, []) == [Life(0.0, _years(365))]
