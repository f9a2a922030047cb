"""Properties of water and steam from IAPWS-IF97: the one adapter around `iapws`.

No other module imports `iapws`. This one converts the project's declared units to the
library's (MPa, K, kJ/kg) and back, turns the library's out-of-range errors into a
`ValueError` with a sentence a technician can read, and caches the lookups a survey
repeats thousands of times at the same few pressure levels.

Lookups the cache misses (a site where every trap has its own pressure misses them all)
go, up to 16.529 MPa (the saturation pressure at 623.15 K, where region 3 begins), to
CoolProp's IF97 backend, a C++ implementation of the same release about a hundred times
faster than `IAPWS97`: saturation states and single-phase states at (p, T) from regions 1
and 2; wet steam mixed from the saturation states as `IAPWS97` mixes it; and superheated
steam at (p, h) or (p, s), CoolProp's backward equation refined by Newton's method on the
forward one, as `IAPWS97` refines its own (CoolProp's backend does not). Tests hold each
to `IAPWS97` over the range (within 1e-8 relative; 1e-6 was asked). Above 16.529 MPa, and
for compressed water at (p, h) or (p, s), `IAPWS97` answers.

Units here and in every caller: pressure kPa absolute, temperature degC, specific
enthalpy kJ/kg, specific entropy kJ/(kg K), specific volume m3/kg.

Source: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997
for the Thermodynamic Properties of Water and Steam", evaluated by `iapws.IAPWS97`.
"""

import threading
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache
from typing import Literal

from CoolProp.CoolProp import (
    PQ_INPUTS,
    PT_INPUTS,
    AbstractState,
    HmassP_INPUTS,
    PSmass_INPUTS,
    input_pairs,
)
from iapws import IAPWS97

KELVIN_AT_ZERO_C = 273.15
TRIPLE_POINT_PRESSURE_KPA = 0.611657
CRITICAL_PRESSURE_KPA = 22064.0
TRIPLE_POINT_TEMPERATURE_C = 0.01
CRITICAL_TEMPERATURE_C = 373.946
# IF97 region 2 reaches 1073.15 K; region 5 (to 2273.15 K) is of no use to a steam trap.
MAXIMUM_TEMPERATURE_C = 800.0
MAXIMUM_PRESSURE_KPA = 100_000.0
# Saturation pressure at 623.15 K, where region 3 begins (IAPWS R7-97(2012), eq. 5).
REGION_3_SATURATION_PRESSURE_KPA = 16_529.1642526

_CACHE_SIZE = 8192
_NEWTON_STEPS = 8


@dataclass(frozen=True, slots=True)
class Saturation:
    """Saturated liquid (f) and saturated vapour (g) at one pressure."""

    pressure_kpa_abs: float
    temperature_c: float
    hf_kj_kg: float
    hg_kj_kg: float
    sf_kj_kg_k: float
    sg_kj_kg_k: float
    vf_m3_kg: float
    vg_m3_kg: float

    @property
    def hfg_kj_kg(self) -> float:
        """Latent heat of evaporation, hg - hf [kJ/kg]."""
        return self.hg_kj_kg - self.hf_kj_kg


@dataclass(frozen=True, slots=True)
class Properties:
    """Temperature, enthalpy, entropy, volume and quality of one equilibrium state."""

    temperature_c: float
    enthalpy_kj_kg: float
    entropy_kj_kg_k: float
    specific_volume_m3_kg: float
    quality: float | None  # None outside the two-phase region


def require_saturation_pressure(pressure_kpa_abs: float) -> None:
    """Raise ValueError unless the pressure lies on IF97's saturation line.

    The line runs from the triple point, 0.611657 kPa, to the critical point, 22064 kPa
    (IAPWS R7-97(2012), section 8).

    >>> require_saturation_pressure(101.325)
    >>> require_saturation_pressure(30000.0)
    Traceback (most recent call last):
    ...
    ValueError: 30000 kPa(abs) is outside the range of boiling water and steam, ...
    """
    if not TRIPLE_POINT_PRESSURE_KPA <= pressure_kpa_abs <= CRITICAL_PRESSURE_KPA:
        raise ValueError(
            f"{pressure_kpa_abs:.6g} kPa(abs) is outside the range of boiling water and steam, "
            f"{TRIPLE_POINT_PRESSURE_KPA} to {CRITICAL_PRESSURE_KPA:.0f} kPa(abs)"
        )


