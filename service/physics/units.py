"""Units for input and display, converted only at the edges (forms, pages, exports).

Inside the program every figure is in the declared set of `service.physics`. The
conversion factors come from `pint`, whose definitions follow NIST SP 811 (2008),
"Guide for the Use of the International System of Units": the pound is exactly
0.45359237 kg, the inch 0.0254 m, the pound-force the pound times standard gravity
9.80665 m/s2, the British thermal unit (International Table) 1055.05585262 J. A
therm here is 100 000 Btu(IT) and an MMBtu 1 000 000 Btu(IT), as gas is billed.

Gauge units need the site's atmospheric pressure; pass it where the site is not at
one standard atmosphere.
"""

from dataclasses import dataclass
from enum import StrEnum
from functools import lru_cache
from typing import Any

import pint

from service.physics.pressure import STANDARD_ATMOSPHERE_KPA


class Dimension(StrEnum):
    PRESSURE = "pressure"
    TEMPERATURE = "temperature"
    TEMPERATURE_DIFFERENCE = "temperature_difference"
    MASS_FLOW = "mass_flow"
    LENGTH = "length"
    MASS = "mass"
    ENERGY = "energy"
    PRICE_PER_MASS = "price_per_mass"
    PRICE_PER_ENERGY = "price_per_energy"
    EMISSION_FACTOR = "emission_factor"


class UnitSystem(StrEnum):
    SI = "si"
    US_CUSTOMARY = "us"


@dataclass(frozen=True, slots=True)
class Unit:
    """A unit a person may read or type, with the `pint` expression behind it."""

    symbol: str
    dimension: Dimension
    pint_expression: str
    gauge: bool = False


_UNITS = (
    Unit("kPa(g)", Dimension.PRESSURE, "kPa", gauge=True),
    Unit("bar(g)", Dimension.PRESSURE, "bar", gauge=True),
    Unit("psig", Dimension.PRESSURE, "psi", gauge=True),
    Unit("kPa(abs)", Dimension.PRESSURE, "kPa"),
    Unit("bar(abs)", Dimension.PRESSURE, "bar"),
    Unit("psia", Dimension.PRESSURE, "psi"),
    Unit("°C", Dimension.TEMPERATURE, "degC"),
    Unit("°F", Dimension.TEMPERATURE, "degF"),
    Unit("K", Dimension.TEMPERATURE, "kelvin"),
    Unit("Δ°C", Dimension.TEMPERATURE_DIFFERENCE, "delta_degC"),
    Unit("Δ°F", Dimension.TEMPERATURE_DIFFERENCE, "delta_degF"),
    Unit("kg/h", Dimension.MASS_FLOW, "kg/hour"),
    Unit("lb/h", Dimension.MASS_FLOW, "lb/hour"),
    Unit("mm", Dimension.LENGTH, "mm"),
    Unit("in", Dimension.LENGTH, "inch"),
    Unit("t", Dimension.MASS, "tonne"),
    Unit("1000 lb", Dimension.MASS, "kilolb"),
    Unit("kg", Dimension.MASS, "kg"),
    Unit("lb", Dimension.MASS, "lb"),
    Unit("GJ", Dimension.ENERGY, "GJ"),
    Unit("MMBtu", Dimension.ENERGY, "MMBtu"),
    Unit("therm", Dimension.ENERGY, "therm_it"),
    Unit("kWh", Dimension.ENERGY, "kWh"),
    Unit("per t", Dimension.PRICE_PER_MASS, "1/tonne"),
    Unit("per 1000 lb", Dimension.PRICE_PER_MASS, "1/kilolb"),
    Unit("per GJ", Dimension.PRICE_PER_ENERGY, "1/GJ"),
    Unit("per MMBtu", Dimension.PRICE_PER_ENERGY, "1/MMBtu"),
    Unit("per therm", Dimension.PRICE_PER_ENERGY, "1/therm_it"),
    Unit("kg/GJ", Dimension.EMISSION_FACTOR, "kg/GJ"),
    Unit("kg/MMBtu", Dimension.EMISSION_FACTOR, "kg/MMBtu"),
)
UNITS: dict[str, Unit] = {unit.symbol: unit for unit in _UNITS}

