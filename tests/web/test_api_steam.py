"""The steam endpoints: saturation and state, and their 422 answers."""

import pytest
from fastapi.testclient import TestClient

from service.physics import steam_tables


def test_health_answers_ok_with_the_version(client: TestClient) -> None:
    answer = client.get("/api/v1/health")
    assert answer.status_code == 200
    assert answer.json()["status"] == "ok"
    assert answer.json()["version"]


def test_saturation_by_gauge_pressure_uses_the_given_atmosphere(client: TestClient) -> None:
    answer = client.get(
        "/api/v1/steam/saturation",
        params={"pressure_kpa_g": 900.0, "atmospheric_pressure_kpa": 100.0},
    )
    assert answer.status_code == 200
    body = answer.json()
    expected = steam_tables.saturation_at_pressure(1000.0)
    assert body["pressure_kpa_abs"] == 1000.0
    assert body["hf_kj_kg"] == expected.hf_kj_kg
    assert body["hfg_kj_kg"] == pytest.approx(body["hg_kj_kg"] - body["hf_kj_kg"])
    assert set(body) >= {"temperature_c", "vf_m3_kg", "vg_m3_kg"}


def test_saturation_by_temperature_matches_iapws_table_35(client: TestClient) -> None:
    # IAPWS R7-97(2012), Table 35: psat(500 K) = 2.63889776 MPa.
    answer = client.get("/api/v1/steam/saturation", params={"temperature_c": 500.0 - 273.15})
    assert answer.json()["pressure_kpa_abs"] == pytest.approx(2638.89776, abs=5e-6)


@pytest.mark.parametrize(
    ("params", "field"),
    [
        ({"pressure_kpa_g": "ten"}, "pressure_kpa_g"),
        ({"pressure_kpa_g": "nan"}, "pressure_kpa_g"),
        ({"pressure_kpa_g": "inf"}, "pressure_kpa_g"),
        ({"pressure_kpa_g": 22000.0}, "pressure_kpa_g"),
        ({"pressure_kpa_abs": -5.0}, "pressure_kpa_abs"),
        ({"pressure_kpa_abs": 0.1}, "pressure_kpa_abs"),
        ({"temperature_c": 400.0}, "temperature_c"),
        ({"pressure_kpa_g": 1.0, "atmospheric_pressure_kpa": 20.0}, "atmospheric_pressure_kpa"),
    ],
)
def test_bad_saturation_queries_answer_422_naming_the_field(
    client: TestClient, params: dict[str, object], field: str
) -> None:
    answer = client.get("/api/v1/steam/saturation", params=params)  # type: ignore[arg-type]
    assert answer.status_code == 422
    assert field in [entry["loc"][-1] for entry in answer.json()["detail"]]


@pytest.mark.parametrize("params", [{}, {"pressure_kpa_g": 1.0, "temperature_c": 100.0}])
def test_saturation_needs_exactly_one_input(client: TestClient, params: dict[str, object]) -> None:
    answer = client.get("/api/v1/steam/saturation", params=params)  # type: ignore[arg-type]
    assert answer.status_code == 422
    assert "exactly one of" in answer.json()["detail"][0]["msg"]


@pytest.mark.parametrize(
    ("body", "phase", "quality"),
    [
        ({"pressure_kpa_abs": 1000.0, "quality": 0.5}, "wet_steam", 0.5),
        ({"pressure_kpa_g": 0.0, "quality": 0.0}, "saturated_liquid", 0.0),
        ({"pressure_kpa_abs": 1000.0, "temperature_c": 50.0}, "subcooled_liquid", None),
        ({"pressure_kpa_abs": 1000.0, "temperature_c": 300.0}, "superheated_steam", None),
        (
            {"pressure_kpa_abs": 1000.0, "enthalpy_kj_kg": 2777.1195376846617},
            "saturated_vapour",
            1.0,
        ),
    ],
)
def test_state_reports_phase_and_quality(
    client: TestClient, body: dict[str, float], phase: str, quality: float | None
) -> None:
    answer = client.post("/api/v1/steam/state", json=body)
    assert answer.status_code == 200
    assert answer.json()["phase"] == phase
    assert answer.json()["quality"] == quality


