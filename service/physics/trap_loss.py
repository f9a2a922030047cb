"""One trap's losses, in the two kinds a manager signs apart.

Failure loss (a repair removes it): live steam = orifice capacity (Napier, corrected by
the IF97 nozzle where Napier alone does not hold, at Cd) times the loss factor of the
trap's condition; a working trap passes none. Its low and high ends come from the ends
of the Cd range and of the loss factor's range. Live steam into a closed return is
priced on the heat the return does not bring back (`annual.ClosedReturnPricing`).

Installation loss (a project removes it, not a repair), from the condensate load the
trap drains, if known, whatever its condition as long as it discharges:

- closed return: flash and condensate are recovered, nothing is lost;
- vented receiver: the flash fraction boils off to atmosphere and is lost;
- drain: all of it is lost, water, heat, treatment, and any sewer charge.

Condensate leaves at the inlet pressure, saturated unless a temperature below
saturation is given (thermostatic traps hold it back until it cools); its flash is the
mixing rule solved for x at the return pressure.

Sources: Napier (1866) and API 520 Part I (2014) 5.7 for the orifice; IAPWS R7-97(2012)
for every property; US DOE Steam Tip Sheet "Flash High-Pressure Condensate to
Regenerate Low-Pressure Steam" for the flash balance.
"""

from dataclasses import dataclass
from enum import StrEnum

from service.physics import steam_tables
from service.physics.annual import (
    ClosedReturnPricing,
    Economics,
    YearlyLoss,
    no_yearly_loss,
    yearly_loss,
)
from service.physics.conditions import (
    DEFAULT_LOSS_FACTORS,
    RISK_NOTES,
    TrapCondition,
    discharges_condensate,
    wastes_live_steam,
)
from service.physics.flash import Flash, flash_of_condensate
from service.physics.orifice import FlowMethod, FlowRegime, live_steam, steam_discharge
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA
from service.physics.spread import Spread

# Cd of a trap orifice. 0.7 lies between the sharp-edged orifice's 0.6 (one published
# engineering paper's basis, W = 24.24 p D^2) and the 0.73 the US DOE Steam Tip Sheet
# "Inspect and Repair Steam Traps" table implies; the range spans both. Common practice.
DEFAULT_DISCHARGE_COEFFICIENT = Spread(0.70, 0.60, 0.80)


class CondensateDestination(StrEnum):
    CLOSED_RETURN = "closed_return"
    VENTED_RECEIVER = "vented_receiver"
    DRAIN = "drain"


# A vented receiver is open to atmosphere: its vent's back pressure is a few kPa at most
# (common practice). A higher gauge pressure describes a closed, pressurised return.
VENTED_RECEIVER_MAX_KPA_G = 5.0


# Two pressures closer than this are the same pressure: a thousandth of a pascal, far below
# any gauge, and far above the rounding of adding the atmosphere to a gauge reading (a
# difference of 1e-16 kPa(g) vanishes in 101.325 kPa abs).
PRESSURE_RESOLUTION_KPA = 1e-6


def require_return_below_inlet(return_pressure_kpa_g: float, inlet_pressure_kpa_g: float) -> None:
    """Raise ValueError unless condensate can leave: the return below the inlet [kPa(g)]
    by more than the pressure resolution.

    >>> require_return_below_inlet(300.0, 200.0)
    Traceback (most recent call last):
    ...
    ValueError: the return pressure (300 kPa(g)) must be below the inlet pressure ...
    """
    if return_pressure_kpa_g > inlet_pressure_kpa_g - PRESSURE_RESOLUTION_KPA:
        raise ValueError(
            f"the return pressure ({return_pressure_kpa_g:g} kPa(g)) must be below the inlet "
            f"pressure ({inlet_pressure_kpa_g:g} kPa(g)) for the trap to discharge"
        )


def require_loss_factor_applies(condition: TrapCondition) -> None:
    """Raise ValueError unless the condition wastes live steam, so a loss factor means something."""
    if not wastes_live_steam(condition):
        raise ValueError(
            f"a loss factor applies only to a trap that wastes live steam, not to '{condition}'"
        )


