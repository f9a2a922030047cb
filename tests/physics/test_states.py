"""The state of water or steam: phases, the mixing rule and its inverse."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from service.physics import steam_tables
from service.physics.states import (
    Phase,
    enthalpy_from_quality,
    quality_from_enthalpy,
    state_from_enthalpy,
    state_from_quality,
    state_from_temperature,
)

pressures = st.floats(min_value=1.0, max_value=20_000.0)
qualities = st.floats(min_value=0.0, max_value=1.0)


@given(pressure=pressures, quality=qualities)
def test_mixing_rule_and_its_inverse_round_trip(pressure: float, quality: float) -> None:
    saturation = steam_tables.saturation_at_pressure(pressure)
    enthalpy = enthalpy_from_quality(saturation, quality)
    assert quality_from_enthalpy(saturation, enthalpy) == pytest.approx(quality, abs=1e-9)


@given(pressure=pressures, quality=st.floats(min_value=0.001, max_value=0.999))
def test_enthalpy_in_the_dome_gives_wet_steam_at_saturation(
    pressure: float, quality: float
) -> None:
    saturation = steam_tables.saturation_at_pressure(pressure)
    state = state_from_enthalpy(pressure, enthalpy_from_quality(saturation, quality))
    assert state.phase is Phase.WET_STEAM
    assert state.temperature_c == saturation.temperature_c
    assert state.quality == pytest.approx(quality, abs=1e-9)


@pytest.mark.parametrize(
    ("quality", "phase"),
    [(0.0, Phase.SATURATED_LIQUID), (0.4, Phase.WET_STEAM), (1.0, Phase.SATURATED_VAPOUR)],
)
def test_quality_names_the_phase(quality: float, phase: Phase) -> None:
    assert state_from_quality(1000.0, quality).phase is phase


@pytest.mark.parametrize("quality", [-0.01, 1.01, float("nan")])
def test_quality_outside_zero_to_one_is_refused(quality: float) -> None:
    with pytest.raises(ValueError, match="quality"):
        state_from_quality(1000.0, quality)


def test_saturation_enthalpies_give_the_saturated_phases() -> None:
    saturation = steam_tables.saturation_at_pressure(500.0)
    assert state_from_enthalpy(500.0, saturation.hf_kj_kg).phase is Phase.SATURATED_LIQUID
    assert state_from_enthalpy(500.0, saturation.hg_kj_kg).phase is Phase.SATURATED_VAPOUR


def test_subcooled_liquid_uses_region_1_and_reports_the_textbook_value() -> None:
    # IAPWS R7-97(2012) Table 5: h(3 MPa, 300 K) = 115.331273 kJ/kg.
    state = state_from_temperature(3000.0, 300.0 - 273.15)
    assert state.phase is Phase.SUBCOOLED_LIQUID
    assert state.enthalpy_kj_kg == pytest.approx(115.331273, abs=5e-7)
    assert state.quality is None
    textbook = steam_tables.saturation_at_temperature(26.85).hf_kj_kg
    assert state.textbook_enthalpy_kj_kg == textbook
    # Common practice: the hf(T) approximation is within a few kJ/kg below a few MPa.
    assert abs(state.enthalpy_kj_kg - textbook) < 3.0


def test_superheated_steam_from_temperature_and_back_from_enthalpy() -> None:
    state = state_from_temperature(1000.0, 250.0)
    assert state.phase is Phase.SUPERHEATED_STEAM
    assert state.textbook_enthalpy_kj_kg is None
    again = state_from_enthalpy(1000.0, state.enthalpy_kj_kg)
    assert again.phase is Phase.SUPERHEATED_STEAM
    # IF97's backward equation T(p, h) is consistent with the forward one to a few mK.
    assert again.temperature_c == pytest.approx(250.0, abs=0.01)


def test_subcooled_from_enthalpy() -> None:
    state = state_from_enthalpy(1000.0, 200.0)
    assert state.phase is Phase.SUBCOOLED_LIQUID
    # The backward equation T(p, h) and the forward h(p, T) agree (IF97 consistency).
    forward = state_from_temperature(1000.0, state.temperature_c)
    assert forward.enthalpy_kj_kg == pytest.approx(200.0, abs=0.01)


def test_saturation_temperature_alone_does_not_fix_the_state() -> None:
    saturation = steam_tables.saturation_at_pressure(1000.0)
    with pytest.raises(ValueError, match="give quality or enthalpy"):
        state_from_temperature(1000.0, saturation.temperature_c)
