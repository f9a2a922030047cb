"""Numbers as a site reads them: in its unit system, with the unit, in its currency;
and typed numbers read back into the program's units.

Every figure the pages show goes through here, so each carries its unit.
"""

import math
from dataclasses import dataclass

from service.physics.pressure import STANDARD_ATMOSPHERE_KPA
from service.physics.units import DISPLAY_UNITS, Dimension, UnitSystem, convert, display_unit

CURRENCY_SIGNS = {"GBP": "£", "EUR": "€", "USD": "$", "CAD": "CA$", "AUD": "A$", "JPY": "¥"}
# The program's own units are the SI display set (kPa(g), °C, kg/h, mm, t, GJ, ...).
_PROGRAM_UNITS = DISPLAY_UNITS[UnitSystem.SI]
# Significant figures worth showing: the estimates are good to two or three at best.
_DECIMALS = {
    Dimension.PRESSURE: 0,
    Dimension.TEMPERATURE: 1,
    Dimension.MASS_FLOW: 1,
    Dimension.LENGTH: 2,
    Dimension.MASS: 1,
    Dimension.ENERGY: 0,
}


def grouped(value: float, decimals: int = 0) -> str:
    """A number with thousands separators: 12345.6 -> '12,346'."""
    return f"{value:,.{decimals}f}"


@dataclass(frozen=True, slots=True)
class Display:
    """How one site shows and reads numbers."""

    system: UnitSystem = UnitSystem.SI
    currency: str = "EUR"
    atmospheric_pressure_kpa: float = STANDARD_ATMOSPHERE_KPA

    def unit(self, dimension: Dimension) -> str:
        return display_unit(self.system, dimension)

    def value(self, dimension: Dimension, program_value: float) -> float:
        """A figure in the program's unit, in the site's unit."""
        return convert(
            program_value,
            _PROGRAM_UNITS[dimension],
            self.unit(dimension),
            atmospheric_pressure_kpa=self.atmospheric_pressure_kpa,
        )

    def read(self, dimension: Dimension, typed_value: float) -> float:
        """A figure typed in the site's unit, in the program's unit."""
        return convert(
            typed_value,
            self.unit(dimension),
            _PROGRAM_UNITS[dimension],
            atmospheric_pressure_kpa=self.atmospheric_pressure_kpa,
        )

    def quantity(self, dimension: Dimension, program_value: float | None) -> str:
        """'1,000 kPa(g)', or an en dash where there is no value."""
        if program_value is None:
            return "–"
        shown = self.value(dimension, program_value)
        decimals = _DECIMALS.get(dimension, 2)
        if dimension is Dimension.LENGTH and self.system is UnitSystem.US_CUSTOMARY:
            decimals = 3
        return f"{grouped(shown, decimals)} {self.unit(dimension)}"

    def pressure(self, kpa_g: float | None) -> str:
        return self.quantity(Dimension.PRESSURE, kpa_g)

    def temperature(self, celsius: float | None) -> str:
        return self.quantity(Dimension.TEMPERATURE, celsius)

    def flow(self, kg_h: float | None) -> str:
        return self.quantity(Dimension.MASS_FLOW, kg_h)

    def length(self, mm: float | None) -> str:
        return self.quantity(Dimension.LENGTH, mm)

    def mass(self, tonnes: float | None) -> str:
        return self.quantity(Dimension.MASS, tonnes)

    def energy(self, gj: float | None) -> str:
        return self.quantity(Dimension.ENERGY, gj)

    def co2(self, tonnes: float | None) -> str:
        return "–" if tonnes is None else f"{grouped(tonnes, 1)} t CO₂"

    def money(self, amount: float | None, decimals: int = 0) -> str:
        if amount is None:
            return "–"
        sign = CURRENCY_SIGNS.get(self.currency)
        body = grouped(abs(amount), decimals)
        text = f"{sign}{body}" if sign else f"{body} {self.currency}"
        return f"−{text}" if amount < 0 else text

    def price(self, dimension: Dimension, program_value: float | None) -> str:
        """A price per tonne or per GJ in the site's unit: '£30.00 per t'."""
        if program_value is None:
            return "–"
        return f"{self.money(self.value(dimension, program_value), 2)} {self.unit(dimension)}"

    def money_range(self, low: float | None, high: float | None) -> str:
        return f"{self.money(low)} to {self.money(high)}"

    def years(self, value: float | None) -> str:
        if value is None or not math.isfinite(value):
            return "–"
        if value < 1 / 12:
            return f"{value * 52:.1f} weeks"
        if value < 1:
            return f"{value * 12:.1f} months"
        return f"{value:.1f} years"


def percent(share: float | None, decimals: int = 1) -> str:
    return "–" if share is None else f"{share * 100:.{decimals}f} %"
