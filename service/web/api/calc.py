"""Calculations: the flash of condensate, flash recovery, and one trap's yearly losses.
The requests the calculator page shares are in `service.web.calculations`."""

from typing import Annotated

from fastapi import APIRouter, Depends
from pydantic import BaseModel, ConfigDict, Field, field_validator

from service.accounts.roles import Permission
from service.physics.conditions import (
    FindingCategory,
    TrapCondition,
    category_of,
)
from service.physics.flash import flash_of_condensate
from service.physics.orifice import FlowMethod, FlowRegime
from service.physics.trap_loss import (
    TrapLoss,
    trap_loss,
)
from service.reports.schemas import RANGED_FIGURES, ranged_fields, spread_fields
from service.store.schemas import GaugePressure
from service.web.access import require
from service.web.calculations import (
    FlashRecoveryIn,
    FlashRecoveryOut,
    TrapLossIn,
    return_below_inlet,
)
from service.web.errors import reported_against
from service.web.inputs import SiteInput

router = APIRouter(
    prefix="/calc", tags=["calculations"], dependencies=[Depends(require(Permission.READ))]
)


class FlashIn(SiteInput):
    inlet_pressure_kpa_g: GaugePressure
    return_pressure_kpa_g: GaugePressure
    condensate_temperature_c: (
        Annotated[float, Field(description="Condensate at the trap [°C]; absent: saturated")] | None
    ) = None

    _return_below_inlet = field_validator("return_pressure_kpa_g")(return_below_inlet)


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
        condensate = loss.condensate
        return cls(
            condition=loss.condition,
            category=category_of(loss.condition),
            flow_regime=loss.flow_regime,
            method=loss.method,
            orifice_capacity_kg_h=loss.orifice_capacity_kg_h,
            **spread_fields("loss_factor", loss.loss_factor),
            **spread_fields("steam_loss_kg_h", loss.steam_loss_kg_h),
            **ranged_fields(
                loss.live_steam,
                loss.live_steam_low,
                loss.live_steam_high,
                RANGED_FIGURES | {"annual_fuel_gj": "fuel_gj"},
            ),
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


@router.post("/flash-recovery", summary="Steam a flash vessel recovers, and its yearly value")
def flash_recovery_endpoint(body: FlashRecoveryIn) -> FlashRecoveryOut:
    """Yield by the mixing rule at the vessel's pressure; value as live steam displaced
    from make-up water (US DOE Steam Tip Sheet #12)."""
    return body.answer()