def require_destination_fits_return(
    destination: CondensateDestination, return_pressure_kpa_g: float
) -> None:
    """Raise ValueError where a vented receiver is given a pressure above atmosphere.

    >>> require_destination_fits_return(CondensateDestination.VENTED_RECEIVER, 60.0)
    Traceback (most recent call last):
    ...
    ValueError: a vented receiver is open to atmosphere (0 kPa(g)); 60 kPa(g) is a closed return
    """
    if (
        destination is CondensateDestination.VENTED_RECEIVER
        and return_pressure_kpa_g > VENTED_RECEIVER_MAX_KPA_G
    ):
        raise ValueError(
            f"a vented receiver is open to atmosphere (0 kPa(g)); "
            f"{return_pressure_kpa_g:g} kPa(g) is a closed return"
        )


@dataclass(frozen=True, slots=True)
class TrapService:
    """What a trap does and where, as the loss calculation needs it."""

    inlet_pressure_kpa_abs: float
    return_pressure_kpa_abs: float
    orifice_diameter_mm: float
    condition: TrapCondition
    hours_per_year: float
    condensate_load_kg_h: float = 0.0
    destination: CondensateDestination = CondensateDestination.CLOSED_RETURN
    discharge_coefficient: Spread = DEFAULT_DISCHARGE_COEFFICIENT
    loss_factor: Spread | None = None  # None: the condition's default
    steam_temperature_c: float | None = None  # a superheated line's; None: saturated
    condensate_temperature_c: float | None = None  # below saturation; None: saturated


@dataclass(frozen=True, slots=True)
class CondensateLoss:
    """What a trap's condensate loses where it goes: flash vented, or all of it drained."""

    flash_fraction: float
    flash_vented_kg_h: float
    flash_vented: YearlyLoss
    condensate_to_drain_kg_h: float
    condensate_to_drain: YearlyLoss

    @property
    def total(self) -> YearlyLoss:
        """Flash vented and condensate drained together."""
        return self.flash_vented + self.condensate_to_drain


@dataclass(frozen=True, slots=True)
class TrapLoss:
    """What one trap wastes in a year, each live-steam figure with its range."""

    condition: TrapCondition
    flow_regime: FlowRegime | None  # None where condensate cannot flow (p2 >= p1)
    method: FlowMethod | None
    orifice_capacity_kg_h: float  # dry steam at the typical Cd, as if fully open
    loss_factor: Spread
    steam_loss_kg_h: Spread
    live_steam: YearlyLoss
    live_steam_low: YearlyLoss
    live_steam_high: YearlyLoss
    condensate: CondensateLoss
    risk: str | None  # why a plugged or flooded trap matters, else None
    total: YearlyLoss  # failure and installation losses together: never shown alone
    total_low: YearlyLoss
    total_high: YearlyLoss

    @property
    def failure(self) -> YearlyLoss:
        """The loss a repair of the trap removes: its live steam."""
        return self.live_steam

    @property
    def installation(self) -> YearlyLoss:
        """The loss that follows from where the trap discharges: flash vented, drained."""
        return self.condensate.total


def loss_factor_for(
    condition: TrapCondition, override: float | None = None, site_factor: Spread | None = None
) -> Spread:
    """The condition's loss factor (the site's, else the default), widened to an override.

    >>> loss_factor_for(TrapCondition.LEAKING)
    Spread(typical=0.25, low=0.1, high=0.4)
    >>> loss_factor_for(TrapCondition.LEAKING, 0.5)
    Spread(typical=0.5, low=0.1, high=0.5)
    """
    base = site_factor or DEFAULT_LOSS_FACTORS[condition]
    if override is None:
        return base
    require_loss_factor_applies(condition)
    if not 0.0 <= override <= 1.0:
        raise ValueError(f"loss factor {override:g} must lie from 0 to 1")
    return base.widened_to(override)


