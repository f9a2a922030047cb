"""The calculation requests the calculation API and the calculator page share: one
trap's loss and a flash vessel's recovery, with their rules and their answers.

Input limits are the store's (`service.store.schemas`), so a stored site can always be
priced here and the reverse."""

from typing import Any, Self

from pydantic import BaseModel, Field, ValidationInfo, field_validator, model_validator

from service.physics.annual import (
    DEFAULT_BOILER_EFFICIENCY,
    DEFAULT_CO2_KG_PER_GJ_FUEL,
    DEFAULT_MAKEUP_WATER_TEMPERATURE_C,
    DEFAULT_NET_TO_GROSS_RATIO,
    ClosedReturnPricing,
    Economics,
    HeatingValue,
)
from service.physics.conditions import (
    DEFAULT_LOSS_FACTORS,
    TrapCondition,
    discharges_condensate,
)
from service.physics.flash import flash_recovery
from service.physics.orifice import live_steam
from service.physics.spread import Spread
from service.physics.trap_loss import (
    DEFAULT_DISCHARGE_COEFFICIENT,
    PRESSURE_RESOLUTION_KPA,
    CondensateDestination,
    TrapService,
    loss_factor_for,
    require_loss_factor_applies,
    require_return_below_inlet,
)
from service.reports.opportunities import FLASH_RECOVERY_CAUTION
from service.reports.pricing import SitePricing, condensate_temperature_c, economics_from
from service.store.schemas import (
    Co2Factor,
    CondensateLoad,
    DischargeCoefficient,
    DrainTemperatureLimit,
    Efficiency,
    Fraction,
    GaugePressure,
    HoursPerYear,
    MakeupTemperature,
    Money,
    NetToGrossRatio,
    OrificeDiameter,
    SteamTemperature,
    SurfaceTemperature,
)
from service.store.vocabulary import TrapType
from service.web.errors import reported_against
from service.web.inputs import SiteInput


def return_below_inlet(value: float, info: ValidationInfo) -> float:
    """Where condensate leaves (every condition but plugged and out of service)."""
    inlet = info.data.get("inlet_pressure_kpa_g")
    condition = info.data.get("condition", TrapCondition.WORKING)
    if inlet is not None and discharges_condensate(condition):
        require_return_below_inlet(value, inlet)
    return value


