"""From a lost kilogram to a year's energy, fuel, money and CO2.

Every kilogram of water that leaves the system must be made again from makeup water:
the boiler puts back q = h_lost - h_makeup (kJ/kg), burning q / efficiency of fuel.
Cost follows one of two bases:

- steam cost per tonne (all-in, as the site's accounts give it): live steam costs
  that per tonne; condensate heat is priced at the cost per GJ it implies, so a tonne
  of hot water is worth its share of a tonne of steam's heat;
- fuel price per GJ of fuel, plus water and treatment per tonne of water lost.

Live steam that blows into a closed (pressurised) return is not lost water: it comes
back to the boiler house as condensate at the return's saturation. What is lost is the
heat the return does not bring back, hg(p1) - hf(p_return), with no water charge
(`replaced_from_kj_kg`). A site may instead price it as steam lost (a setting).

CO2 = fuel energy * emission factor. Default: natural gas, IPCC 2006 Guidelines for
National Greenhouse Gas Inventories, vol. 2 table 2.2, 56.1 t CO2/TJ on a net
(lower heating value) basis, i.e. 56.1 kg/GJ. Fuel energy is counted on the basis the
boiler efficiency and the fuel price are quoted on (net, LHV, or gross, HHV); a factor
quoted on the other basis is converted with the site's net-to-gross ratio (about 0.9
for natural gas: IPCC 2006 vol. 2 ch. 1, 1.4.1.2, from memory).

Source: US DOE Steam Tip Sheet "Inspect and Repair Steam Traps" for the cost of a
year's loss.
"""

from dataclasses import dataclass
from enum import StrEnum

from service.physics import steam_tables
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA

HOURS_IN_LEAP_YEAR = 8784.0
DEFAULT_BOILER_EFFICIENCY = 0.80  # typical 0.75-0.85, common practice
# Below this no steam boiler runs (common practice); it also keeps fuel = energy / efficiency
# finite for every stored price.
MIN_BOILER_EFFICIENCY = 0.3
DEFAULT_MAKEUP_WATER_TEMPERATURE_C = 15.0  # cold mains water, common practice
DEFAULT_CO2_KG_PER_GJ_FUEL = 56.1  # natural gas, IPCC 2006 vol. 2 table 2.2 (LHV)
# Net (LHV) over gross (HHV) calorific value of natural gas: IPCC 2006 vol. 2 ch. 1,
# 1.4.1.2 ("about 10 %" apart), from memory.
DEFAULT_NET_TO_GROSS_RATIO = 0.9


class HeatingValue(StrEnum):
    """The basis a fuel's energy is counted on."""

    LHV = "lhv"  # net (lower) calorific value
    HHV = "hhv"  # gross (higher) calorific value


class ClosedReturnPricing(StrEnum):
    """How live steam blowing into a closed return is priced."""

    HEAT_NOT_RECOVERED = "heat_not_recovered"  # hg(p1) - hf(p_return), no water charge
    AS_STEAM_LOST = "as_steam_lost"  # as if vented: all of it made again from make-up


@dataclass(frozen=True, slots=True)
class Economics:
    """The plant's prices and efficiency that turn lost steam into money and CO2.

    Give at most one cost basis; with neither, costs are not computed (None).
    """

    steam_cost_per_tonne: float | None = None
    fuel_price_per_gj: float | None = None
    water_and_treatment_cost_per_tonne: float = 0.0
    boiler_efficiency: float = DEFAULT_BOILER_EFFICIENCY
    makeup_water_temperature_c: float = DEFAULT_MAKEUP_WATER_TEMPERATURE_C
    co2_kg_per_gj_fuel: float = DEFAULT_CO2_KG_PER_GJ_FUEL
    fuel_heating_value: HeatingValue = HeatingValue.LHV  # of boiler efficiency, fuel price
    co2_factor_heating_value: HeatingValue = HeatingValue.LHV
    net_to_gross_ratio: float = DEFAULT_NET_TO_GROSS_RATIO
    sewer_cost_per_tonne: float = 0.0  # charged on water run to drain
    # Hot drains cooled with make-up water to this temperature before the sewer [degC]
    drain_temperature_limit_c: float | None = None
    closed_return_pricing: ClosedReturnPricing = ClosedReturnPricing.HEAT_NOT_RECOVERED

    def __post_init__(self) -> None:
        if self.steam_cost_per_tonne is not None and self.fuel_price_per_gj is not None:
            raise ValueError("give either a steam cost per tonne or a fuel price per GJ, not both")
        if not MIN_BOILER_EFFICIENCY <= self.boiler_efficiency <= 1.0:
            raise ValueError(
                f"boiler efficiency {self.boiler_efficiency:g} must lie between "
                f"{MIN_BOILER_EFFICIENCY:g} and 1"
            )

    @property
    def co2_kg_per_gj_counted(self) -> float:
        """The CO2 factor per GJ of fuel on the basis fuel energy is counted on.

        >>> round(Economics(fuel_heating_value=HeatingValue.HHV).co2_kg_per_gj_counted, 2)
        50.49
        """
        if self.fuel_heating_value is self.co2_factor_heating_value:
            return self.co2_kg_per_gj_fuel
        if self.fuel_heating_value is HeatingValue.HHV:  # per GJ gross = per GJ net * net/gross
            return self.co2_kg_per_gj_fuel * self.net_to_gross_ratio
        return self.co2_kg_per_gj_fuel / self.net_to_gross_ratio

    @property
    def makeup_water_enthalpy_kj_kg(self) -> float:
        """Makeup water as compressed liquid at one standard atmosphere (IF97 region 1)."""
        return steam_tables.properties_at_pressure_temperature(
            STANDARD_ATMOSPHERE_KPA, self.makeup_water_temperature_c
        ).enthalpy_kj_kg