def trap_loss(service: TrapService, economics: Economics) -> TrapLoss:
    """A year of one trap's losses in steam, heat, fuel, money and CO2.

    Pressures in kPa abs; the return must be below the inlet wherever the trap
    discharges (every condition but plugged and out of service).

    >>> vented = CondensateDestination.VENTED_RECEIVER
    >>> loss = trap_loss(TrapService(1101.325, 101.325, 3.0, TrapCondition.BLOW_THROUGH, 8000,
    ...     destination=vented), Economics(steam_cost_per_tonne=30.0))
    >>> round(loss.steam_loss_kg_h.typical, 1), loss.method.value, round(loss.live_steam.cost)
    (28.6, 'napier', 6859)
    """
    condition = service.condition
    loss_factor = service.loss_factor or DEFAULT_LOSS_FACTORS[condition]
    inlet = steam_tables.saturation_at_pressure(service.inlet_pressure_kpa_abs)
    outlet = steam_tables.saturation_at_pressure(service.return_pressure_kpa_abs)
    can_flow = service.return_pressure_kpa_abs < service.inlet_pressure_kpa_abs
    if discharges_condensate(condition) and not can_flow:
        raise ValueError(
            "the return pressure must be below the inlet pressure for the trap to discharge"
        )
    regime: FlowRegime | None = None
    method: FlowMethod | None = None
    capacity = Spread.exact(0.0)
    if can_flow:
        # Flow is proportional to Cd, so one evaluation at Cd = 1 serves the whole range.
        fully_open = steam_discharge(
            service.orifice_diameter_mm,
            service.inlet_pressure_kpa_abs,
            service.return_pressure_kpa_abs,
            discharge_coefficient=1.0,
            steam_temperature_c=service.steam_temperature_c,
        )
        regime, method = fully_open.regime, fully_open.method
        capacity = Spread.exact(fully_open.flow_kg_h).scaled(service.discharge_coefficient)
    steam_loss = capacity.scaled(loss_factor)

    steam_enthalpy = live_steam_enthalpy_kj_kg(service)
    returned = (
        service.destination is CondensateDestination.CLOSED_RETURN
        and economics.closed_return_pricing is ClosedReturnPricing.HEAT_NOT_RECOVERED
    )
    # Every yearly figure is proportional to the mass lost: price one kg/h, then scale.
    per_kg_h = yearly_loss(
        mass_kg_h=1.0,
        lost_enthalpy_kj_kg=steam_enthalpy,
        steam_enthalpy_kj_kg=inlet.hg_kj_kg,
        hours_per_year=service.hours_per_year,
        economics=economics,
        replaced_from_kj_kg=outlet.hf_kj_kg if returned else None,
    )
    live_steam = per_kg_h.scaled(steam_loss.typical)
    live_steam_low = per_kg_h.scaled(steam_loss.low)
    live_steam_high = per_kg_h.scaled(steam_loss.high)
    condensate = condensate_loss(service, economics)
    return TrapLoss(
        condition=condition,
        flow_regime=regime,
        method=method,
        orifice_capacity_kg_h=capacity.typical,
        loss_factor=loss_factor,
        steam_loss_kg_h=steam_loss,
        live_steam=live_steam,
        live_steam_low=live_steam_low,
        live_steam_high=live_steam_high,
        condensate=condensate,
        risk=RISK_NOTES.get(condition),
        total=live_steam + condensate.total,
        total_low=live_steam_low + condensate.total,
        total_high=live_steam_high + condensate.total,
    )