def require_saturation_temperature(temperature_c: float) -> None:
    """Raise ValueError unless the temperature lies on IF97's saturation line.

    >>> require_saturation_temperature(400.0)
    Traceback (most recent call last):
    ...
    ValueError: 400 °C is outside the range of boiling water and steam, 0.01 to 373.946 °C
    """
    if not TRIPLE_POINT_TEMPERATURE_C <= temperature_c <= CRITICAL_TEMPERATURE_C:
        raise ValueError(
            f"{temperature_c:.6g} °C is outside the range of boiling water and steam, "
            f"{TRIPLE_POINT_TEMPERATURE_C} to {CRITICAL_TEMPERATURE_C} °C"
        )


def _require_single_phase_range(pressure_kpa_abs: float, temperature_c: float) -> None:
    if not TRIPLE_POINT_PRESSURE_KPA <= pressure_kpa_abs <= MAXIMUM_PRESSURE_KPA:
        raise ValueError(
            f"{pressure_kpa_abs:.6g} kPa(abs) is outside IAPWS-IF97's range, "
            f"{TRIPLE_POINT_PRESSURE_KPA} to {MAXIMUM_PRESSURE_KPA:.0f} kPa(abs)"
        )
    if not TRIPLE_POINT_TEMPERATURE_C <= temperature_c <= MAXIMUM_TEMPERATURE_C:
        raise ValueError(
            f"{temperature_c:.6g} °C is outside the range this program covers, "
            f"{TRIPLE_POINT_TEMPERATURE_C} to {MAXIMUM_TEMPERATURE_C:.0f} °C"
        )


_READABLE_INPUTS: dict[str, Callable[[float], str]] = {
    "P": lambda mpa: f"{mpa * 1000.0:.6g} kPa(abs)",
    "T": lambda kelvin: f"{kelvin - KELVIN_AT_ZERO_C:.6g} °C",
    "h": lambda kj_kg: f"{kj_kg:.6g} kJ/kg",
    "s": lambda kj_kg_k: f"{kj_kg_k:.6g} kJ/(kg K)",
    "x": lambda quality: f"quality {quality:.6g}",
}


def _evaluate(**inputs: float) -> IAPWS97:
    try:
        state = IAPWS97(**inputs)
        evaluated = state.status == 1
    except NotImplementedError:
        evaluated = False
    if not evaluated:
        given = " and ".join(_READABLE_INPUTS[name](value) for name, value in inputs.items())
        raise ValueError(f"water and steam have no IAPWS-IF97 state at {given}")
    return state


def _properties(state: IAPWS97) -> Properties:
    two_phase = state.region == 4
    return Properties(
        temperature_c=float(state.T) - KELVIN_AT_ZERO_C,
        enthalpy_kj_kg=float(state.h),
        entropy_kj_kg_k=float(state.s),
        specific_volume_m3_kg=float(state.v),
        quality=float(state.x) if two_phase else None,
    )


@lru_cache(maxsize=_CACHE_SIZE)
def saturation_at_pressure(pressure_kpa_abs: float) -> Saturation:
    """Saturation properties at a pressure [kPa abs], 0.611657 to 22064 kPa.

    Source: IAPWS R7-97(2012), region 4 with regions 1 and 2 (region 3 near the
    critical point).

    >>> s = saturation_at_pressure(1000.0)
    >>> round(s.temperature_c, 3), round(s.hf_kj_kg, 2), round(s.hg_kj_kg, 2)
    (179.886, 762.68, 2777.12)
    """
    require_saturation_pressure(pressure_kpa_abs)
    if pressure_kpa_abs <= REGION_3_SATURATION_PRESSURE_KPA:
        pressure_pa = pressure_kpa_abs * 1000.0
        return _saturation(
            pressure_kpa_abs,
            _coolprop_properties(PQ_INPUTS, pressure_pa, 0.0),
            _coolprop_properties(PQ_INPUTS, pressure_pa, 1.0),
        )
    pressure_mpa = pressure_kpa_abs / 1000.0
    return _saturation_from_iapws(
        _evaluate(P=pressure_mpa, x=0.0), _evaluate(P=pressure_mpa, x=1.0)
    )


