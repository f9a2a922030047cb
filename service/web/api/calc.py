"""Calculations: the flash of condensate, and one trap's yearly losses."""

from typing import Annotated, Any, Self

from fastapi import APIRouter, Depends
from pydantic import BaseModel, ConfigDict, Field, ValidationInfo, field_validator, model_validator

from service.accounts.roles import Permission
from service.physics.annual import (
    DEFAULT_BOILER_EFFICIENCY,
    DEFAULT_CO2_KG_PER_GJ_FUEL,
    DEFAULT_MAKEUP_WATER_TEMPERATURE_C,
    HOURS_IN_LEAP_YEAR,
    MIN_BOILER_EFFICIENCY,
    Economics,
    YearlyLoss,
)
from service.physics.conditions import (
    DEFAULT_LOSS_FACTORS,
    TrapCondition,
    discharges_condensate,
    wastes_live_steam,
)
from service.physics.flash import flash_of_condensate
from service.physics.orifice import MAXIMUM_ORIFICE_MM, FlowMethod, FlowRegime
from service.physics.spread import Spread
from service.physics.trap_loss import (
    DEFAULT_DISCHARGE_COEFFICIENT,
    CondensateDestination,
    TrapLoss,
    TrapService,
    loss_factor_for,
    trap_loss,
)
from service.web.access import require
from service.web.api.inputs import GaugePressure, SiteInput
from service.web.errors import reported_against

router = APIRouter(
    prefix="/calc", tags=["calculations"], dependencies=[Depends(require(Permission.READ))]
)

Fraction = Annotated[float, Field(ge=0.0, le=1.0)]
DischargeCoefficient = Annotated[float, Field(gt=0.0, le=1.0)]
Money = Annotated[float, Field(ge=0.0, le=1e6)]


def _return_below_inlet(value: float, info: ValidationInfo) -> float:
    inlet = info.data.get("inlet_pressure_kpa_g")
    condition = info.data.get("condition", TrapCondition.WORKING)
    if inlet is not None and value >= inlet and discharges_condensate(condition):
        raise ValueError(
            f"the return pressure ({value:g} kPa(g)) must be below the inlet pressure "
            f"({inlet:g} kPa(g)) for condensate to discharge"
        )
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
    """x2 = (h1 - hf(p2)) / hfg(p2), zero where h1 <= hf(p2) (shared/DOMAIN.md)."""
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
    orifice_diameter_mm: Annotated[float, Field(gt=0.0, le=MAXIMUM_ORIFICE_MM)]
    hours_per_year: Annotated[float, Field(ge=0.0, le=HOURS_IN_LEAP_YEAR)]
    discharge_coefficient: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.typical
    discharge_coefficient_low: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.low
    discharge_coefficient_high: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.high
    loss_factor: Fraction | None = None
    loss_factor_low: Fraction | None = None
    loss_factor_high: Fraction | None = None
    condensate_load_kg_h: Annotated[float, Field(ge=0.0, le=100_000.0)] = 0.0
    condensate_destination: CondensateDestination = CondensateDestination.CLOSED_RETURN
    steam_cost_per_tonne: Money | None = None
    fuel_price_per_gj: Money | None = None
    water_and_treatment_cost_per_tonne: Money = 0.0
    boiler_efficiency: Annotated[float, Field(ge=MIN_BOILER_EFFICIENCY, le=1.0)] = (
        DEFAULT_BOILER_EFFICIENCY
    )
    makeup_water_temperature_c: Annotated[float, Field(ge=0.01, le=95.0)] = (
        DEFAULT_MAKEUP_WATER_TEMPERATURE_C
    )
    co2_kg_per_gj_fuel: Annotated[float, Field(ge=0.0, le=200.0)] = DEFAULT_CO2_KG_PER_GJ_FUEL

    _return_below_inlet = field_validator("return_pressure_kpa_g")(_return_below_inlet)

    @field_validator("loss_factor", "loss_factor_low", "loss_factor_high")
    @classmethod
    def _loss_factor_fits_condition(cls, value: float | None, info: ValidationInfo) -> Any:
        condition = info.data.get("condition")
        if value is not None and condition is not None and not wastes_live_steam(condition):
            raise ValueError(
                f"a loss factor applies only to a trap that wastes live steam, not to '{condition}'"
            )
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
        return TrapService(
            inlet_pressure_kpa_abs=self.absolute(self.inlet_pressure_kpa_g),
            return_pressure_kpa_abs=self.absolute(self.return_pressure_kpa_g),
            orifice_diameter_mm=self.orifice_diameter_mm,
            condition=self.condition,
            hours_per_year=self.hours_per_year,
            condensate_load_kg_h=self.condensate_load_kg_h,
            destination=self.condensate_destination,
            discharge_coefficient=self.discharge_coefficient_spread(),
            loss_factor=self.loss_factor_spread(),
        )

    def economics(self) -> Economics:
        return Economics(
            steam_cost_per_tonne=self.steam_cost_per_tonne,
            fuel_price_per_gj=self.fuel_price_per_gj,
            water_and_treatment_cost_per_tonne=self.water_and_treatment_cost_per_tonne,
            boiler_efficiency=self.boiler_efficiency,
            makeup_water_temperature_c=self.makeup_water_temperature_c,
            co2_kg_per_gj_fuel=self.co2_kg_per_gj_fuel,
        )


class TrapLossOut(BaseModel):
    """A trap's losses. Unsuffixed figures are typical; `_low` and `_high` bound them."""

    condition: TrapCondition
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
