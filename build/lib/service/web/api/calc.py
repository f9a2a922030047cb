"""Calculations: the flash of condensate, flash recovery, and one trap's yearly losses.

Input limits are the store's (`service.store.schemas`), so a stored site can always be
priced here and the reverse."""

from typing import Annotated, Any, Self

from fastapi import APIRouter, Depends
from pydantic import BaseModel, ConfigDict, Field, ValidationInfo, field_validator, model_validator

from service.accounts.roles import Permission
from service.physics.annual import (
    DEFAULT_BOILER_EFFICIENCY,
    DEFAULT_CO2_KG_PER_GJ_FUEL,
    DEFAULT_MAKEUP_WATER_TEMPERATURE_C,
    DEFAULT_NET_TO_GROSS_RATIO,
    ClosedReturnPricing,
    Economics,
    HeatingValue,
    YearlyLoss,
)
from service.physics.conditions import (
    DEFAULT_LOSS_FACTORS,
    FindingCategory,
    TrapCondition,
    category_of,
    discharges_condensate,
)
from service.physics.flash import flash_of_condensate, flash_recovery
from service.physics.orifice import FlowMethod, FlowRegime, live_steam
from service.physics.spread import Spread
from service.physics.trap_loss import (
    DEFAULT_DISCHARGE_COEFFICIENT,
    CondensateDestination,
    TrapLoss,
    TrapService,
    loss_factor_for,
    require_loss_factor_applies,
    require_return_below_inlet,
    trap_loss,
)
from service.reports.opportunities import FLASH_RECOVERY_CAUTION
from service.reports.pricing import condensate_temperature_c, economics_from
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
from service.web.access import require
from service.web.api.inputs import SiteInput
from service.web.errors import reported_against

router = APIRouter(
    prefix="/calc", tags=["calculations"], dependencies=[Depends(require(Permission.READ))]
)


def _return_below_inlet(value: float, info: ValidationInfo) -> float:
    """Where condensate leaves (every condition but plugged and out of service)."""
    inlet = info.data.get("inlet_pressure_kpa_g")
    condition = info.data.get("condition", TrapCondition.WORKING)
    if inlet is not None and discharges_condensate(condition):
        require_return_below_inlet(value, inlet)
    return value


class FlashIn(SiteInput):
    inlet_pressure_kpa_g: GaugePressure
    return_pressure_kpa_g: GaugePressure
    condensate_temperature_c: (
        Annotated[float, Field(description="Condensate at the trap [°C]; absent: saturated")] | None
    ) = None

    _return_below_inlet = field_validator("return_pressure_kpa_g")(_return_below_inlet)


