"""Unit conversions against the exact definitions of NIST SP 811 (2008), appendix B."""

import pytest

from service.physics.pressure import (
    absolute_from_gauge,
    atmospheric_pressure_at_elevation_kpa,
    gauge_from_absolute,
)
from service.physics.units import UNITS, Dimension, UnitSystem, convert, display_unit

POUND_KG = 0.45359237  # NIST SP 811 B.8, exact
INCH_M = 0.0254  # NIST SP 811 B.8, exact
STANDARD_GRAVITY = 9.80665  # NIST SP 811 B.8 (pound-force), exact
BTU_IT_J = 1055.05585262  # NIST SP 811 B.8, British thermal unit (IT), exact
PSI_KPA = POUND_KG * STANDARD_GRAVITY / INCH_M**2 / 1000.0


@pytest.mark.parametrize(
    ("value", "source", "target", "expected"),
    [
        (1.0, "psia", "kPa(abs)", PSI_KPA),
        (150.0, "psig", "kPa(g)", 150.0 * PSI_KPA),
        (150.0, "psig", "kPa(abs)", 150.0 * PSI_KPA + 101.325),
        (1.0, "bar(g)", "kPa(g)", 100.0),
        (0.0, "kPa(g)", "kPa(abs)", 101.325),
        (101.325, "kPa(abs)", "psig", 0.0),
        (100.0, "°C", "°F", 212.0),
        (32.0, "°F", "°C", 0.0),
        (0.0, "°C", "K", 273.15),
        (1.0, "Δ°C", "Δ°F", 1.8),
        (1.0, "lb/h", "kg/h", POUND_KG),
        (1.0, "in", "mm", 25.4),
        (1.0, "1000 lb", "t", POUND_KG),
        (1.0, "lb", "kg", POUND_KG),
        (1.0, "MMBtu", "GJ", BTU_IT_J * 1e6 / 1e9),
        (1.0, "therm", "MMBtu", 0.1),
        (1.0, "kWh", "GJ", 0.0036),
        (10.0, "per 1000 lb", "per t", 10.0 / POUND_KG),
        (1.0, "per GJ", "per MMBtu", BTU_IT_J * 1e6 / 1e9),
        (1.0, "per therm", "per MMBtu", 10.0),
        # US EPA 40 CFR 98 table C-1: natural gas 53.06 kg CO2/MMBtu (HHV basis).
        (53.06, "kg/MMBtu", "kg/GJ", 53.06 / (BTU_IT_J * 1e-3)),
    ],
)
def test_conversions_match_the_exact_definitions(
    value: float, source: str, target: str, expected: float
) -> None:
    assert convert(value, source, target) == pytest.approx(expected, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("symbol", list(UNITS))
def test_every_unit_round_trips_through_each_unit_of_its_dimension(symbol: str) -> None:
    for other in UNITS.values():
        if other.dimension is UNITS[symbol].dimension:
            back = convert(convert(42.0, symbol, other.symbol), other.symbol, symbol)
            assert back == pytest.approx(42.0, rel=1e-12)


def test_gauge_units_use_the_sites_atmosphere() -> None:
    assert convert(0.0, "psig", "kPa(abs)", atmospheric_pressure_kpa=90.0) == pytest.approx(90.0)
    assert convert(90.0, "kPa(abs)", "bar(g)", atmospheric_pressure_kpa=90.0) == 0.0


def test_units_of_different_dimensions_do_not_convert() -> None:
    with pytest.raises(ValueError, match="cannot convert"):
        convert(1.0, "kg/h", "mm")
    with pytest.raises(ValueError, match="unknown unit 'furlong'"):
        convert(1.0, "furlong", "mm")


def test_each_system_shows_every_dimension() -> None:
    for system in UnitSystem:
        for dimension in Dimension:
            assert UNITS[display_unit(system, dimension)].dimension is dimension


def test_gauge_and_absolute_pressure() -> None:
    assert absolute_from_gauge(400.0, 95.0) == 495.0
    assert gauge_from_absolute(495.0, 95.0) == 400.0


@pytest.mark.parametrize(
    ("elevation_m", "pressure_kpa"),
    # ICAO Standard Atmosphere (Doc 7488), tabulated pressures; values recalled from
    # memory of the table, checked to the printed 4 significant digits.
    [(0.0, 101.325), (1000.0, 89.87), (2000.0, 79.50)],
)
def test_standard_atmosphere_by_elevation(elevation_m: float, pressure_kpa: float) -> None:
    assert atmospheric_pressure_at_elevation_kpa(elevation_m) == pytest.approx(
        pressure_kpa, abs=0.01
    )


def test_elevation_outside_the_troposphere_is_refused() -> None:
    with pytest.raises(ValueError, match="troposphere"):
        atmospheric_pressure_at_elevation_kpa(12_000.0)
