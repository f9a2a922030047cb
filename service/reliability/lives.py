"""A trap's lives from its tests and repairs, as interval-censored observations.

A life starts when the trap is known to work: its installation, a repair, or a test that
found it working after an unrecorded fix. A trap found failed failed at some unknown time
since the last test that found it working: its life ends in that interval
(interval-censored). A trap still working at its last test has lived at least that long
(right-censored). A trap found failed with no known start tells nothing of its life's
length and gives none. Tests that found a trap not accessible or out of service are no
evidence either way. (Turnbull 1976, J. R. Stat. Soc. B 38:290-295, for the data's form.)
"""

import datetime as dt
import math
from collections.abc import Iterable
from dataclasses import dataclass

DAYS_A_YEAR = 365.25


@dataclass(frozen=True, slots=True)
class Inspection:
    """A test that told whether the trap worked: `failed` for any failed condition."""

    on: dt.date
    failed: bool


@dataclass(frozen=True, slots=True)
class Life:
    """A life's length [years]: between `lower_years` and `upper_years` (inf: still
    working at `lower_years`)."""

    lower_years: float
    upper_years: float

    @property
    def failed(self) -> bool:
        return math.isfinite(self.upper_years)


def _years(start: dt.date, end: dt.date) -> float:
    return (end - start).days / DAYS_A_YEAR


def lives_of(
    tests: Iterable[Inspection], repairs: Iterable[dt.date], installed_on: dt.date | None = None
) -> list[Life]:
    """The lives one trap's history shows, oldest first.

    >>> working, failed = dt.date(2023, 3, 1), dt.date(2024, 3, 1)
    >>> lives_of([Inspection(working, False), Inspection(failed, True)], [])
    [Life(lower_years=0.0, upper_years=1.002053388090349)]
    >>> lives_of([Inspection(dt.date(2024, 3, 1), False)], [], installed_on=dt.date(2020, 3, 1))
    [Life(lower_years=4.0, upper_years=inf)]
    """
    events = sorted(
        [(test.on, 1, test.failed) for test in tests] + [(day, 0, False) for day in repairs]
    )  # on one day, a repair (0) comes before the test (1) that confirms it
    start = last_working = installed_on
    lives = []
    for day, kind, failed in events:
        if kind == 0 or not failed:  # a repair, or a test that found it working
            if start is None:
                start = day
            last_working = day
        elif start is not None and last_working is not None:
            lives.append(Life(_years(start, last_working), _years(start, day)))
            start = last_working = None
    if start is not None and last_working is not None:
        lives.append(Life(_years(start, last_working), math.inf))
    return lives
