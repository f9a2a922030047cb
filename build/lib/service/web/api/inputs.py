"""Request fields shared by the steam and calculation endpoints.

Every model forbids unknown fields and rejects NaN and infinity. A field whose name
ends in `_kpa_g` is a gauge pressure: it is checked, together with the site's
atmospheric pressure, against the saturation range of IAPWS-IF97, so the error names
that field.
"""

from typing import Annotated, Any

from pydantic import BaseModel, ConfigDict, Field, ValidationInfo, field_validator

from service.physics import steam_tables
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA, absolute_from_gauge

# 50 kPa is the standard atmosphere near 5 500 m; 110 kPa is above any sea-level high.
AtmosphericPressure = Annotated[
    float,
    Field(
        gt=50.0,
        le=110.0,
        description="Local atmospheric pressure [kPa], default one standard atmosphere",
    ),
]
AbsolutePressure = Annotated[
    float,
    Field(
        ge=steam_tables.TRIPLE_POINT_PRESSURE_KPA,
        le=steam_tables.CRITICAL_PRESSURE_KPA,
        description="Absolute pressure [kPa(abs)], triple point to critical point",
    ),
]
GaugePressure = Annotated[
    float,
    Field(
        ge=-STANDARD_ATMOSPHERE_KPA,
        le=steam_tables.CRITICAL_PRESSURE_KPA,
        description="Gauge pressure [kPa(g)]",
    ),
]


class StrictInput(BaseModel):
    """A request body or query: unknown fields, NaN and infinity are refused."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False)


class SiteInput(StrictInput):
    """A request with gauge pressures, read against the site's atmospheric pressure."""

    atmospheric_pressure_kpa: AtmosphericPressure = STANDARD_ATMOSPHERE_KPA

    @field_validator("*")
    @classmethod
    def _gauge_pressure_on_saturation_line(cls, value: Any, info: ValidationInfo) -> Any:
        field = info.field_name or ""
        if field.endswith("_kpa_g") and value is not None:
            atmosphere = info.data.get("atmospheric_pressure_kpa")
            if atmosphere is not None:
                steam_tables.require_saturation_pressure(absolute_from_gauge(value, atmosphere))
        return value

    def absolute(self, pressure_kpa_g: float) -> float:
        """A gauge pressure of this request as absolute pressure [kPa(abs)]."""
        return absolute_from_gauge(pressure_kpa_g, self.atmospheric_pressure_kpa)