def test_subcooled_state_reports_the_textbook_enthalpy_beside_if97(client: TestClient) -> None:
    body = client.post(
        "/api/v1/steam/state", json={"pressure_kpa_abs": 3000.0, "temperature_c": 26.85}
    ).json()
    # IAPWS R7-97(2012), Table 5: h(3 MPa, 300 K) = 115.331273 kJ/kg.
    assert body["enthalpy_kj_kg"] == pytest.approx(115.331273, abs=5e-7)
    assert body["textbook_enthalpy_kj_kg"] == pytest.approx(112.5, abs=0.5)


@pytest.mark.parametrize(
    ("body", "field"),
    [
        ({"pressure_kpa_abs": 1000.0}, None),
        ({"pressure_kpa_abs": 1000.0, "quality": 0.5, "temperature_c": 20.0}, None),
        ({"pressure_kpa_abs": 1000.0, "pressure_kpa_g": 900.0, "quality": 0.5}, None),
        ({"quality": 0.5}, None),
        ({"pressure_kpa_abs": 1000.0, "quality": 1.5}, "quality"),
        ({"pressure_kpa_abs": -1.0, "quality": 0.5}, "pressure_kpa_abs"),
        ({"pressure_kpa_abs": 1000.0, "enthalpy_kj_kg": 99999.0}, "enthalpy_kj_kg"),
        ({"pressure_kpa_abs": 1000.0, "temperature_c": 2000.0}, "temperature_c"),
        ({"pressure_kpa_abs": 1000.0, "quality": 0.5, "colour": "red"}, "colour"),
    ],
)
def test_bad_state_requests_answer_422(
    client: TestClient, body: dict[str, object], field: str | None
) -> None:
    answer = client.post("/api/v1/steam/state", json=body)
    assert answer.status_code == 422
    detail = answer.json()["detail"]
    if field is None:
        assert "exactly one of" in detail[0]["msg"]
    else:
        assert field in [entry["loc"][-1] for entry in detail]


def test_state_at_the_saturation_temperature_is_refused_with_a_reason(client: TestClient) -> None:
    saturation = steam_tables.saturation_at_pressure(1000.0)
    answer = client.post(
        "/api/v1/steam/state",
        json={"pressure_kpa_abs": 1000.0, "temperature_c": saturation.temperature_c},
    )
    assert answer.status_code == 422
    assert answer.json()["detail"][0]["loc"] == ["body", "temperature_c"]
    assert "give quality or enthalpy" in answer.json()["detail"][0]["msg"]


def test_an_error_no_route_caught_is_a_logged_500_not_the_requests_fault(
    caplog: pytest.LogCaptureFixture,
) -> None:
    # A ValueError no route tied to a field is the program's fault: blaming the request
    # with a 422 would send the person looking for a typo that is not there.
    from service.web.app import create_app

    app = create_app()

    @app.get("/api/v1/boom")
    def boom() -> None:
        raise ValueError("pressure out of range")

    @app.get("/boom")
    def page_boom() -> None:
        raise ValueError("pressure out of range")

    client = TestClient(app, raise_server_exceptions=False)
    with caplog.at_level("ERROR", logger="traptally"):
        answer = client.get("/api/v1/boom")
        page = client.get("/boom")
    assert answer.status_code == 500
    assert "nothing was saved" in answer.json()["detail"]
    assert "pressure out of range" not in answer.text
    assert page.status_code == 500
    assert page.headers["content-type"].startswith("text/html")
    assert "Something went wrong" in page.text
    assert [record.message for record in caplog.records] == [
        "unexpected error on GET /api/v1/boom",
        "unexpected error on GET /boom",
    ]
    assert "pressure out of range" in caplog.text


def test_a_field_error_no_form_caught_answers_a_page_to_a_person_and_json_to_the_api() -> None:
    from service.store.errors import FieldError
    from service.web.app import create_app

    app = create_app()

    def refuse() -> None:
        raise FieldError("inlet_pressure_kpa_g", "3000 kPa(g) is off the saturation line")

    app.get("/api/v1/refused")(refuse)
    app.get("/refused")(refuse)
    client = TestClient(app)
    api = client.get("/api/v1/refused")
    assert api.status_code == 422
    assert api.json()["detail"][0]["loc"] == ["body", "inlet_pressure_kpa_g"]
    page = client.get("/refused")
    assert page.status_code == 422
    assert page.headers["content-type"].startswith("text/html")
    # The field in words with its unit, not the program name inlet_pressure_kpa_g.
    assert "Inlet pressure (kPa(g)): 3000 kPa(g) is off the saturation line" in page.text
