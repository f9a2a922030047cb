"""Live steam through an orifice: Napier's equation and the isentropic nozzle."""

import itertools

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from service.physics.orifice import (
    INCH_M,
    NAPIER_KG_PER_S_M2_PA,
    POUND_KG,
    FlowMethod,
    FlowRegime,
    isentropic_nozzle_flux,
    live_steam,
    napier_steam_flow_kg_h,
    nozzle_correction,
    orifice_area_m2,
    steam_discharge,
)
from service.physics.states import state_from_quality, state_from_temperature
from service.physics.units import convert

# US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": its leaking-trap table fits
# W [lb/h] = 29.45 * D^2 [in] * p1 [psia], Napier (W [lb/h] = 3600 * pi/4 * D^2 * p1 / 70)
# at this discharge coefficient.
DOE_TABLE_DISCHARGE_COEFFICIENT = 29.45 / (3600.0 * 3.141592653589793 / 4.0 / 70.0)


def test_napier_constant_in_si() -> None:
    # Napier: 1/70 lb/(s in2 psia) is 1.4567e-3 kg/(s m2 Pa) (Napier 1866; API 520 Part I
    # (2014) 5.7).
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
    # Two methods cross-checked: Napier (1866) against an IF97 isentropic nozzle; for dry
    # saturated steam at 15-300 psig they agree within 4 % (seen); the bound is 5 %.
    inlet = convert(pressure_psig, "psig", "kPa(abs)")
    flux = isentropic_nozzle_flux(state_from_quality(inlet, 1.0), 101.325)
    assert flux.regime is FlowRegime.CHOKED
    nozzle_kg_h = flux.mass_flux_kg_s_m2 * orifice_area_m2(5.0) * 3600.0
    assert nozzle_kg_h == pytest.approx(napier_steam_flow_kg_h(5.0, inlet, 1.0), rel=0.05)


@pytest.mark.parametrize("pressure_kpa_abs", [200.0, 1000.0, 5000.0])
def test_critical_pressure_ratio_of_saturated_steam_is_about_0_58(
    pressure_kpa_abs: float,
) -> None:
    # Common practice (no single source): about 0.58 for saturated steam.
    flux = isentropic_nozzle_flux(state_from_quality(pressure_kpa_abs, 1.0), 1.0)
    assert flux.throat_pressure_kpa_abs / pressure_kpa_abs == pytest.approx(0.58, abs=0.01)


def test_superheated_steam_chokes_near_0_55() -> None:
    # Common practice (no single source): about 0.55 for superheated steam.
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


def test_trap_discharge_is_napier_when_choked_and_corrected_otherwise() -> None:
    choked = steam_discharge(5.0, 1101.325, 101.325, 0.7)
    assert (choked.regime, choked.method) == (FlowRegime.CHOKED, FlowMethod.NAPIER)
    subcritical = steam_discharge(5.0, 201.325, 151.325, 0.7)
    assert subcritical.regime is FlowRegime.SUBCRITICAL
    assert subcritical.method is FlowMethod.NAPIER_NOZZLE_CORRECTED
    assert 0.0 < subcritical.flow_kg_h < napier_steam_flow_kg_h(5.0, 201.325, 0.7)


def test_no_step_where_the_flow_stops_being_choked() -> None:
    # The flow through an orifice is continuous in the back pressure (common practice).
    # Around the nozzle's critical pressure (about 577 kPa from 1000 kPa) the flow may not
    # jump; a fixed switch at 0.58 between Napier and the nozzle stepped by 4 %.
    flows = [steam_discharge(5.0, 1000.0, p2, 1.0).flow_kg_h for p2 in (570.0, 576.0, 578.0, 590.0)]
    napier = napier_steam_flow_kg_h(5.0, 1000.0, 1.0)
    assert flows[0] == pytest.approx(napier, rel=1e-12)
    assert all(abs(b - a) / a < 0.002 for a, b in itertools.pairwise(flows))
    assert flows == sorted(flows, reverse=True)


def test_the_fast_choked_path_gives_the_nozzles_answer() -> None:
    # Below p2/p1 = 0.5 the nozzle is not searched; it would say the same.
    factor, regime = nozzle_correction(1000.0, 400.0)
    assert (factor, regime) == (1.0, FlowRegime.CHOKED)