def drain_charges(drained_t: float, flash: Flash, economics: Economics) -> float:
    """Money only, on top of the water and heat: the sewer charge on the liquid that
    reaches the sewer, and the make-up water that cools a hot drain to the site's limit.

    The flash leaves by the drain's vent; the liquid, (1 - x) of the load at hf(p_return),
    is cooled by mixing with make-up water at h_mw to h_limit: m_cool = m (h_hot -
    h_limit) / (h_limit - h_mw), an energy balance. Cooling water is priced at the
    water-and-treatment cost plus the sewer charge (it is bought, then discharged).

    >>> flash = flash_of_condensate(1101.325, 101.325)
    >>> round(drain_charges(100.0, flash, Economics(sewer_cost_per_tonne=2.0)), 2)
    167.88
    """
    liquid_t = drained_t * (1.0 - flash.flash_fraction)
    charges = liquid_t * economics.sewer_cost_per_tonne
    limit_c = economics.drain_temperature_limit_c
    if limit_c is None or limit_c >= flash.return_saturation_temperature_c:
        return charges
    limit = steam_tables.properties_at_pressure_temperature(STANDARD_ATMOSPHERE_KPA, limit_c)
    makeup = economics.makeup_water_enthalpy_kj_kg
    if limit.enthalpy_kj_kg <= makeup:
        raise ValueError(
            f"a drain cannot be cooled to {limit_c:g} °C with make-up water at "
            f"{economics.makeup_water_temperature_c:g} °C"
        )
    cooling_t = (
        liquid_t * (flash.return_hf_kj_kg - limit.enthalpy_kj_kg) / (limit.enthalpy_kj_kg - makeup)
    )
    water_cost = economics.water_and_treatment_cost_per_tonne + economics.sewer_cost_per_tonne
    return charges + cooling_t * water_cost


def live_steam_enthalpy_kj_kg(service: TrapService) -> float:
    """Enthalpy [kJ/kg] of the live steam at the trap: hg(p1), or h(p1, T) superheated.

    >>> round(live_steam_enthalpy_kj_kg(TrapService(1000.0, 101.325, 3.0,
    ...     TrapCondition.LEAKING, 8760, steam_temperature_c=250.0)), 1)
    2943.2
    """
    return live_steam(service.inlet_pressure_kpa_abs, service.steam_temperature_c)[0]


def condensate_loss(service: TrapService, economics: Economics) -> CondensateLoss:
    """A year of what the trap's condensate load loses at its destination.

    Flash vented carries hg at the return pressure; condensate drained carries its
    inlet enthalpy and the site's sewer charge; both are replaced by makeup water.
    Nothing is lost to a closed return, or where the trap passes no condensate or its
    load is unknown (zero).
    """
    nothing = no_yearly_loss(economics)
    discharging = (
        discharges_condensate(service.condition)
        and service.condensate_load_kg_h > 0.0
        and service.return_pressure_kpa_abs < service.inlet_pressure_kpa_abs
    )
    if not discharging:
        return CondensateLoss(0.0, 0.0, nothing, 0.0, nothing)
    flash = flash_of_condensate(
        service.inlet_pressure_kpa_abs,
        service.return_pressure_kpa_abs,
        service.condensate_temperature_c,
    )
    steam_enthalpy = steam_tables.saturation_at_pressure(service.inlet_pressure_kpa_abs).hg_kj_kg

    def lost(mass_kg_h: float, enthalpy_kj_kg: float) -> YearlyLoss:
        return yearly_loss(
            mass_kg_h=mass_kg_h,
            lost_enthalpy_kj_kg=enthalpy_kj_kg,
            steam_enthalpy_kj_kg=steam_enthalpy,
            hours_per_year=service.hours_per_year,
            economics=economics,
        )

    if service.destination is CondensateDestination.VENTED_RECEIVER:
        flash_kg_h = service.condensate_load_kg_h * flash.flash_fraction
        return CondensateLoss(
            flash.flash_fraction, flash_kg_h, lost(flash_kg_h, flash.return_hg_kj_kg), 0.0, nothing
        )
    if service.destination is CondensateDestination.DRAIN:
        drain_kg_h = service.condensate_load_kg_h
        drained = lost(drain_kg_h, flash.inlet_enthalpy_kj_kg)
        return CondensateLoss(
            flash.flash_fraction,
            0.0,
            nothing,
            drain_kg_h,
            drained.plus_cost(drain_charges(drained.mass_t, flash, economics)),
        )
    return CondensateLoss(flash.flash_fraction, 0.0, nothing, 0.0, nothing)
