"""From a stored site, trap and finding to the calculation core's inputs.

The same conversion `POST /api/v1/calc/trap-loss` makes from its request, so that a
trap in a summary and the same trap priced by hand give the same figures.
"""

from dataclasses import dataclass, field
from typing import Protocol

from service.physics.annual import Economics
from service.physics.conditions import TrapCondition, wastes_live_steam
from service.physics.pressure import absolute_from_gauge
from service.physics.spread import Spread
from service.physics.trap_loss import (
    CondensateDestination,
    TrapLoss,
    TrapService,
    loss_factor_for,
    trap_loss,
)
from service.store.models import Site
from service.store.vocabulary import CostBasis


class Installation(Protocol):
    """How a trap is installed, as a stored trap or a summary's row of it both say."""

    @property
    def inlet_pressure_kpa_g(self) -> float: ...
    @property
    def return_pressure_kpa_g(self) -> float: ...
    @property
    def orifice_diameter_mm(self) -> float: ...
    @property
    def condensate_destination(self) -> CondensateDestination: ...
    @property
    def condensate_load_kg_h(self) -> float | None: ...
    @property
    def hours_per_year(self) -> float | None: ...


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


@dataclass(frozen=True, slots=True)
class SitePricing:
    """A site's settings, read once, as the calculation core takes them; and the losses
    it has priced, so that traps alike in every input (same pressures, orifice, load,
    hours and condition: common along one header, and from one survey to the next)
    are priced once however many summaries share it."""

    atmospheric_pressure_kpa: float
    hours_per_year: float
    economics: Economics
    discharge_coefficient: Spread
    loss_factors: dict[TrapCondition, Spread]
    priced: dict[TrapService, TrapLoss] = field(default_factory=dict)

    def loss(self, service: TrapService) -> TrapLoss:
        """The trap's yearly loss at this site."""
        loss = self.priced.get(service)
        if loss is None:
            loss = self.priced[service] = trap_loss(service, self.economics)
        return loss

    @classmethod
    def of(cls, site: Site) -> "SitePricing":
        return cls(
            atmospheric_pressure_kpa=site.atmospheric_pressure_kpa,
            hours_per_year=site.hours_per_year,
            economics=economics_of(site),
            discharge_coefficient=Spread(
                site.discharge_coefficient,
                site.discharge_coefficient_low,
                site.discharge_coefficient_high,
            ),
            loss_factors={
                condition: loss_factor_for(
                    condition,
                    site_factor=Spread(*site.loss_factors[condition.value])
                    if wastes_live_steam(condition)
                    else None,
                )
                for condition in TrapCondition
            },
        )

    def loss_factor(self, condition: TrapCondition, override: float | None) -> Spread:
        """The site's loss factor for the condition, widened to hold an override."""
        if override is None:
            return self.loss_factors[condition]
        return loss_factor_for(condition, override, self.loss_factors[condition])

    def trap_service(
        self,
        trap: "Installation",
        *,
        condition: TrapCondition,
        loss_factor_override: float | None,
    ) -> TrapService:
        """What the loss calculation needs of one trap as found, at this site."""
        atmosphere = self.atmospheric_pressure_kpa
        hours = trap.hours_per_year
        return TrapService(
            inlet_pressure_kpa_abs=absolute_from_gauge(trap.inlet_pressure_kpa_g, atmosphere),
            return_pressure_kpa_abs=absolute_from_gauge(trap.return_pressure_kpa_g, atmosphere),
            orifice_diameter_mm=trap.orifice_diameter_mm,
            condition=condition,
            hours_per_year=self.hours_per_year if hours is None else hours,
            condensate_load_kg_h=trap.condensate_load_kg_h or 0.0,
            destination=trap.condensate_destination,
            discharge_coefficient=self.discharge_coefficient,
            loss_factor=self.loss_factor(condition, loss_factor_override),
        )
