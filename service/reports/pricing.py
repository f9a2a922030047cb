"""From a stored site, trap and finding to the calculation core's inputs.

The same conversion `POST /api/v1/calc/trap-loss` makes from its request, so that a
trap in a summary and the same trap priced by hand give the same figures.
"""

from service.physics.annual import Economics
from service.physics.conditions import TrapCondition, wastes_live_steam
from service.physics.pressure import absolute_from_gauge
from service.physics.spread import Spread
from service.physics.trap_loss import CondensateDestination, TrapService, loss_factor_for
from service.store.models import Site
from service.store.vocabulary import CostBasis


def economics_of(site: Site) -> Economics:
    """The site's prices, on the cost basis it chose."""
    steam_basis = site.cost_basis is CostBasis.STEAM_COST
    return Economics(
        steam_cost_per_tonne=site.steam_cost_per_tonne if steam_basis else None,
        fuel_price_per_gj=None if steam_basis else site.fuel_price_per_gj,
        water_and_treatment_cost_per_tonne=site.water_and_treatment_cost_per_tonne,
        boiler_efficiency=site.boiler_efficiency,
        makeup_water_temperature_c=site.makeup_water_temperature_c,
        co2_kg_per_gj_fuel=site.co2_kg_per_gj_fuel,
    )


def discharge_coefficient_of(site: Site) -> Spread:
    return Spread(
        site.discharge_coefficient, site.discharge_coefficient_low, site.discharge_coefficient_high
    )


def loss_factor_at(site: Site, condition: TrapCondition, override: float | None) -> Spread:
    """The site's loss factor for the condition, widened to hold a technician's override."""
    site_factor = (
        Spread(*site.loss_factors[condition.value]) if wastes_live_steam(condition) else None
    )
    return loss_factor_for(condition, override, site_factor)


def trap_service_of(
    site: Site,
    *,
    inlet_pressure_kpa_g: float,
    return_pressure_kpa_g: float,
    orifice_diameter_mm: float,
    condensate_destination: CondensateDestination,
    condensate_load_kg_h: float | None,
    hours_per_year: float | None,
    condition: TrapCondition,
    loss_factor_override: float | None,
) -> TrapService:
    """What the loss calculation needs of one trap as found, at this site."""
    atmosphere = site.atmospheric_pressure_kpa
    return TrapService(
        inlet_pressure_kpa_abs=absolute_from_gauge(inlet_pressure_kpa_g, atmosphere),
        return_pressure_kpa_abs=absolute_from_gauge(return_pressure_kpa_g, atmosphere),
        orifice_diameter_mm=orifice_diameter_mm,
        condition=condition,
        hours_per_year=site.hours_per_year if hours_per_year is None else hours_per_year,
        condensate_load_kg_h=condensate_load_kg_h or 0.0,
        destination=condensate_destination,
        discharge_coefficient=discharge_coefficient_of(site),
        loss_factor=loss_factor_at(site, condition, loss_factor_override),
    )