class _CoolPropIF97(threading.local):
    """One CoolProp IF97 state per thread: an AbstractState is not safe to share."""

    def __init__(self) -> None:
        self.state = AbstractState("IF97", "Water")


_COOLPROP = _CoolPropIF97()


def _coolprop_properties(inputs: input_pairs, first: float, second: float) -> Properties:
    """A single-phase or saturated state from CoolProp's IF97 backend, in our units."""
    state = _COOLPROP.state
    state.update(inputs, first, second)
    return Properties(
        temperature_c=state.T() - KELVIN_AT_ZERO_C,
        enthalpy_kj_kg=state.hmass() / 1000.0,
        entropy_kj_kg_k=state.smass() / 1000.0,
        specific_volume_m3_kg=1.0 / state.rhomass(),
        quality=None,
    )


def _saturation(pressure_kpa_abs: float, liquid: Properties, vapour: Properties) -> Saturation:
    """Saturated water and steam at one pressure [kPa abs], from either backend's states."""
    return Saturation(
        pressure_kpa_abs=pressure_kpa_abs,
        temperature_c=liquid.temperature_c,
        hf_kj_kg=liquid.enthalpy_kj_kg,
        hg_kj_kg=vapour.enthalpy_kj_kg,
        sf_kj_kg_k=liquid.entropy_kj_kg_k,
        sg_kj_kg_k=vapour.entropy_kj_kg_k,
        vf_m3_kg=liquid.specific_volume_m3_kg,
        vg_m3_kg=vapour.specific_volume_m3_kg,
    )


def _saturation_from_iapws(liquid: IAPWS97, vapour: IAPWS97) -> Saturation:
    return _saturation(float(liquid.P) * 1000.0, _properties(liquid), _properties(vapour))


@lru_cache(maxsize=_CACHE_SIZE)
def saturation_at_temperature(temperature_c: float) -> Saturation:
    """Saturation properties at a temperature [degC], 0.01 to 373.946 degC.

    >>> round(saturation_at_temperature(100.0).pressure_kpa_abs, 3)
    101.418
    """
    require_saturation_temperature(temperature_c)
    temperature_k = temperature_c + KELVIN_AT_ZERO_C
    return _saturation_from_iapws(
        _evaluate(T=temperature_k, x=0.0), _evaluate(T=temperature_k, x=1.0)
    )


def _wet_steam(saturation: Saturation, quality: float) -> Properties:
    """Wet steam of a quality [-] mixed from the saturation states, as `IAPWS97` mixes it."""
    return Properties(
        temperature_c=saturation.temperature_c,
        enthalpy_kj_kg=saturation.hf_kj_kg + quality * saturation.hfg_kj_kg,
        entropy_kj_kg_k=saturation.sf_kj_kg_k
        + quality * (saturation.sg_kj_kg_k - saturation.sf_kj_kg_k),
        specific_volume_m3_kg=saturation.vf_m3_kg
        + quality * (saturation.vg_m3_kg - saturation.vf_m3_kg),
        quality=quality,
    )


def _steam_above_saturation(
    pressure_kpa_abs: float, saturation: Saturation, given: Literal["h", "s"], value: float
) -> Properties | None:
    """Superheated steam (region 2) of an enthalpy [kJ/kg] or entropy [kJ/(kg K)].

    CoolProp's backward equation gives T, refined by Newton's method on the forward
    equation (dh/dT = cp, ds/dT = cp/T) to 1e-9 of T, as `IAPWS97` refines its own. None
    where the iteration leaves region 2 or fails: the caller then asks `IAPWS97`.
    """
    state = _COOLPROP.state
    pressure_pa = pressure_kpa_abs * 1000.0
    target = value * 1000.0
    lowest_k = saturation.temperature_c + KELVIN_AT_ZERO_C
    highest_k = MAXIMUM_TEMPERATURE_C + KELVIN_AT_ZERO_C
    try:
        if given == "h":
            state.update(HmassP_INPUTS, target, pressure_pa)
        else:
            state.update(PSmass_INPUTS, pressure_pa, target)
        temperature_k = state.T()
        for _ in range(_NEWTON_STEPS):
            if not lowest_k < temperature_k <= highest_k:
                return None
            state.update(PT_INPUTS, pressure_pa, temperature_k)
            if given == "h":
                step = (state.hmass() - target) / state.cpmass()
            else:
                step = (state.smass() - target) * temperature_k / state.cpmass()
            temperature_k -= step
            if abs(step) < 1e-9 * temperature_k:
                return _coolprop_properties(PT_INPUTS, pressure_pa, temperature_k)
    except (ValueError, IndexError):  # CoolProp's out-of-range and solver errors
        return None
    return None