class FlashOut(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    flash_fraction: float = Field(description="kg of flash steam per kg of condensate")
    inlet_enthalpy_kj_kg: float
    return_hf_kj_kg: float
    return_hfg_kj_kg: float
    return_hg_kj_kg: float
    inlet_saturation_temperature_c: float
    return_saturation_temperature_c: float


@router.post("/flash", summary="Flash fraction of condensate discharged to a lower pressure")
def flash(body: FlashIn) -> FlashOut:
    """x2 = (h1 - hf(p2)) / hfg(p2), zero where h1 <= hf(p2): the mixing rule with
    IAPWS R7-97(2012) properties."""
    with reported_against("body", "condensate_temperature_c", typed=body.condensate_temperature_c):
        result = flash_of_condensate(
            body.absolute(body.inlet_pressure_kpa_g),
            body.absolute(body.return_pressure_kpa_g),
            body.condensate_temperature_c,
        )
    return FlashOut.model_validate(result)


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

    _return_below_inlet = field_validator("return_pressure_kpa_g")(_return_below_inlet)

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
        inlet_pressure_kpa_abs = self.absolute(self.inlet_pressure_kpa_g)
        if self.steam_temperature_c is not None:
            live_steam(inlet_pressure_kpa_abs, self.steam_temperature_c)
        return TrapService(
            inlet_pressure_kpa_abs=inlet_pressure_kpa_abs,
            return_pressure_kpa_abs=self.absolute(self.return_pressure_kpa_g),
            orifice_diameter_mm=self.orifice_diameter_mm,
            condition=self.condition,
            hours_per_year=self.hours_per_year,
            condensate_load_kg_h=self.condensate_load_kg_h,
            destination=self.condensate_destination,
            discharge_coefficient=self.discharge_coefficient_spread(),
            loss_factor=self.loss_factor_spread(),
            steam_temperature_c=self.steam_temperature_c,
            condensate_temperature_c=condensate_temperature_c(
                self.trap_type, inlet_pressure_kpa_abs, self.inlet_temperature_c
            ),
        )

    def economics(self) -> Economics:
        return economics_from(
            self,
            steam_cost_per_tonne=self.steam_cost_per_tonne,
            fuel_price_per_gj=self.fuel_price_per_gj,
        )


class TrapLossOut(BaseModel):
    """A trap's losses. Unsuffixed figures are typical; `_low` and `_high` bound them.

    `annual_*` without a kind are its failure loss (live steam: what a repair removes);
    `annual_flash_*` and `annual_drain_*` its installation loss (where it discharges,
    whatever its condition); `annual_total_*` the two together, beside their parts."""

    condition: TrapCondition
    category: FindingCategory
    flow_regime: FlowRegime | None
    method: FlowMethod | None
    orifice_capacity_kg_h: float = Field(description="Dry steam at the typical Cd, fully open")
    loss_factor: float
    loss_factor_low: float
    loss_factor_high: float
    steam_loss_kg_h: float
    steam_loss_kg_h_low: float
    steam_loss_kg_h_high: float
    annual_steam_loss_t: float
    annual_steam_loss_t_low: float
    annual_steam_loss_t_high: float
    annual_energy_loss_gj: float
    annual_energy_loss_gj_low: float
    annual_energy_loss_gj_high: float
    annual_fuel_gj: float
    annual_fuel_gj_low: float
    annual_fuel_gj_high: float
    annual_cost: float | None
    annual_cost_low: float | None
    annual_cost_high: float | None
    annual_co2_t: float
    annual_co2_t_low: float
    annual_co2_t_high: float
    flash_fraction: float
    flash_vented_kg_h: float
    annual_flash_vented_t: float
    annual_flash_energy_gj: float
    annual_flash_cost: float | None
    annual_flash_co2_t: float
    condensate_to_drain_kg_h: float
    annual_condensate_to_drain_t: float
    annual_drain_energy_gj: float
    annual_drain_cost: float | None
    annual_drain_co2_t: float
    annual_total_energy_gj: float
    annual_total_cost: float | None
    annual_total_cost_low: float | None
    annual_total_cost_high: float | None
    annual_total_co2_t: float
    risk: str | None = Field(description="Why a plugged or flooded trap matters")

    @classmethod
    def from_loss(cls, loss: TrapLoss) -> "TrapLossOut":
        def ranged(name: str, pick: str) -> dict[str, Any]:
            def figure(year: YearlyLoss) -> Any:
                return getattr(year, pick)

            return {
                name: figure(loss.live_steam),
                f"{name}_low": figure(loss.live_steam_low),
                f"{name}_high": figure(loss.live_steam_high),
            }

        condensate = loss.condensate
        return cls(
            condition=loss.condition,
            category=category_of(loss.condition),
            flow_regime=loss.flow_regime,
            method=loss.method,
            orifice_capacity_kg_h=loss.orifice_capacity_kg_h,
            loss_factor=loss.loss_factor.typical,
            loss_factor_low=loss.loss_factor.low,
            loss_factor_high=loss.loss_factor.high,
            steam_loss_kg_h=loss.steam_loss_kg_h.typical,
            steam_loss_kg_h_low=loss.steam_loss_kg_h.low,
            steam_loss_kg_h_high=loss.steam_loss_kg_h.high,
            **ranged("annual_steam_loss_t", "mass_t"),
            **ranged("annual_energy_loss_gj", "energy_gj"),
            **ranged("annual_fuel_gj", "fuel_gj"),
            **ranged("annual_cost", "cost"),
            **ranged("annual_co2_t", "co2_t"),
            flash_fraction=condensate.flash_fraction,
            flash_vented_kg_h=condensate.flash_vented_kg_h,
            annual_flash_vented_t=condensate.flash_vented.mass_t,
            annual_flash_energy_gj=condensate.flash_vented.energy_gj,
            annual_flash_cost=condensate.flash_vented.cost,
            annual_flash_co2_t=condensate.flash_vented.co2_t,
            condensate_to_drain_kg_h=condensate.condensate_to_drain_kg_h,
            annual_condensate_to_drain_t=condensate.condensate_to_drain.mass_t,
            annual_drain_energy_gj=condensate.condensate_to_drain.energy_gj,
            annual_drain_cost=condensate.condensate_to_drain.cost,
            annual_drain_co2_t=condensate.condensate_to_drain.co2_t,
            annual_total_energy_gj=loss.total.energy_gj,
            annual_total_cost=loss.total.cost,
            annual_total_cost_low=loss.total_low.cost,
            annual_total_cost_high=loss.total_high.cost,
            annual_total_co2_t=loss.total.co2_t,
            risk=loss.risk,
        )


@router.post("/trap-loss", summary="One trap's yearly steam, energy, fuel, cost and CO2")
def trap_loss_endpoint(body: TrapLossIn) -> TrapLossOut:
    """Live steam by Napier or the isentropic nozzle, and the condensate's losses."""
    return TrapLossOut.from_loss(trap_loss(body.trap_service(), body.economics()))


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
        if inlet is not None and value >= inlet:
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


@router.post("/flash-recovery", summary="Steam a flash vessel recovers, and its yearly value")
def flash_recovery_endpoint(body: FlashRecoveryIn) -> FlashRecoveryOut:
    """Yield by the mixing rule at the vessel's pressure; value as live steam displaced
    from make-up water (US DOE Steam Tip Sheet #12)."""
    return body.answer()
