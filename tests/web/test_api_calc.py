"""The calculation endpoints: flash and trap loss, and every 422 the issue lists."""

import math

import pytest
from fastapi.testclient import TestClient

from service.physics.annual import Economics
from service.physics.conditions import TrapCondition
from service.physics.orifice import INCH_M, POUND_KG
from service.physics.trap_loss import CondensateDestination, TrapService, trap_loss
from service.physics.units import convert

# US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": its table's basis,
# W [lb/h] = 29.45 D^2 [in] p1 [psia], is Napier at this discharge coefficient.
DOE_TABLE_DISCHARGE_COEFFICIENT = 29.45 / (3600.0 * math.pi / 4.0 / 70.0)

TRAP = {
    "condition": "blow_through",
    "inlet_pressure_kpa_g": 1000.0,
    "return_pressure_kpa_g": 0.0,
    "orifice_diameter_mm": 4.0,
    "hours_per_year": 8000.0,
    "steam_cost_per_tonne": 30.0,
}


def test_flash_matches_the_doe_tip_sheet(client: TestClient) -> None:
    # US DOE Steam Tip Sheet "Flash High-Pressure Condensate to Regenerate Low-Pressure
    # Steam": 150 psig condensate flashed to 30 psig, 10.3 % vaporizes.
    answer = client.post(
        "/api/v1/calc/flash",
        json={
            "inlet_pressure_kpa_g": convert(150.0, "psig", "kPa(g)"),
            "return_pressure_kpa_g": convert(30.0, "psig", "kPa(g)"),
        },
    )
    assert answer.status_code == 200
    body = answer.json()
    assert body["flash_fraction"] == pytest.approx(0.103, abs=5e-4)
    assert set(body) >= {
        "inlet_enthalpy_kj_kg",
        "return_hf_kj_kg",
        "return_hfg_kj_kg",
        "inlet_saturation_temperature_c",
        "return_saturation_temperature_c",
    }


def test_subcooled_condensate_flash(client: TestClient) -> None:
    answer = client.post(
        "/api/v1/calc/flash",
        json={
            "inlet_pressure_kpa_g": 1000.0,
            "return_pressure_kpa_g": 0.0,
            "condensate_temperature_c": 95.0,
        },
    )
    assert answer.json()["flash_fraction"] == 0.0


def test_trap_loss_matches_the_doe_worked_example(client: TestClient) -> None:
    # US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": a 1/8 in orifice at
    # 150 psig passes 75.8 lb/h; at $10.00 per 1000 lb and 8760 h that is $6,640 a year.
    # The steam is lost to atmosphere (the tip sheet prices it as steam made again).
    answer = client.post(
        "/api/v1/calc/trap-loss",
        json={
            "condition": "blow_through",
            "inlet_pressure_kpa_g": convert(150.0, "psig", "kPa(g)"),
            "return_pressure_kpa_g": 0.0,
            "condensate_destination": "vented_receiver",
            "orifice_diameter_mm": INCH_M * 1000.0 / 8.0,
            "hours_per_year": 8760.0,
            "discharge_coefficient": DOE_TABLE_DISCHARGE_COEFFICIENT,
            "steam_cost_per_tonne": convert(10.0, "per 1000 lb", "per t"),
        },
    )
    assert answer.status_code == 200
    body = answer.json()
    assert body["steam_loss_kg_h"] / POUND_KG == pytest.approx(75.8, abs=0.05)
    assert body["annual_cost"] == pytest.approx(6640.0, abs=5.0)
    assert body["flow_regime"] == "choked"
    assert body["method"] == "napier"


