"""The state of water or steam from pressure and one more property.

The mixing rule for the wet region, h = x*hg + (1 - x)*hf, and its inverse
x = (h - hf) / hfg, with x the quality (dryness fraction: mass of vapour over total
mass). Outside the dome the state comes from IAPWS-IF97 directly. Subcooled liquid
uses the exact IF97 region 1 enthalpy h(p, T); the textbook approximation h ~= hf(T)
(a nearly incompressible liquid) is reported beside it so the difference is visible.

Source: IAPWS R7-97(2012); the mixing rule is the definition of quality in any
thermodynamics text (for example Cengel and Boles, "Thermodynamics: An Engineering
Approach", section 3-5).
"""

import math
from dataclasses import dataclass
from enum import StrEnum

from service.physics import steam_tables

# Two enthalpies this close (relative) are the same point of the saturation line.
_SATURATION_MATCH = 1e-9


class Phase(StrEnum):
    SUBCOOLED_LIQUID = "subcooled_liquid"
    SATURATED_LIQUID = "saturated_liquid"
    WET_STEAM = "wet_steam"
    SATURATED_VAPOUR = "saturated_vapour"
    SUPERHEATED_STEAM = "superheated_steam"


@dataclass(frozen=True, slots=True)
class WaterState:
    """One equilibrium state of water or steam, in the units of `service.physics`."""

    pressure_kpa_abs: float
    phase: Phase
    temperature_c: float
    enthalpy_kj_kg: float
    entropy_kj_kg_k: float
    specific_volume_m3_kg: float
    quality: float | None  # 0 to 1 on and inside the dome, None outside it
    saturation_temperature_c: float
    textbook_enthalpy_kj_kg: float | None  # hf(T) for subcooled liquid, else None


def mixture(quality: float, liquid: float, vapour: float) -> float:
    """Mixing rule for any specific property: x*vapour + (1 - x)*liquid.

    >>> mixture(0.25, 100.0, 500.0)
    200.0
    """
    return quality * vapour + (1.0 - quality) * liquid


def enthalpy_from_quality(saturation: steam_tables.Saturation, quality: float) -> float:
    """Mixing rule h = x*hg + (1 - x)*hf [kJ/kg] for a quality x from 0 to 1.

    >>> sat = steam_tables.saturation_at_pressure(101.325)
    >>> round(enthalpy_from_quality(sat, 0.5), 3)
    1547.261
    """
    _require_quality(quality)
    return mixture(quality, saturation.hf_kj_kg, saturation.hg_kj_kg)


def quality_from_enthalpy(saturation: steam_tables.Saturation, enthalpy_kj_kg: float) -> float:
    """Inverse mixing rule x = (h - hf) / hfg, dimensionless.

    Below 0 the liquid is subcooled, above 1 the steam is superheated: the value has
    no meaning there, and callers decide the phase from it.

    >>> sat = steam_tables.saturation_at_pressure(101.325)
    >>> round(quality_from_enthalpy(sat, sat.hf_kj_kg + 0.25 * sat.hfg_kj_kg), 12)
    0.25
    """
    return (enthalpy_kj_kg - saturation.hf_kj_kg) / saturation.hfg_kj_kg


def _require_quality(quality: float) -> None:
    if not (math.isfinite(quality) and 0.0 <= quality <= 1.0):
        raise ValueError(f"quality {quality} must lie from 0 (saturated liquid) to 1 (dry steam)")


def _wet_state(
    pressure_kpa_abs: float, saturation: steam_tables.Saturation, quality: float
) -> WaterState:
    if quality == 0.0:
        phase = Phase.SATURATED_LIQUID
    elif quality == 1.0:
        phase = Phase.SATURATED_VAPOUR
    else:
        phase = Phase.WET_STEAM
    return WaterState(
        pressure_kpa_abs=pressure_kpa_abs,
        phase=phase,
        temperature_c=saturation.temperature_c,
        enthalpy_kj_kg=enthalpy_from_quality(saturation, quality),
        entropy_kj_kg_k=mixture(quality, saturation.sf_kj_kg_k, saturation.sg_kj_kg_k),
        specific_volume_m3_kg=mixture(quality, saturation.vf_m3_kg, saturation.vg_m3_kg),
        quality=quality,
        saturation_temperature_c=saturation.temperature_c,
        textbook_enthalpy_kj_kg=None,
    )