@dataclass(frozen=True, slots=True)
class YearlyLoss:
    """A year of one loss: water mass, the heat to replace it, fuel, money and CO2."""

    mass_t: float
    energy_gj: float
    fuel_gj: float
    cost: float | None
    co2_t: float

    def scaled(self, factor: float) -> "YearlyLoss":
        """This loss for `factor` times the mass (every figure is proportional to it)."""
        return YearlyLoss(
            mass_t=self.mass_t * factor,
            energy_gj=self.energy_gj * factor,
            fuel_gj=self.fuel_gj * factor,
            cost=None if self.cost is None else self.cost * factor,
            co2_t=self.co2_t * factor,
        )

    def plus_cost(self, extra_cost: float) -> "YearlyLoss":
        """This loss with a charge that is money only (a sewer charge), where it is priced."""
        cost = None if self.cost is None else self.cost + extra_cost
        return YearlyLoss(self.mass_t, self.energy_gj, self.fuel_gj, cost, self.co2_t)

    def __add__(self, other: "YearlyLoss") -> "YearlyLoss":
        cost = None if self.cost is None or other.cost is None else self.cost + other.cost
        return YearlyLoss(
            mass_t=self.mass_t + other.mass_t,
            energy_gj=self.energy_gj + other.energy_gj,
            fuel_gj=self.fuel_gj + other.fuel_gj,
            cost=cost,
            co2_t=self.co2_t + other.co2_t,
        )


def no_yearly_loss(economics: Economics) -> YearlyLoss:
    """A year of nothing lost, priced (zero) where the economics give a cost basis."""
    priced = economics.steam_cost_per_tonne is not None or economics.fuel_price_per_gj is not None
    return YearlyLoss(0.0, 0.0, 0.0, 0.0 if priced else None, 0.0)


def require_hours_per_year(hours_per_year: float) -> None:
    """Raise ValueError unless 0 <= hours <= 8784 (a leap year).

    >>> require_hours_per_year(9000)
    Traceback (most recent call last):
    ...
    ValueError: 9000 hours is more than a year holds (8784 in a leap year)
    """
    if not 0.0 <= hours_per_year <= HOURS_IN_LEAP_YEAR:
        if hours_per_year < 0.0:
            raise ValueError(f"{hours_per_year:g} hours in service cannot be negative")
        raise ValueError(
            f"{hours_per_year:g} hours is more than a year holds "
            f"({HOURS_IN_LEAP_YEAR:.0f} in a leap year)"
        )


def yearly_loss(
    *,
    mass_kg_h: float,
    lost_enthalpy_kj_kg: float,
    steam_enthalpy_kj_kg: float,
    hours_per_year: float,
    economics: Economics,
    replaced_from_kj_kg: float | None = None,
) -> YearlyLoss:
    """A year of losing water at `mass_kg_h` [kg/h] that carried `lost_enthalpy_kj_kg`.

    `steam_enthalpy_kj_kg` is the live steam the site's steam cost refers to (the
    trap's inlet steam); it sets the cost per GJ a steam-cost basis implies. With
    `replaced_from_kj_kg` the water comes back at that enthalpy (a closed return): only
    the heat above it is lost, and no water or treatment is charged.

    Worked example, US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": 75.8 lb/h
    for 8760 h at $10.00 per 1000 lb is $6,640 a year.

    >>> pound = 0.45359237
    >>> steam = steam_tables.saturation_at_pressure(150 * 6.894757293168361 + 101.325).hg_kj_kg
    >>> loss = yearly_loss(mass_kg_h=75.8 * pound, lost_enthalpy_kj_kg=steam,
    ...     steam_enthalpy_kj_kg=steam, hours_per_year=8760,
    ...     economics=Economics(steam_cost_per_tonne=10.0 / (1000 * pound / 1000)))
    >>> round(loss.cost)
    6640
    """
    require_hours_per_year(hours_per_year)
    makeup = economics.makeup_water_enthalpy_kj_kg
    water_lost = replaced_from_kj_kg is None
    reference = makeup if replaced_from_kj_kg is None else replaced_from_kj_kg
    mass_t = mass_kg_h * hours_per_year / 1000.0
    energy_gj = mass_t * max(0.0, lost_enthalpy_kj_kg - reference) / 1000.0
    fuel_gj = energy_gj / economics.boiler_efficiency
    cost: float | None = None
    if economics.steam_cost_per_tonne is not None:
        share_of_steam_heat = (lost_enthalpy_kj_kg - reference) / (steam_enthalpy_kj_kg - makeup)
        cost = mass_t * economics.steam_cost_per_tonne * max(0.0, share_of_steam_heat)
    elif economics.fuel_price_per_gj is not None:
        water_t = mass_t if water_lost else 0.0
        cost = (
            fuel_gj * economics.fuel_price_per_gj
            + water_t * economics.water_and_treatment_cost_per_tonne
        )
    return YearlyLoss(
        mass_t=mass_t,
        energy_gj=energy_gj,
        fuel_gj=fuel_gj,
        cost=cost,
        co2_t=fuel_gj * economics.co2_kg_per_gj_counted / 1000.0,
    )
