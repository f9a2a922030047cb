"""What-ifs for installation losses: flash recovered in a vessel for a group of traps.

A repair does not remove installation losses; a project does. This prices one such
project on the survey's own traps: the traps that vent their flash (to a vented
receiver) in a group, their condensate flashed in a vessel at a chosen pressure. Each
trap's yield is the mixing rule from its inlet (and condensate temperature) to the
vessel (`service.physics.flash.flash_recovery`); the steam displaces live steam made
from make-up water, priced on the site's basis: fuel per GJ over the boiler efficiency,
or the steam cost per tonne scaled by heat above make-up (as `annual.yearly_loss`).
"""

from dataclasses import dataclass

from service.physics.conditions import discharges_condensate
from service.physics.flash import flash_recovery
from service.physics.pressure import absolute_from_gauge
from service.physics.steam_tables import saturation_at_pressure
from service.physics.trap_loss import CondensateDestination
from service.reports.pricing import SitePricing
from service.reports.summary import SiteSummary

FLASH_RECOVERY_CAUTION = (
    "An estimate. The traps feeding the vessel must discharge against its pressure (back "
    "pressure cuts their capacity), and a steady low-pressure load must take the steam. "
    "A flash vessel is a pressure vessel: design, relief and inspection follow local codes."
)


@dataclass(frozen=True, slots=True)
class FlashRecoveryWhatIf:
    """A flash vessel for a group of traps, and what it recovers a year."""

    vessel_pressure_kpa_g: float
    area_name: str | None  # None: every area
    traps: int  # venting flash, in the group, above the vessel's pressure
    traps_below_vessel: int  # venting flash in the group, but at or below its pressure
    condensate_load_kg_h: float
    recovered_steam_kg_h: float
    annual_recovered_steam_t: float
    annual_energy_gj: float
    annual_fuel_gj: float
    annual_value: float | None
    annual_co2_t: float
    caution: str = FLASH_RECOVERY_CAUTION


def flash_recovery_what_if(
    *,
    summary: SiteSummary,
    pricing: SitePricing,
    vessel_pressure_kpa_g: float,
    area_name: str | None = None,
) -> FlashRecoveryWhatIf:
    """Flash recovered at a vessel [kPa(g)] from the survey's traps that vent it, in one
    area or all. Raises ValueError where the vessel's pressure is off the saturation line."""
    economics = pricing.economics
    vessel_kpa_abs = absolute_from_gauge(vessel_pressure_kpa_g, pricing.atmospheric_pressure_kpa)
    vessel_hg = saturation_at_pressure(vessel_kpa_abs).hg_kj_kg
    makeup = economics.makeup_water_enthalpy_kj_kg
    traps = below = 0
    load = recovered = annual_t = energy = value = 0.0
    priced = economics.steam_cost_per_tonne is not None or economics.fuel_price_per_gj is not None
    for trap in summary.priced:
        service = trap.service
        if (
            service.destination is not CondensateDestination.VENTED_RECEIVER
            or not discharges_condensate(trap.condition)
            or service.condensate_load_kg_h <= 0.0
            or (area_name is not None and trap.area_name != area_name)
        ):
            continue
        if service.inlet_pressure_kpa_abs <= vessel_kpa_abs:
            below += 1
            continue
        recovery = flash_recovery(
            condensate_load_kg_h=service.condensate_load_kg_h,
            inlet_pressure_kpa_abs=service.inlet_pressure_kpa_abs,
            vessel_pressure_kpa_abs=vessel_kpa_abs,
            hours_per_year=service.hours_per_year,
            makeup_water_enthalpy_kj_kg=makeup,
            condensate_temperature_c=service.condensate_temperature_c,
        )
        traps += 1
        load += service.condensate_load_kg_h
        recovered += recovery.recovered_steam_kg_h
        annual_t += recovery.annual_recovered_steam_t
        energy += recovery.annual_energy_gj
        if economics.steam_cost_per_tonne is not None:
            inlet_hg = saturation_at_pressure(service.inlet_pressure_kpa_abs).hg_kj_kg
            share = (vessel_hg - makeup) / (inlet_hg - makeup)
            value += recovery.annual_recovered_steam_t * economics.steam_cost_per_tonne * share
    fuel = energy / economics.boiler_efficiency
    if economics.fuel_price_per_gj is not None:
        value = fuel * economics.fuel_price_per_gj
    return FlashRecoveryWhatIf(
        vessel_pressure_kpa_g=vessel_pressure_kpa_g,
        area_name=area_name,
        traps=traps,
        traps_below_vessel=below,
        condensate_load_kg_h=load,
        recovered_steam_kg_h=recovered,
        annual_recovered_steam_t=annual_t,
        annual_energy_gj=energy,
        annual_fuel_gj=fuel,
        annual_value=value if priced else None,
        annual_co2_t=fuel * economics.co2_kg_per_gj_counted / 1000.0,
    )