def _fast_state(
    pressure_kpa_abs: float, given: Literal["h", "s"], value: float
) -> Properties | None:
    """Wet or superheated steam below region 3 without `IAPWS97`, or None (module docstring)."""
    if not TRIPLE_POINT_PRESSURE_KPA <= pressure_kpa_abs <= REGION_3_SATURATION_PRESSURE_KPA:
        return None
    saturation = saturation_at_pressure(pressure_kpa_abs)
    liquid, vapour = (
        (saturation.hf_kj_kg, saturation.hg_kj_kg)
        if given == "h"
        else (saturation.sf_kj_kg_k, saturation.sg_kj_kg_k)
    )
    if liquid < value < vapour:
        return _wet_steam(saturation, (value - liquid) / (vapour - liquid))
    if value >= vapour:
        return _steam_above_saturation(pressure_kpa_abs, saturation, given, value)
    return None


@lru_cache(maxsize=_CACHE_SIZE)
def properties_at_pressure_temperature(pressure_kpa_abs: float, temperature_c: float) -> Properties:
    """Single-phase properties at pressure [kPa abs] and temperature [degC].

    Compressed liquid below the saturation temperature (IF97 region 1, or 3 near the
    critical point), steam above it (region 2). Valid 0.611657 kPa to 100 MPa and
    0.01 to 800 degC.

    >>> round(properties_at_pressure_temperature(3000.0, 300.0 - 273.15).enthalpy_kj_kg, 6)
    115.331273
    """
    _require_single_phase_range(pressure_kpa_abs, temperature_c)
    temperature_k = temperature_c + KELVIN_AT_ZERO_C
    if pressure_kpa_abs <= REGION_3_SATURATION_PRESSURE_KPA:
        return _coolprop_properties(PT_INPUTS, pressure_kpa_abs * 1000.0, temperature_k)
    return _properties(_evaluate(P=pressure_kpa_abs / 1000.0, T=temperature_k))


@lru_cache(maxsize=_CACHE_SIZE)
def properties_at_pressure_enthalpy(pressure_kpa_abs: float, enthalpy_kj_kg: float) -> Properties:
    """Equilibrium properties at pressure [kPa abs] and specific enthalpy [kJ/kg].

    Uses IF97's backward equations T(p, h) outside the two-phase region.

    >>> round(properties_at_pressure_enthalpy(1000.0, 3000.0).temperature_c, 2)
    275.97
    """
    fast = _fast_state(pressure_kpa_abs, "h", enthalpy_kj_kg)
    if fast is not None:
        return fast
    state = _evaluate(P=pressure_kpa_abs / 1000.0, h=enthalpy_kj_kg)
    _require_single_phase_range(pressure_kpa_abs, state.T - KELVIN_AT_ZERO_C)
    return _properties(state)


@lru_cache(maxsize=_CACHE_SIZE)
def properties_at_pressure_entropy(pressure_kpa_abs: float, entropy_kj_kg_k: float) -> Properties:
    """Equilibrium properties at pressure [kPa abs] and specific entropy [kJ/(kg K)].

    The end state of an isentropic expansion. Uses IF97's backward equations T(p, s)
    outside the two-phase region.

    >>> round(properties_at_pressure_entropy(100.0, 6.5).quality, 4)
    0.8582
    """
    fast = _fast_state(pressure_kpa_abs, "s", entropy_kj_kg_k)
    if fast is not None:
        return fast
    state = _evaluate(P=pressure_kpa_abs / 1000.0, s=entropy_kj_kg_k)
    _require_single_phase_range(pressure_kpa_abs, state.T - KELVIN_AT_ZERO_C)
    return _properties(state)
