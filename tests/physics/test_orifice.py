"""Live steam through an orifice: Napier's equation and the isentropic nozzle."""

import pytest

from service.physics.orifice import (
    INCH_M,
    NAPIER_KG_PER_S_M2_PA,
    POUND_KG,
    FlowMethod,
    FlowRegime,
    isentropic_nozzle_flux,
    napier_steam_flow_kg_h,
    orifice_area_m2,
    saturated_steam_discharge,
)
from service.physics.states import state_from_quality, state_from_temperature
from service.physics.units import convert

# US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": its leaking-trap table fits
# W [lb/h] = 29.45 * D^2 [in] * p1 [psia], Napier (W [lb/h] = 3600 * pi/4 * D^2 * p1 / 70)
# at this discharge coefficient.
DOE_TABLE_DISCHARGE_COEFFICIENT = 29.45 / (3600.0 * 3.141592653589793 / 4.0 / 70.0)


def test_napier_constant_in_si() -> None:
    # Napier: 1/70 lb/(s in2 psia) is 1.4567e-3 kg/(s m2 Pa) (shared/DOMAIN.md).
    assert pytest.approx(1.4567e-3, rel=5e-5) == NAPIER_KG_PER_S_M2_PA


def test_doe_tip_sheet_eighth_inch_orifice_at_150_psig() -> None:
    # US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": 1/8 in orifice, 150 psig,
    # 75.8 lb/h of steam lost.
    flow_kg_h = napier_steam_flow_kg_h(
        INCH_M * 1000.0 / 8.0, convert(150.0, "psig", "kPa(abs)"), DOE_TABLE_DISCHARGE_COEFFICIENT
    )
    assert flow_kg_h / POUND_KG == pytest.approx(75.8, abs=0.05)


@pytest.mark.parametrize("pressure_psig", [15.0, 30.0, 50.0, 100.0, 150.0, 200.0, 300.0])
def test_napier_agrees_with_the_isentropic_nozzle_when_choked(pressure_psig: float) -> None:
    # shared/DOMAIN.md: for dry saturated steam at 15-300 psig the two agree within 4 %;
    # the bound is 5 %.
    inlet = convert(pressure_psig, "psig", "kPa(abs)")
    flux = isentropic_nozzle_flux(state_from_quality(inlet, 1.0), 101.325)
    assert flux.regime is FlowRegime.CHOKED
    nozzle_kg_h = flux.mass_flux_kg_s_m2 * orifice_area_m2(5.0) * 3600.0
    assert nozzle_kg_h == pytest.approx(napier_steam_flow_kg_h(5.0, inlet, 1.0), rel=0.05)


@pytest.mark.parametrize("pressure_kpa_abs", [200.0, 1000.0, 5000.0])
def test_critical_pressure_ratio_of_saturated_steam_is_about_0_58(
    pressure_kpa_abs: float,
) -> None:
    # Common practice (shared/DOMAIN.md): about 0.58 for saturated steam.
    flux = isentropic_nozzle_flux(state_from_quality(pressure_kpa_abs, 1.0), 1.0)
    assert flux.throat_pressure_kpa_abs / pressure_kpa_abs == pytest.approx(0.58, abs=0.01)


def test_superheated_steam_chokes_near_0_55() -> None:
    # Common practice (shared/DOMAIN.md): about 0.55 for superheated steam.
    flux = isentropic_nozzle_flux(state_from_temperature(1000.0, 350.0), 100.0)
    assert flux.throat_pressure_kpa_abs / 1000.0 == pytest.approx(0.55, abs=0.01)


def test_wet_steam_passes_more_mass_than_dry() -> None:
    dry = isentropic_nozzle_flux(state_from_quality(1000.0, 1.0), 100.0)
    wet = isentropic_nozzle_flux(state_from_quality(1000.0, 0.8), 100.0)
    assert wet.mass_flux_kg_s_m2 > dry.mass_flux_kg_s_m2


def test_nozzle_flux_falls_as_the_back_pressure_rises_above_critical() -> None:
    inlet = state_from_quality(1000.0, 1.0)
    fluxes = [isentropic_nozzle_flux(inlet, back).mass_flux_kg_s_m2 for back in (600, 800, 950)]
    assert fluxes == sorted(fluxes, reverse=True)
    assert isentropic_nozzle_flux(inlet, 800).regime is FlowRegime.SUBCRITICAL


def test_trap_discharge_picks_napier_when_choked_and_the_nozzle_otherwise() -> None:
    choked = saturated_steam_discharge(5.0, 1101.325, 101.325, 0.7)
    assert (choked.regime, choked.method) == (FlowRegime.CHOKED, FlowMethod.NAPIER)
    subcritical = saturated_steam_discharge(5.0, 201.325, 151.325, 0.7)
    assert subcritical.regime is FlowRegime.SUBCRITICAL
    assert subcritical.method is FlowMethod.ISENTROPIC_NOZZLE
    assert 0.0 < subcritical.flow_kg_h < napier_steam_flow_kg_h(5.0, 201.325, 0.7)


def test_the_two_methods_meet_near_the_critical_ratio() -> None:
    below = saturated_steam_discharge(5.0, 1000.0, 579.9, 1.0).flow_kg_h
    above = saturated_steam_discharge(5.0, 1000.0, 580.1, 1.0).flow_kg_h
    assert above == pytest.approx(below, rel=0.03)


@pytest.mark.parametrize(
    ("diameter", "message"),
    [
        (0.0, "above zero"),
        (-1.0, "above zero"),
        (51.0, "larger than a steam trap's"),
        (float("nan"), "above zero"),
    ],
)
def test_implausible_orifice_is_refused(diameter: float, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        orifice_area_m2(diameter)


def test_back_pressure_at_or_above_inlet_is_refused() -> None:
    with pytest.raises(ValueError, match="below the inlet"):
        isentropic_nozzle_flux(state_from_quality(500.0, 1.0), 500.0)
    with pytest.raises(ValueError, match="below the inlet"):
        saturated_steam_discharge(5.0, 500.0, 600.0, 0.7)