@pytest.mark.parametrize("pressure_psia", [1600.0, 2000.0, 2400.0, 2800.0, 3000.0])
def test_above_1500_psia_the_nozzle_correction_agrees_with_api_520_kn(
    pressure_psia: float,
) -> None:
    # API 520 Part I (2014), 5.7: Napier's flow times KN = (0.1906 P1 - 1000) /
    # (0.2292 P1 - 1061), P1 in psia, 1500-3200 psia (the formula recalled from memory).
    # The IF97 nozzle's own ratio agrees within 3 % to 3000 psia (seen: 0.4-2.4 %); near
    # the critical point (3200 psia) the equilibrium nozzle and KN part (seen: 15 %).
    knapier = (0.1906 * pressure_psia - 1000.0) / (0.2292 * pressure_psia - 1061.0)
    factor, regime = nozzle_correction(convert(pressure_psia, "psia", "kPa(abs)"), 101.325)
    assert regime is FlowRegime.CHOKED
    assert factor == pytest.approx(knapier, rel=0.03)


def test_no_step_at_1500_psia() -> None:
    limit_kpa = convert(1500.0, "psia", "kPa(abs)")
    below = steam_discharge(3.0, limit_kpa * (1 - 1e-9), 101.325, 1.0).flow_kg_h
    above = steam_discharge(3.0, limit_kpa * (1 + 1e-9), 101.325, 1.0).flow_kg_h
    assert above == pytest.approx(below, rel=1e-6)
    assert above >= below


def _coolprop_choked_flux(pressure_kpa: float, temperature_c: float | None) -> float:
    """An isentropic equilibrium nozzle written afresh on CoolProp's IAPWS-95."""
    from CoolProp.CoolProp import PropsSI
    from scipy.optimize import minimize_scalar

    p1 = pressure_kpa * 1000.0
    if temperature_c is None:
        h1, s1 = (PropsSI(name, "P", p1, "Q", 1.0, "Water") for name in ("H", "S"))
    else:
        h1, s1 = (PropsSI(name, "P", p1, "T", temperature_c + 273.15, "Water") for name in "HS")

    def flux(pt: float) -> float:
        ht = PropsSI("H", "P", pt, "S", s1, "Water")
        rho = PropsSI("D", "P", pt, "S", s1, "Water")
        return float(rho * (2.0 * (h1 - ht)) ** 0.5)

    best = minimize_scalar(lambda pt: -flux(pt), bounds=(0.3 * p1, 0.8 * p1), method="bounded")
    return -float(best.fun)


@pytest.mark.parametrize("steam_temperature_c", [200.0, 250.0, 300.0, 400.0])
def test_superheat_correction_agrees_with_a_coolprop_nozzle(steam_temperature_c: float) -> None:
    # Reference library: CoolProp 6 (IAPWS-95), the same nozzle model built independently.
    # Superheated steam passes less mass than saturated at the same pressure.
    factor, _ = nozzle_correction(1000.0, 101.325, steam_temperature_c)
    expected = _coolprop_choked_flux(1000.0, steam_temperature_c) / _coolprop_choked_flux(
        1000.0, None
    )
    assert factor == pytest.approx(expected, rel=2e-3)
    assert factor < 1.0


def test_steam_below_saturation_is_not_live_steam() -> None:
    with pytest.raises(ValueError, match="below the saturation temperature"):
        live_steam(1000.0, 150.0)
    # Within a hundredth of a kelvin of saturation it is taken as saturated.
    saturated = live_steam(1000.0, None)
    assert live_steam(1000.0, 179.886) == saturated


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
        steam_discharge(5.0, 500.0, 600.0, 0.7)


# From 1 kPa to just below the critical point, the whole saturation range the program takes.
inlet_pressures = st.floats(min_value=1.0, max_value=22_000.0)
fractions = st.floats(min_value=0.01, max_value=0.99)
nudges = st.floats(min_value=1e-4, max_value=0.05)


@settings(max_examples=150, deadline=None)
@given(inlet=inlet_pressures, ratio=fractions, nudge=nudges)
def test_flow_never_falls_as_the_inlet_rises_or_the_return_falls(
    inlet: float, ratio: float, nudge: float
) -> None:
    # Common practice (a physical law of nozzles): more driving pressure, no less flow.
    outlet = inlet * ratio
    flow = steam_discharge(3.0, inlet, outlet, 1.0).flow_kg_h
    higher_inlet = min(inlet * (1.0 + nudge), 22_060.0)
    assert steam_discharge(3.0, higher_inlet, outlet, 1.0).flow_kg_h >= flow * (1.0 - 1e-9)
    assert steam_discharge(3.0, inlet, outlet * (1.0 - nudge), 1.0).flow_kg_h >= flow * (1.0 - 1e-9)