def _single_phase_state(
    pressure_kpa_abs: float,
    saturation: steam_tables.Saturation,
    properties: steam_tables.Properties,
) -> WaterState:
    subcooled = properties.temperature_c < saturation.temperature_c
    textbook = (
        steam_tables.saturation_at_temperature(properties.temperature_c).hf_kj_kg
        if subcooled and properties.temperature_c >= steam_tables.TRIPLE_POINT_TEMPERATURE_C
        else None
    )
    return WaterState(
        pressure_kpa_abs=pressure_kpa_abs,
        phase=Phase.SUBCOOLED_LIQUID if subcooled else Phase.SUPERHEATED_STEAM,
        temperature_c=properties.temperature_c,
        enthalpy_kj_kg=properties.enthalpy_kj_kg,
        entropy_kj_kg_k=properties.entropy_kj_kg_k,
        specific_volume_m3_kg=properties.specific_volume_m3_kg,
        quality=None,
        saturation_temperature_c=saturation.temperature_c,
        textbook_enthalpy_kj_kg=textbook,
    )


def state_from_quality(pressure_kpa_abs: float, quality: float) -> WaterState:
    """State in the wet region from pressure [kPa abs] and quality (0 to 1).

    >>> state_from_quality(1000.0, 1.0).phase.value
    'saturated_vapour'
    """
    _require_quality(quality)
    return _wet_state(
        pressure_kpa_abs, steam_tables.saturation_at_pressure(pressure_kpa_abs), quality
    )


def state_from_temperature(pressure_kpa_abs: float, temperature_c: float) -> WaterState:
    """Subcooled liquid or superheated steam from pressure [kPa abs] and temperature [degC].

    At the saturation temperature itself, temperature and pressure do not fix the
    state (any quality is possible); that raises ValueError.

    >>> state = state_from_temperature(101.325, 20.0)
    >>> state.phase.value, round(state.enthalpy_kj_kg, 2), round(state.textbook_enthalpy_kj_kg, 2)
    ('subcooled_liquid', 84.01, 83.92)
    """
    saturation = steam_tables.saturation_at_pressure(pressure_kpa_abs)
    if math.isclose(temperature_c, saturation.temperature_c, rel_tol=1e-12, abs_tol=1e-9):
        raise ValueError(
            f"{temperature_c:.6g} °C is the saturation temperature at {pressure_kpa_abs:.6g} "
            "kPa(abs): temperature and pressure do not fix a wet state; give quality or enthalpy"
        )
    properties = steam_tables.properties_at_pressure_temperature(pressure_kpa_abs, temperature_c)
    return _single_phase_state(pressure_kpa_abs, saturation, properties)


def state_from_enthalpy(pressure_kpa_abs: float, enthalpy_kj_kg: float) -> WaterState:
    """State from pressure [kPa abs] and specific enthalpy [kJ/kg], any phase.

    >>> state_from_enthalpy(101.325, 1387.3).phase.value
    'wet_steam'
    """
    saturation = steam_tables.saturation_at_pressure(pressure_kpa_abs)
    quality = quality_from_enthalpy(saturation, enthalpy_kj_kg)
    tolerance = _SATURATION_MATCH * saturation.hg_kj_kg / saturation.hfg_kj_kg
    if abs(quality) <= tolerance:
        return _wet_state(pressure_kpa_abs, saturation, 0.0)
    if abs(quality - 1.0) <= tolerance:
        return _wet_state(pressure_kpa_abs, saturation, 1.0)
    if 0.0 < quality < 1.0:
        return _wet_state(pressure_kpa_abs, saturation, quality)
    properties = steam_tables.properties_at_pressure_enthalpy(pressure_kpa_abs, enthalpy_kj_kg)
    return _single_phase_state(pressure_kpa_abs, saturation, properties)
