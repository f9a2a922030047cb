"""Steam properties: saturation lookups and the state of water or steam."""

from typing import Annotated, Self

from fastapi import APIRouter, Depends, Query
from pydantic import BaseModel, ConfigDict, Field, model_validator

from service.accounts.roles import Permission
from service.physics import steam_tables
from service.physics.states import (
    Phase,
    WaterState,
    state_from_enthalpy,
    state_from_quality,
    state_from_temperature,
)
from service.store.schemas import GaugePressure
from service.web.access import require
from service.web.errors import reported_against
from service.web.inputs import AbsolutePressure, SiteInput

router = APIRouter(
    prefix="/steam", tags=["steam"], dependencies=[Depends(require(Permission.READ))]
)


def _exactly_one(model: BaseModel, fields: tuple[str, ...]) -> None:
    given = [name for name in fields if getattr(model, name) is not None]
    if len(given) != 1:
        raise ValueError(f"give exactly one of {', '.join(fields)} (got {len(given)})")


class SaturationQuery(SiteInput):
    """One of a gauge pressure, an absolute pressure or a temperature."""

    pressure_kpa_g: GaugePressure | None = None
    pressure_kpa_abs: AbsolutePressure | None = None
    temperature_c: (
        Annotated[
            float,
            Field(
                ge=steam_tables.TRIPLE_POINT_TEMPERATURE_C,
                le=steam_tables.CRITICAL_TEMPERATURE_C,
                description="Saturation temperature [°C]",
            ),
        ]
        | None
    ) = None

    @model_validator(mode="after")
    def _one_input(self) -> Self:
        _exactly_one(self, ("pressure_kpa_g", "pressure_kpa_abs", "temperature_c"))
        return self


class SaturationOut(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    pressure_kpa_abs: float
    temperature_c: float
    hf_kj_kg: float
    hg_kj_kg: float
    hfg_kj_kg: float
    vf_m3_kg: float
    vg_m3_kg: float
    sf_kj_kg_k: float
    sg_kj_kg_k: float


@router.get("/saturation", summary="Saturated water and steam at one pressure or temperature")
def saturation(query: Annotated[SaturationQuery, Query()]) -> SaturationOut:
    """IAPWS-IF97 saturation properties (IAPWS R7-97(2012), region 4)."""
    if query.temperature_c is not None:
        result = steam_tables.saturation_at_temperature(query.temperature_c)
    elif query.pressure_kpa_abs is not None:
        result = steam_tables.saturation_at_pressure(query.pressure_kpa_abs)
    else:
        assert query.pressure_kpa_g is not None
        result = steam_tables.saturation_at_pressure(query.absolute(query.pressure_kpa_g))
    return SaturationOut.model_validate(result)


class StateIn(SiteInput):
    """A pressure (gauge or absolute) and exactly one of quality, temperature, enthalpy."""

    pressure_kpa_abs: AbsolutePressure | None = None
    pressure_kpa_g: GaugePressure | None = None
    quality: Annotated[float, Field(ge=0.0, le=1.0, description="Dryness fraction")] | None = None
    temperature_c: Annotated[float, Field(description="Temperature [°C]")] | None = None
    enthalpy_kj_kg: Annotated[float, Field(description="Specific enthalpy [kJ/kg]")] | None = None

    @model_validator(mode="after")
    def _one_pressure_one_property(self) -> Self:
        _exactly_one(self, ("pressure_kpa_abs", "pressure_kpa_g"))
        _exactly_one(self, ("quality", "temperature_c", "enthalpy_kj_kg"))
        return self


class StateOut(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    phase: Phase
    pressure_kpa_abs: float
    temperature_c: float
    enthalpy_kj_kg: float
    entropy_kj_kg_k: float
    specific_volume_m3_kg: float
    quality: float | None = Field(description="Dryness fraction; null outside the wet region")
    saturation_temperature_c: float
    textbook_enthalpy_kj_kg: float | None = Field(
        description="Subcooled liquid only: the textbook approximation hf(T) beside IF97's h(p, T)"
    )


@router.post("/state", summary="The state of water or steam from pressure and one property")
def state(body: StateIn) -> StateOut:
    """Phase, enthalpy and quality by the mixing rule h = x*hg + (1 - x)*hf or IAPWS-IF97."""
    pressure = (
        body.pressure_kpa_abs
        if body.pressure_kpa_abs is not None
        else body.absolute(body.pressure_kpa_g or 0.0)
    )
    result: WaterState
    if body.quality is not None:
        result = state_from_quality(pressure, body.quality)
    elif body.temperature_c is not None:
        with reported_against("body", "temperature_c", typed=body.temperature_c):
            result = state_from_temperature(pressure, body.temperature_c)
    else:
        with reported_against("body", "enthalpy_kj_kg", typed=body.enthalpy_kj_kg):
            result = state_from_enthalpy(pressure, body.enthalpy_kj_kg or 0.0)
    return StateOut.model_validate(result)