def test_trap_loss_carries_every_contract_field_and_equals_the_core(client: TestClient) -> None:
    request = {**TRAP, "condensate_load_kg_h": 80.0, "condensate_destination": "vented_receiver"}
    body = client.post("/api/v1/calc/trap-loss", json=request).json()
    core = trap_loss(
        TrapService(
            1101.325,
            101.325,
            4.0,
            TrapCondition.BLOW_THROUGH,
            8000.0,
            80.0,
            CondensateDestination.VENTED_RECEIVER,
        ),
        Economics(steam_cost_per_tonne=30.0),
    )
    assert body["steam_loss_kg_h"] == core.steam_loss_kg_h.typical
    assert body["steam_loss_kg_h_low"] == core.steam_loss_kg_h.low
    assert body["steam_loss_kg_h_high"] == core.steam_loss_kg_h.high
    assert body["annual_steam_loss_t"] == core.live_steam.mass_t
    assert body["annual_energy_loss_gj"] == core.live_steam.energy_gj
    assert body["annual_fuel_gj"] == core.live_steam.fuel_gj
    assert body["annual_cost"] == core.live_steam.cost
    assert body["annual_co2_t"] == core.live_steam.co2_t
    assert body["flash_vented_kg_h"] == core.condensate.flash_vented_kg_h > 0
    assert body["annual_flash_cost"] == core.condensate.flash_vented.cost
    assert body["condensate_to_drain_kg_h"] == 0.0
    assert body["annual_total_cost"] == core.total.cost
    for figure in ("steam_loss_kg_h", "annual_cost", "annual_co2_t", "annual_total_cost"):
        assert body[f"{figure}_low"] < body[figure] < body[f"{figure}_high"]


def test_trap_loss_on_the_fuel_basis(client: TestClient) -> None:
    body = client.post(
        "/api/v1/calc/trap-loss",
        json={
            **TRAP,
            "condensate_destination": "drain",
            "steam_cost_per_tonne": None,
            "fuel_price_per_gj": 8.0,
            "water_and_treatment_cost_per_tonne": 1.5,
            "boiler_efficiency": 0.85,
        },
    ).json()
    assert body["annual_cost"] == pytest.approx(
        body["annual_fuel_gj"] * 8.0 + body["annual_steam_loss_t"] * 1.5
    )
    assert body["annual_fuel_gj"] == pytest.approx(body["annual_energy_loss_gj"] / 0.85)


def test_trap_loss_without_prices_gives_no_cost(client: TestClient) -> None:
    body = client.post("/api/v1/calc/trap-loss", json={**TRAP, "steam_cost_per_tonne": None}).json()
    assert body["annual_cost"] is None
    assert body["annual_co2_t"] > 0


def test_plugged_trap_is_a_risk_not_a_loss(client: TestClient) -> None:
    body = client.post("/api/v1/calc/trap-loss", json={**TRAP, "condition": "plugged"}).json()
    assert body["steam_loss_kg_h"] == 0.0
    assert body["annual_cost"] == 0.0
    assert "backs up" in body["risk"]


def test_drained_condensate_is_reported_on_its_own_line(client: TestClient) -> None:
    body = client.post(
        "/api/v1/calc/trap-loss",
        json={
            **TRAP,
            "condition": "working",
            "condensate_load_kg_h": 100.0,
            "condensate_destination": "drain",
        },
    ).json()
    assert body["condensate_to_drain_kg_h"] == 100.0
    assert body["annual_condensate_to_drain_t"] == pytest.approx(800.0)
    assert body["annual_drain_cost"] > 0
    assert body["annual_total_cost"] == body["annual_drain_cost"]


def _bad(**changes: object) -> dict[str, object]:
    return {**TRAP, **changes}


