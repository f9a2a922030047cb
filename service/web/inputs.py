"""Request fields shared by the steam and calculation endpoints.

Every model is the store's `StrictInput`: unknown fields, NaN, infinity and NUL
characters are refused, by the one rule the register and surveys use. A field whose name
ends in `_kpa_g` is a gauge pressure: it is checked, together with the site's
atmospheric pressure, against the saturation range of IAPWS-IF97, so the error names
that field.
"""

from typing import Annotated, Any

from pydantic import Field, ValidationInfo, field_validator

from service.physics import steam_tables
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA, absolute_from_gauge
from service.store.schemas import Atmosphere, StrictInput

AbsolutePressure = Annotated[
    float,
    Field(
        ge=steam_tables.TRIPLE_POINT_PRESSURE_KPA,
        le=steam_tables.CRITICAL_PRESSURE_KPA,
        description="Absolute pressure [kPa(abs)], triple point to critical point",
    ),
]


class SiteInput(StrictInput):
    """A request with gauge pressures, read against the site's atmospheric pressure."""

    atmospheric_pressure_kpa: Atmosphere = Field(
        default=STANDARD_ATMOSPHERE_KPA, description="Default: one standard atmosphere"
    )

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
