"""From a stored site, trap and finding to the calculation core's inputs.

The same conversion `POST /api/v1/calc/trap-loss` makes from its request, so that a
trap in a summary and the same trap priced by hand give the same figures.
"""

import dataclasses
from dataclasses import dataclass, field
from typing import Any, Protocol

from service.physics import steam_tables
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
from service.store.vocabulary import DISCHARGE_SUBCOOLING_K, CostBasis, TrapType

LOWEST_CONDENSATE_TEMPERATURE_C = 0.01  # the triple point: a colder reading is a frozen line


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
    @property
    def trap_type(self) -> TrapType | None: ...
    @property
    def steam_temperature_c(self) -> float | None: ...


def condensate_temperature_c(
    trap_type: TrapType | None, inlet_pressure_kpa_abs: float, upstream_temperature_c: float | None
) -> float | None:
    """The temperature [degC] condensate leaves the trap at; None where saturated.

    A temperature measured before the trap is the best evidence (a reading at or above
    saturation means saturated condensate); else a thermostatic trap's usual
    subcooling below saturation (common practice), else saturation.

    >>> round(condensate_temperature_c(TrapType.THERMOSTATIC_BIMETALLIC, 1101.325, None), 2)
    154.12
    >>> condensate_temperature_c(TrapType.THERMODYNAMIC, 1101.325, 190.0) is None
    True
    """
    saturation_c = steam_tables.saturation_at_pressure(inlet_pressure_kpa_abs).temperature_c
    if upstream_temperature_c is not None:
        if upstream_temperature_c >= saturation_c:
            return None
        return max(upstream_temperature_c, LOWEST_CONDENSATE_TEMPERATURE_C)
    subcooling_k = None if trap_type is None else DISCHARGE_SUBCOOLING_K.get(trap_type)
    return None if subcooling_k is None else saturation_c - subcooling_k


# The prices and factors a site and a trap-loss request both carry under these names.
ECONOMICS_SETTINGS = tuple(
    field.name
    for field in dataclasses.fields(Economics)
    if field.name not in {"steam_cost_per_tonne", "fuel_price_per_gj"}
)


def economics_from(
    settings: object, *, steam_cost_per_tonne: float | None, fuel_price_per_gj: float | None
) -> Economics:
    """The core's economics from anything that carries its settings by name (a stored
    site, a trap-loss request), with the one cost basis given."""
    named: dict[str, Any] = {name: getattr(settings, name) for name in ECONOMICS_SETTINGS}
    return Economics(
        steam_cost_per_tonne=steam_cost_per_tonne, fuel_price_per_gj=fuel_price_per_gj, **named
    )


def economics_of(site: Site) -> Economics:
    """The site's prices, on the cost basis it chose."""
    steam_basis = site.cost_basis is CostBasis.STEAM_COST
    return economics_from(
        site,
        steam_cost_per_tonne=site.steam_cost_per_tonne if steam_basis else None,
        fuel_price_per_gj=None if steam_basis else site.fuel_price_per_gj,
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
        upstream_temperature_c: float | None = None,
    ) -> TrapService:
        """What the loss calculation needs of one trap as found, at this site."""
        atmosphere = self.atmospheric_pressure_kpa
        hours = trap.hours_per_year
        inlet_pressure_kpa_abs = absolute_from_gauge(trap.inlet_pressure_kpa_g, atmosphere)
        return TrapService(
            inlet_pressure_kpa_abs=inlet_pressure_kpa_abs,
            return_pressure_kpa_abs=absolute_from_gauge(trap.return_pressure_kpa_g, atmosphere),
            orifice_diameter_mm=trap.orifice_diameter_mm,
            condition=condition,
            hours_per_year=self.hours_per_year if hours is None else hours,
            condensate_load_kg_h=trap.condensate_load_kg_h or 0.0,
            destination=trap.condensate_destination,
            discharge_coefficient=self.discharge_coefficient,
            loss_factor=self.loss_factor(condition, loss_factor_override),
            steam_temperature_c=trap.steam_temperature_c,
            condensate_temperature_c=condensate_temperature_c(
                trap.trap_type, inlet_pressure_kpa_abs, upstream_temperature_c
            ),
        )