@pytest.mark.parametrize(
    ("body", "field"),
    [
        (_bad(inlet_pressure_kpa_g="high"), "inlet_pressure_kpa_g"),
        (_bad(orifice_diameter_mm="3 mm"), "orifice_diameter_mm"),
        (_bad(inlet_pressure_kpa_g=-200.0), "inlet_pressure_kpa_g"),
        (_bad(inlet_pressure_kpa_g=22000.0), "inlet_pressure_kpa_g"),
        (_bad(return_pressure_kpa_g=-101.0), "return_pressure_kpa_g"),
        (_bad(return_pressure_kpa_g=1000.0), "return_pressure_kpa_g"),
        (_bad(return_pressure_kpa_g=1500.0), "return_pressure_kpa_g"),
        (_bad(orifice_diameter_mm=0.0), "orifice_diameter_mm"),
        (_bad(orifice_diameter_mm=-2.0), "orifice_diameter_mm"),
        (_bad(orifice_diameter_mm=60.0), "orifice_diameter_mm"),
        (_bad(hours_per_year=9000.0), "hours_per_year"),
        (_bad(hours_per_year=-1.0), "hours_per_year"),
        (_bad(boiler_efficiency=0.0), "boiler_efficiency"),
        (_bad(boiler_efficiency=1.1), "boiler_efficiency"),
        (_bad(condition="broken"), "condition"),
        (_bad(condition="working", loss_factor=0.5), "loss_factor"),
        (_bad(loss_factor=1.5), "loss_factor"),
        (_bad(fuel_price_per_gj=5.0), "fuel_price_per_gj"),
        (_bad(discharge_coefficient=0.9), "discharge_coefficient"),
        (_bad(discharge_coefficient=0.0), "discharge_coefficient"),
        (_bad(condensate_destination="river"), "condensate_destination"),
        (_bad(condensate_load_kg_h=-5.0), "condensate_load_kg_h"),
        (_bad(atmospheric_pressure_kpa=0.0), "atmospheric_pressure_kpa"),
        (_bad(makeup_water_temperature_c=120.0), "makeup_water_temperature_c"),
        (_bad(surprise=1), "surprise"),
        ({key: value for key, value in TRAP.items() if key != "hours_per_year"}, "hours_per_year"),
    ],
)
def test_bad_trap_loss_requests_answer_422_naming_the_field(
    client: TestClient, body: dict[str, object], field: str
) -> None:
    answer = client.post("/api/v1/calc/trap-loss", json=body)
    assert answer.status_code == 422
    detail = answer.json()["detail"]
    assert field in [entry["loc"][-1] for entry in detail]
    assert all(entry["msg"] for entry in detail)


@pytest.mark.parametrize("number", [b"NaN", b"Infinity", b"-Infinity"])
def test_non_finite_numbers_answer_422_and_keep_what_was_typed(
    client: TestClient, number: bytes
) -> None:
    raw = (
        b'{"condition": "leaking", "inlet_pressure_kpa_g": ' + number + b", "
        b'"return_pressure_kpa_g": 0, "orifice_diameter_mm": 3, "hours_per_year": 100}'
    )
    answer = client.post(
        "/api/v1/calc/trap-loss", content=raw, headers={"content-type": "application/json"}
    )
    assert answer.status_code == 422
    entry = answer.json()["detail"][0]
    assert entry["loc"] == ["body", "inlet_pressure_kpa_g"]
    assert entry["input"] in {"nan", "inf", "-inf"}


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"inlet_pressure_kpa_g": 100.0, "return_pressure_kpa_g": 100.0}, "return_pressure_kpa_g"),
        ({"inlet_pressure_kpa_g": 30000.0, "return_pressure_kpa_g": 0.0}, "inlet_pressure_kpa_g"),
        (
            {
                "inlet_pressure_kpa_g": 100.0,
                "return_pressure_kpa_g": 0.0,
                "condensate_temperature_c": 150.0,
            },
            "condensate_temperature_c",
        ),
        ({"inlet_pressure_kpa_g": 100.0}, "return_pressure_kpa_g"),
    ],
)
def test_bad_flash_requests_answer_422_naming_the_field(
    client: TestClient, body: dict[str, object], field: str
) -> None:
    answer = client.post("/api/v1/calc/flash", json=body)
    assert answer.status_code == 422
    assert field in [entry["loc"][-1] for entry in answer.json()["detail"]]


def test_malformed_json_answers_422(client: TestClient) -> None:
    answer = client.post(
        "/api/v1/calc/flash", content=b"{not json", headers={"content-type": "application/json"}
    )
    assert answer.status_code == 422


