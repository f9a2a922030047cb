"""Temperatures as evidence: each rule at its margin, against IF97 saturation
temperatures. The margins are common practice (no single source); the yardstick is
Tsat at 1 MPa(abs) = 179.886 °C (IAPWS R7-97(2012), equation 31; from memory, the
steam tables' 10 bar line reads 179.88 °C) and at 101.325 kPa(abs) = 99.974 °C."""

import pytest

from service.physics.conditions import TrapCondition
from service.physics.evidence import (
    BACKED_UP_MARGIN_K,
    READING_NOISE_K,
    SATURATED_MARGIN_K,
    STEAM_PASSING_MARGIN_K,
    Doubt,
    temperature_doubts,
)
from service.physics.steam_tables import saturation_at_pressure

INLET_KPA_ABS = 1000.0
TSAT_INLET_C = 179.886  # IAPWS R7-97(2012): Tsat at 1 MPa, 453.036 K


def _doubts(
    condition: TrapCondition,
    upstream_c: float | None = None,
    downstream_c: float | None = None,
    return_kpa_abs: float = 101.325,
) -> list[Doubt]:
    found = temperature_doubts(
        condition=condition,
        inlet_pressure_kpa_abs=INLET_KPA_ABS,
        return_pressure_kpa_abs=return_kpa_abs,
        upstream_c=upstream_c,
        downstream_c=downstream_c,
    )
    return [doubt.doubt for doubt in found]


def test_the_yardstick_is_if97_saturation() -> None:
    # IAPWS R7-97(2012), equation 31 (the saturation temperature), at 1 MPa: 453.0356 K.
    assert saturation_at_pressure(INLET_KPA_ABS).temperature_c == pytest.approx(
        TSAT_INLET_C, abs=1e-3
    )


@pytest.mark.parametrize(
    "condition",
    [
        TrapCondition.WORKING,
        TrapCondition.LEAKING,
        TrapCondition.BLOW_THROUGH,
        TrapCondition.RAPID_CYCLING,
    ],
)
def test_a_cold_inlet_doubts_a_trap_said_to_pass_condensate(condition: TrapCondition) -> None:
    margin = TSAT_INLET_C - BACKED_UP_MARGIN_K
    assert _doubts(condition, upstream_c=margin - 0.5) == [Doubt.BACKED_UP]
    assert _doubts(condition, upstream_c=margin + 0.5) == []


@pytest.mark.parametrize("condition", [TrapCondition.FLOODED, TrapCondition.OUT_OF_SERVICE])
def test_a_cold_inlet_agrees_with_backing_up_or_a_line_out_of_use(
    condition: TrapCondition,
) -> None:
    assert _doubts(condition, upstream_c=40.0) == []


def test_an_outlet_near_inlet_saturation_doubts_a_working_trap_to_atmosphere() -> None:
    margin = TSAT_INLET_C - STEAM_PASSING_MARGIN_K
    assert _doubts(TrapCondition.WORKING, downstream_c=margin + 0.5) == [Doubt.STEAM_PASSING]
    assert _doubts(TrapCondition.WORKING, downstream_c=margin - 0.5) == []
    assert _doubts(TrapCondition.BLOW_THROUGH, downstream_c=margin + 0.5) == []


def test_no_steam_doubt_where_the_return_is_nearly_as_hot_as_the_inlet() -> None:
    # A return at 800 kPa(abs) saturates at 170.4 °C: within 2 x 10 K of the inlet's.
    assert _doubts(TrapCondition.WORKING, downstream_c=178.0, return_kpa_abs=800.0) == []


def test_a_hot_inlet_doubts_a_plugged_trap() -> None:
    margin = TSAT_INLET_C - SATURATED_MARGIN_K
    assert _doubts(TrapCondition.PLUGGED, upstream_c=margin + 0.5) == [Doubt.HOT_INLET]
    assert _doubts(TrapCondition.PLUGGED, upstream_c=margin - 0.5) == []


def test_an_outlet_hotter_than_the_inlet_is_a_reading_to_check() -> None:
    found = _doubts(
        TrapCondition.FLOODED, upstream_c=120.0, downstream_c=120.0 + READING_NOISE_K + 1
    )
    assert found == [Doubt.OUTLET_HOTTER]
    assert _doubts(TrapCondition.FLOODED, upstream_c=120.0, downstream_c=124.0) == []


def test_no_readings_raise_no_doubt() -> None:
    assert _doubts(TrapCondition.WORKING) == []