class TrapLossIn(SiteInput):
    """One trap as found, and the plant's prices. Defaults are documented in the README."""

    condition: TrapCondition
    inlet_pressure_kpa_g: GaugePressure
    return_pressure_kpa_g: GaugePressure
    steam_temperature_c: SteamTemperature | None = Field(
        default=None, description="A superheated line's steam temperature [°C]; absent: saturated"
    )
    inlet_temperature_c: SurfaceTemperature | None = Field(
        default=None,
        description="Measured before the trap [°C]: condensate below saturation flashes less",
    )
    trap_type: TrapType | None = Field(
        default=None, description="With no inlet temperature, a thermostatic type's subcooling"
    )
    orifice_diameter_mm: OrificeDiameter
    hours_per_year: HoursPerYear
    discharge_coefficient: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.typical
    discharge_coefficient_low: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.low
    discharge_coefficient_high: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.high
    loss_factor: Fraction | None = None
    loss_factor_low: Fraction | None = None
    loss_factor_high: Fraction | None = None
    condensate_load_kg_h: CondensateLoad = 0.0
    condensate_destination: CondensateDestination = CondensateDestination.CLOSED_RETURN
    steam_cost_per_tonne: Money | None = None
    fuel_price_per_gj: Money | None = None
    water_and_treatment_cost_per_tonne: Money = 0.0
    sewer_cost_per_tonne: Money = 0.0
    drain_temperature_limit_c: DrainTemperatureLimit | None = None
    boiler_efficiency: Efficiency = DEFAULT_BOILER_EFFICIENCY
    makeup_water_temperature_c: MakeupTemperature = DEFAULT_MAKEUP_WATER_TEMPERATURE_C
    co2_kg_per_gj_fuel: Co2Factor = DEFAULT_CO2_KG_PER_GJ_FUEL
    fuel_heating_value: HeatingValue = HeatingValue.LHV
    co2_factor_heating_value: HeatingValue = HeatingValue.LHV
    net_to_gross_ratio: NetToGrossRatio = DEFAULT_NET_TO_GROSS_RATIO
    closed_return_pricing: ClosedReturnPricing = ClosedReturnPricing.HEAT_NOT_RECOVERED

    _return_below_inlet = field_validator("return_pressure_kpa_g")(return_below_inlet)

    @field_validator("loss_factor", "loss_factor_low", "loss_factor_high")
    @classmethod
    def _loss_factor_fits_condition(cls, value: float | None, info: ValidationInfo) -> Any:
        condition = info.data.get("condition")
        if value is not None and condition is not None:
            require_loss_factor_applies(condition)
        return value

    @field_validator("fuel_price_per_gj")
    @classmethod
    def _one_cost_basis(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("steam_cost_per_tonne") is not None:
            raise ValueError("give either steam_cost_per_tonne or fuel_price_per_gj, not both")
        return value

    @model_validator(mode="after")
    def _ranges_hold_their_typical_values(self) -> Self:
        with reported_against("body", "discharge_coefficient", typed=self.discharge_coefficient):
            self.discharge_coefficient_spread()
        with reported_against("body", "loss_factor", typed=self.loss_factor):
            self.loss_factor_spread()
        with reported_against("body", "steam_temperature_c", typed=self.steam_temperature_c):
            self.trap_service()
        return self

    def loss_factor_spread(self) -> Spread:
        """Without ends: the condition's default range, widened to a given typical value.
        With ends: the range they give, which must hold the typical value."""
        if self.loss_factor_low is None and self.loss_factor_high is None:
            return loss_factor_for(self.condition, self.loss_factor)
        default = DEFAULT_LOSS_FACTORS[self.condition]
        return Spread(
            default.typical if self.loss_factor is None else self.loss_factor,
            default.low if self.loss_factor_low is None else self.loss_factor_low,
            default.high if self.loss_factor_high is None else self.loss_factor_high,
        )

    def discharge_coefficient_spread(self) -> Spread:
        return Spread(
            self.discharge_coefficient,
            self.discharge_coefficient_low,
            self.discharge_coefficient_high,
        )

    def trap_service(self) -> TrapService:
        """The core's inputs, built by the one builder a stored trap goes through too
        (`SitePricing.trap_service`), with this request as the site and the trap."""
        if self.steam_temperature_c is not None:
            live_steam(self.absolute(self.inlet_pressure_kpa_g), self.steam_temperature_c)
        pricing = SitePricing(
            atmospheric_pressure_kpa=self.atmospheric_pressure_kpa,
            hours_per_year=self.hours_per_year,
            economics=self.economics(),
            discharge_coefficient=self.discharge_coefficient_spread(),
            loss_factors={self.condition: self.loss_factor_spread()},
        )
        return pricing.trap_service(
            self,
            condition=self.condition,
            loss_factor_override=None,
            upstream_temperature_c=self.inlet_temperature_c,
        )

    def economics(self) -> Economics:
        return economics_from(
            self,
            steam_cost_per_tonne=self.steam_cost_per_tonne,
            fuel_price_per_gj=self.fuel_price_per_gj,
        )


class FlashRecoveryIn(SiteInput):
    """A group of traps' condensate flashed in a vessel, and what its steam is worth.

    Price the steam's heat either directly (`steam_energy_price_per_gj`, per GJ of steam
    heat above make-up) or on the fuel basis (`fuel_price_per_gj` and
    `boiler_efficiency`); with neither, no value is given."""

    condensate_load_kg_h: CondensateLoad
    inlet_pressure_kpa_g: GaugePressure
    vessel_pressure_kpa_g: GaugePressure
    hours_per_year: HoursPerYear
    makeup_water_temperature_c: MakeupTemperature = DEFAULT_MAKEUP_WATER_TEMPERATURE_C
    inlet_temperature_c: SurfaceTemperature | None = Field(
        default=None, description="Condensate before the traps [°C]; absent: saturated"
    )
    steam_energy_price_per_gj: Money | None = None
    fuel_price_per_gj: Money | None = None
    boiler_efficiency: Efficiency = DEFAULT_BOILER_EFFICIENCY
    co2_kg_per_gj_fuel: Co2Factor = DEFAULT_CO2_KG_PER_GJ_FUEL

    @field_validator("vessel_pressure_kpa_g")
    @classmethod
    def _vessel_below_inlet(cls, value: float, info: ValidationInfo) -> float:
        inlet = info.data.get("inlet_pressure_kpa_g")
        if inlet is not None and value > inlet - PRESSURE_RESOLUTION_KPA:
            raise ValueError(
                f"the vessel pressure ({value:g} kPa(g)) must be below the traps' inlet "
                f"pressure ({inlet:g} kPa(g)) for condensate to flash"
            )
        return value

    @field_validator("fuel_price_per_gj")
    @classmethod
    def _one_price(cls, value: float | None, info: ValidationInfo) -> float | None:
        if value is not None and info.data.get("steam_energy_price_per_gj") is not None:
            raise ValueError("give either steam_energy_price_per_gj or fuel_price_per_gj, not both")
        return value

    def answer(self) -> "FlashRecoveryOut":
        """The recovery and its value, as the API and the calculator page give it."""
        inlet_pressure_kpa_abs = self.absolute(self.inlet_pressure_kpa_g)
        economics = Economics(
            boiler_efficiency=self.boiler_efficiency,
            makeup_water_temperature_c=self.makeup_water_temperature_c,
            co2_kg_per_gj_fuel=self.co2_kg_per_gj_fuel,
        )
        recovery = flash_recovery(
            condensate_load_kg_h=self.condensate_load_kg_h,
            inlet_pressure_kpa_abs=inlet_pressure_kpa_abs,
            vessel_pressure_kpa_abs=self.absolute(self.vessel_pressure_kpa_g),
            hours_per_year=self.hours_per_year,
            makeup_water_enthalpy_kj_kg=economics.makeup_water_enthalpy_kj_kg,
            condensate_temperature_c=condensate_temperature_c(
                None, inlet_pressure_kpa_abs, self.inlet_temperature_c
            ),
        )
        fuel_gj = recovery.annual_energy_gj / self.boiler_efficiency
        value = None
        if self.steam_energy_price_per_gj is not None:
            value = recovery.annual_energy_gj * self.steam_energy_price_per_gj
        elif self.fuel_price_per_gj is not None:
            value = fuel_gj * self.fuel_price_per_gj
        return FlashRecoveryOut(
            flash_fraction=recovery.flash_fraction,
            recovered_steam_kg_h=recovery.recovered_steam_kg_h,
            annual_recovered_steam_t=recovery.annual_recovered_steam_t,
            annual_energy_gj=recovery.annual_energy_gj,
            annual_fuel_gj=fuel_gj,
            annual_value=value,
            annual_co2_t=fuel_gj * self.co2_kg_per_gj_fuel / 1000.0,
            caution=FLASH_RECOVERY_CAUTION,
        )


class FlashRecoveryOut(BaseModel):
    flash_fraction: float = Field(description="kg of flash steam per kg of condensate")
    recovered_steam_kg_h: float
    annual_recovered_steam_t: float
    annual_energy_gj: float = Field(description="Heat of the live steam it displaces")
    annual_fuel_gj: float = Field(description="Fuel the boiler no longer burns for it")
    annual_value: float | None
    annual_co2_t: float = Field(description="CO2 of that fuel")
    caution: str