def test_flash_recovery_matches_the_doe_worked_example(client: TestClient) -> None:
    # US DOE Steam Tip Sheet #12 "Flash High-Pressure Condensate to Regenerate
    # Low-Pressure Steam" (January 2006): 5,000 lb/h of 150 psig condensate flashed at
    # 30 psig, make-up water at 70 degF, continuous operation, steam at $10.00/MMBtu:
    # 10.3 % flashes, 515 lb/h, and 515 x (1,171.9 - 38.0) Btu/lb x 8,760 h x $10/MMBtu
    # = $51,156 a year. IF97 gives 10.28 % and hg(30 psig) 0.04 % below the ASME table's,
    # so the tolerance is 0.5 %.
    answer = client.post(
        "/api/v1/calc/flash-recovery",
        json={
            "condensate_load_kg_h": convert(5000.0, "lb/h", "kg/h"),
            "inlet_pressure_kpa_g": convert(150.0, "psig", "kPa(g)"),
            "vessel_pressure_kpa_g": convert(30.0, "psig", "kPa(g)"),
            "hours_per_year": 8760.0,
            "makeup_water_temperature_c": convert(70.0, "°F", "°C"),
            "steam_energy_price_per_gj": convert(10.0, "per MMBtu", "per GJ"),
        },
    )
    assert answer.status_code == 200, answer.text
    body = answer.json()
    assert body["flash_fraction"] == pytest.approx(0.103, abs=0.0005)
    assert convert(body["recovered_steam_kg_h"], "kg/h", "lb/h") == pytest.approx(515.0, rel=0.005)
    assert body["annual_value"] == pytest.approx(51_156.0, rel=0.005)
    assert convert(body["annual_energy_gj"], "GJ", "MMBtu") == pytest.approx(5115.6, rel=0.005)
    assert "discharge against" in body["caution"]


def test_flash_recovery_on_the_fuel_basis_and_its_refusals(client: TestClient) -> None:
    request = {
        "condensate_load_kg_h": 1000.0,
        "inlet_pressure_kpa_g": 1000.0,
        "vessel_pressure_kpa_g": 100.0,
        "hours_per_year": 8000.0,
        "fuel_price_per_gj": 9.0,
        "boiler_efficiency": 0.8,
    }
    body = client.post("/api/v1/calc/flash-recovery", json=request).json()
    assert body["annual_fuel_gj"] == pytest.approx(body["annual_energy_gj"] / 0.8)
    assert body["annual_value"] == pytest.approx(body["annual_fuel_gj"] * 9.0)
    unpriced = {**request, "fuel_price_per_gj": None}
    assert client.post("/api/v1/calc/flash-recovery", json=unpriced).json()["annual_value"] is None
    above = client.post(
        "/api/v1/calc/flash-recovery", json={**request, "vessel_pressure_kpa_g": 1200.0}
    )
    assert above.status_code == 422
    assert above.json()["detail"][0]["loc"][-1] == "vessel_pressure_kpa_g"
    both = client.post(
        "/api/v1/calc/flash-recovery", json={**request, "steam_energy_price_per_gj": 5.0}
    )
    assert both.status_code == 422


def test_trap_loss_takes_an_inlet_temperature_and_a_superheated_line(client: TestClient) -> None:
    vented = {**TRAP, "condensate_load_kg_h": 100.0, "condensate_destination": "vented_receiver"}
    saturated = client.post("/api/v1/calc/trap-loss", json=vented).json()
    cooler = client.post(
        "/api/v1/calc/trap-loss", json={**vented, "inlet_temperature_c": 150.0}
    ).json()
    assert cooler["flash_fraction"] < saturated["flash_fraction"]
    thermostatic = client.post(
        "/api/v1/calc/trap-loss", json={**vented, "trap_type": "thermostatic_bimetallic"}
    ).json()
    assert thermostatic["flash_fraction"] < saturated["flash_fraction"]
    superheated = client.post(
        "/api/v1/calc/trap-loss", json={**vented, "steam_temperature_c": 260.0}
    ).json()
    assert superheated["steam_loss_kg_h"] < saturated["steam_loss_kg_h"]
    too_cold = client.post("/api/v1/calc/trap-loss", json={**vented, "steam_temperature_c": 150.0})
    assert too_cold.status_code == 422
    assert too_cold.json()["detail"][0]["loc"][-1] == "steam_temperature_c"