# The unit each dimension is shown in, by the site's choice of system.
DISPLAY_UNITS: dict[UnitSystem, dict[Dimension, str]] = {
    UnitSystem.SI: {
        Dimension.PRESSURE: "kPa(g)",
        Dimension.TEMPERATURE: "°C",
        Dimension.TEMPERATURE_DIFFERENCE: "Δ°C",
        Dimension.MASS_FLOW: "kg/h",
        Dimension.LENGTH: "mm",
        Dimension.MASS: "t",
        Dimension.ENERGY: "GJ",
        Dimension.PRICE_PER_MASS: "per t",
        Dimension.PRICE_PER_ENERGY: "per GJ",
        Dimension.EMISSION_FACTOR: "kg/GJ",
    },
    UnitSystem.US_CUSTOMARY: {
        Dimension.PRESSURE: "psig",
        Dimension.TEMPERATURE: "°F",
        Dimension.TEMPERATURE_DIFFERENCE: "Δ°F",
        Dimension.MASS_FLOW: "lb/h",
        Dimension.LENGTH: "in",
        Dimension.MASS: "1000 lb",
        Dimension.ENERGY: "MMBtu",
        Dimension.PRICE_PER_MASS: "per 1000 lb",
        Dimension.PRICE_PER_ENERGY: "per MMBtu",
        Dimension.EMISSION_FACTOR: "kg/MMBtu",
    },
}


@lru_cache(maxsize=1)
def _registry() -> "pint.UnitRegistry[Any]":
    registry: pint.UnitRegistry[Any] = pint.UnitRegistry()
    registry.define("kilolb = 1000 * pound")
    registry.define("MMBtu = 1e6 * Btu_it")
    registry.define("therm_it = 1e5 * Btu_it")
    return registry


_SPAN = 1e6


@lru_cache(maxsize=1024)
def _linear_map(from_expression: str, to_expression: str) -> tuple[float, float]:
    """(scale, offset) with to = scale * from + offset, read off pint at two points.

    The points lie far apart so that an offset (degC, degF) costs no digits of the scale.
    """
    registry = _registry()
    at_zero = float(registry.Quantity(0.0, from_expression).to(to_expression).magnitude)
    at_span = float(registry.Quantity(_SPAN, from_expression).to(to_expression).magnitude)
    return (at_span - at_zero) / _SPAN, at_zero


def unit(symbol: str) -> Unit:
    """The unit for a symbol, or ValueError naming the symbols there are."""
    try:
        return UNITS[symbol]
    except KeyError:
        raise ValueError(f"unknown unit '{symbol}'; known units: {', '.join(UNITS)}") from None


def convert(
    value: float,
    from_symbol: str,
    to_symbol: str,
    atmospheric_pressure_kpa: float = STANDARD_ATMOSPHERE_KPA,
) -> float:
    """A value in one unit expressed in another of the same dimension.

    >>> round(convert(150.0, "psig", "kPa(g)"), 4)
    1034.2136
    >>> round(convert(0.0, "bar(g)", "kPa(abs)", atmospheric_pressure_kpa=95.0), 6)
    95.0
    >>> round(convert(212.0, "°F", "°C"), 9)
    100.0
    >>> convert(0.1, "kPa(g)", "kPa(g)")
    0.1
    """
    source, target = unit(from_symbol), unit(to_symbol)
    if from_symbol == to_symbol:
        return value
    if source.dimension is not target.dimension:
        raise ValueError(f"cannot convert {source.dimension} in {from_symbol} to {to_symbol}")
    if source.dimension is not Dimension.PRESSURE:
        scale, offset = _linear_map(source.pint_expression, target.pint_expression)
        return scale * value + offset
    to_kpa, _ = _linear_map(source.pint_expression, "kPa")
    pressure_kpa_abs = value * to_kpa + (atmospheric_pressure_kpa if source.gauge else 0.0)
    from_kpa, _ = _linear_map("kPa", target.pint_expression)
    return (pressure_kpa_abs - (atmospheric_pressure_kpa if target.gauge else 0.0)) * from_kpa


def display_unit(system: UnitSystem, dimension: Dimension) -> str:
    """The symbol a site using `system` reads `dimension` in.

    >>> display_unit(UnitSystem.US_CUSTOMARY, Dimension.MASS_FLOW)
    'lb/h'
    """
    return DISPLAY_UNITS[system][dimension]
