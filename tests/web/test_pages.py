"""The pages: their context carries the API's numbers, and their forms keep what was
typed, say what is wrong beside the field, and store nothing when anything is wrong."""

import datetime as dt
import io
import re
from typing import Any

import pytest
from fastapi.testclient import TestClient
from openpyxl import load_workbook

from service.store.database import Database
from service.store.demo import load_demo


@pytest.fixture
def demo(store: Database, api: TestClient) -> dict[str, Any]:
    with store.writing() as session:
        site = load_demo(session=session)
    assert site is not None
    surveys = api.get(f"/api/v1/sites/{site.id}/surveys").json()["items"]
    return {
        "site": api.get(f"/api/v1/sites/{site.id}").json(),
        "latest": surveys[0],
        "earlier": surveys[1],
    }


def test_the_summary_page_carries_the_apis_numbers(api: TestClient, demo: dict[str, Any]) -> None:
    site_id = demo["site"]["id"]
    answer = api.get(f"/sites/{site_id}/summary")
    assert answer.status_code == 200
    assert answer.template.name == "summary.html"  # type: ignore[attr-defined]
    context = answer.context  # type: ignore[attr-defined]
    from_api = api.get(f"/api/v1/sites/{site_id}/summary").json()
    assert context["summary"].model_dump(mode="json") == from_api
    # The headline is the failure loss; installation losses stand apart, never summed in.
    shown = context["show"].money(from_api["annual_cost"])
    assert shown in answer.text
    installation = context["show"].money(from_api["totals"]["annual_installation_cost"])
    assert installation in answer.text
    total = from_api["annual_cost"] + from_api["totals"]["annual_installation_cost"]
    assert context["show"].money(total) not in answer.text
    assert context["comparison"].from_survey.id == demo["earlier"]["id"]
    for heading in (
        "Failure losses found in",
        "Repair list, quickest payback first",
        "Risks",
        "Where the failure losses are",
        "Installation losses: opportunities beyond repairs",
        "Assumptions and methods",
        "Before anyone acts on these figures",
        "Since Spring survey 2025",
    ):
        assert heading in answer.text
    # The screen's order is the API's and the CSV's: by payback on failure losses.
    paybacks = [item.payback_years for item in context["summary"].repair_list]
    assert paybacks == sorted(paybacks)
    ranked = api.get(f"/api/v1/sites/{site_id}/exports/repair-list.csv").text.splitlines()[1:]
    screen_tags = [item.tag for item in context["summary"].repair_list]
    assert [line.split(",")[1] for line in ranked] == screen_tags
    repair_section = answer.text.split('id="repairs-title"', 1)[1].split('id="risks-title"')[0]
    shown_tags = re.findall(r'<td><a href="/traps/\d+">([^<]+)</a></td>', repair_section)
    assert shown_tags == screen_tags[: len(shown_tags)]
    # The condition chart draws failure losses only: no "Working" bar.
    chart = answer.text.split("Yearly cost of failure losses, by condition found", 1)[1].split(
        "</figure>", 1
    )[0]
    assert ">Working<" not in chart


def test_the_report_is_the_summary_for_print(api: TestClient, demo: dict[str, Any]) -> None:
    site_id, survey_id = demo["site"]["id"], demo["earlier"]["id"]
    report = api.get(f"/sites/{site_id}/report", params={"survey_id": survey_id})
    assert report.template.name == "report.html"  # type: ignore[attr-defined]
    assert report.context["summary"].survey.id == survey_id  # type: ignore[attr-defined]
    assert "Steam trap survey report" in report.text
    assert 'media="print"' in report.text


def test_the_site_home_shows_the_headline_and_the_change(
    api: TestClient, demo: dict[str, Any]
) -> None:
    site_id = demo["site"]["id"]
    home = api.get(f"/sites/{site_id}")
    summary = api.get(f"/api/v1/sites/{site_id}/summary").json()
    show = home.context["show"]  # type: ignore[attr-defined]
    assert show.money(summary["annual_cost"]) in home.text
    assert show.money(summary["totals"]["annual_installation_cost"]) in home.text
    assert "a year less" in home.text
    assert "traps tested in both" in home.text
    assert f"{summary['failed_count']} of {summary['traps_tested']} tested" in home.text


def _form_page(api: TestClient, survey: dict[str, Any], trap_id: int) -> tuple[str, str]:
    page = api.get(f"/surveys/{survey['id']}/walk/traps/{trap_id}")
    assert page.status_code == 200
    key = re.search(r'name="idempotency_key" value="([0-9a-f]+)"', page.text)
    assert key is not None
    return page.text, key.group(1)


def _walk_survey(api: TestClient, site: dict[str, Any]) -> dict[str, Any]:
    answer = api.post(
        f"/sites/{site['id']}/surveys",
        data={"name": "Autumn 2026", "started_on": "2026-10-05"},
        follow_redirects=False,
    )
    assert answer.status_code == 303
    survey_id = int(answer.headers["location"].split("/")[2])
    return {"id": survey_id}


def test_a_finding_saved_twice_with_its_key_is_stored_once(
    api: TestClient, demo: dict[str, Any]
) -> None:
    survey = _walk_survey(api, demo["site"])
    trap_id = api.get(f"/api/v1/sites/{demo['site']['id']}/traps", params={"limit": 1}).json()[
        "items"
    ][0]["id"]
    _, key = _form_page(api, survey, trap_id)
    fields = {
        "idempotency_key": key,
        # The form carries the moment it was opened; without it each save is "now", and two
        # saves either side of a second would differ.
        "opened_at": dt.datetime.now(dt.UTC).replace(microsecond=0).isoformat(),
        "condition": "leaking",
        "method": "ultrasonic",
        "upstream_temperature": "181.5",
        "downstream_temperature": "104,5",
    }
    first = api.post(
        f"/surveys/{survey['id']}/walk/traps/{trap_id}", data=fields, follow_redirects=False
    )
    again = api.post(
        f"/surveys/{survey['id']}/walk/traps/{trap_id}", data=fields, follow_redirects=False
    )
    assert first.status_code == again.status_code == 303
    assert first.headers["location"] == again.headers["location"]
    stored = api.get(f"/api/v1/surveys/{survey['id']}/findings").json()
    assert stored["total"] == 1
    assert stored["items"][0]["downstream_temperature_c"] == 104.5
    following = api.get(first.headers["location"])
    assert "Saved on the server" in following.text
    assert "Leaking" in following.text


def test_a_bad_finding_keeps_what_was_typed_and_stores_nothing(
    api: TestClient, demo: dict[str, Any]
) -> None:
    survey = _walk_survey(api, demo["site"])
    trap_id = api.get(f"/api/v1/sites/{demo['site']['id']}/traps", params={"limit": 1}).json()[
        "items"
    ][0]["id"]
    _, key = _form_page(api, survey, trap_id)
    answer = api.post(
        f"/surveys/{survey['id']}/walk/traps/{trap_id}",
        data={
            "idempotency_key": key,
            "method": "ultrasonic",
            "upstream_temperature": "hot",
            "notes": "Lagging torn \u00e9 \u00fc",
            "downstream_temperature": "9e999",
        },
    )
    assert answer.status_code == 422
    assert answer.template.name == "finding_form.html"  # type: ignore[attr-defined]
    errors = answer.context["form"].errors  # type: ignore[attr-defined]
    assert set(errors) >= {"upstream_temperature", "downstream_temperature"}
    assert 'value="hot"' in answer.text
    assert "Lagging torn" in answer.text
    assert "is not a number" in answer.text
    assert api.get(f"/api/v1/surveys/{survey['id']}/findings").json()["total"] == 0
    nothing_chosen = api.post(
        f"/surveys/{survey['id']}/walk/traps/{trap_id}",
        data={"idempotency_key": key, "method": "ultrasonic"},
    )
    assert nothing_chosen.status_code == 422
    assert "condition" in nothing_chosen.context["form"].errors  # type: ignore[attr-defined]


def test_temperatures_are_read_in_the_sites_units(api: TestClient, demo: dict[str, Any]) -> None:
    site = demo["site"]
    api.patch(f"/api/v1/sites/{site['id']}", json={"unit_system": "us"})
    survey = _walk_survey(api, site)
    trap_id = api.get(f"/api/v1/sites/{site['id']}/traps", params={"limit": 1}).json()["items"][0][
        "id"
    ]
    text, key = _form_page(api, survey, trap_id)
    assert "(°F)" in text
    assert "psig" in text
    api.post(
        f"/surveys/{survey['id']}/walk/traps/{trap_id}",
        data={
            "idempotency_key": key,
            "condition": "working",
            "method": "temperature",
            "upstream_temperature": "212",
            "confirmed": "yes",  # 100 °C before a working 1,000 kPa(g) trap: asked to confirm
        },
    )
    stored = api.get(f"/api/v1/surveys/{survey['id']}/findings").json()["items"][0]
    assert stored["upstream_temperature_c"] == pytest.approx(100.0)


def test_a_trap_found_in_the_field_is_added_from_the_walk(
    api: TestClient, demo: dict[str, Any]
) -> None:
    survey = _walk_survey(api, demo["site"])
    path = f"/surveys/{survey['id']}/walk/new-trap"
    fields = {
        "tag": "BH-001",
        "application": "drip",
        "trap_type": "thermodynamic",
        "orifice_diameter": "3",
        "inlet_pressure": "1000",
        "return_pressure": "0",
        "condensate_destination": "vented_receiver",
    }
    duplicate = api.post(path, data=fields)
    assert duplicate.status_code == 422
    assert "already has a trap tagged" in duplicate.text
    assert 'value="BH-001"' in duplicate.text
    wrong = api.post(path, data={**fields, "tag": "NEW-1", "return_pressure": "2000"})
    assert wrong.status_code == 422
    assert "return_pressure" in wrong.context["form"].errors  # type: ignore[attr-defined]
    added = api.post(path, data={**fields, "tag": "NEW-1"}, follow_redirects=False)
    assert added.status_code == 303
    found = api.get(
        f"/api/v1/sites/{demo['site']['id']}/traps", params={"tag_prefix": "NEW-"}
    ).json()
    assert found["total"] == 1


def test_settings_are_saved_and_bad_ones_are_kept_with_their_message(
    api: TestClient, demo: dict[str, Any]
) -> None:
    site_id = demo["site"]["id"]
    page = api.get(f"/sites/{site_id}/settings")
    typed = page.context["form"].typed  # type: ignore[attr-defined]
    assert typed["fuel_price_per_gj"] == "11.8"
    bad = api.post(
        f"/sites/{site_id}/settings",
        data={**typed, "boiler_efficiency": "1.7", "loss_leaking_low": "0.9"},
    )
    assert bad.status_code == 422
    errors = bad.context["form"].errors  # type: ignore[attr-defined]
    assert "boiler_efficiency" in errors
    assert "loss_leaking_typical" in errors or "loss_leaking_low" in errors
    assert 'value="1.7"' in bad.text
    assert api.get(f"/api/v1/sites/{site_id}").json()["boiler_efficiency"] == 0.84
    good = api.post(
        f"/sites/{site_id}/settings",
        data={**typed, "boiler_efficiency": "0.86"},
        follow_redirects=False,
    )
    assert good.status_code == 303
    assert api.get(f"/api/v1/sites/{site_id}").json()["boiler_efficiency"] == 0.86


def test_the_pricing_bases_are_set_on_the_settings_page_and_named_in_the_report(
    api: TestClient, demo: dict[str, Any]
) -> None:
    site_id = demo["site"]["id"]
    typed = api.get(f"/sites/{site_id}/settings").context["form"].typed  # type: ignore[attr-defined]
    assert typed["fuel_heating_value"] == "lhv"
    before = api.get(f"/api/v1/sites/{site_id}/summary").json()
    bases = {
        "fuel_heating_value": "hhv",
        "closed_return_pricing": "as_steam_lost",
        "sewer_cost_per_tonne": "1.2",
        "net_to_gross_ratio": "0.9",
    }
    saved = api.post(f"/sites/{site_id}/settings", data={**typed, **bases}, follow_redirects=False)
    assert saved.status_code == 303
    site = api.get(f"/api/v1/sites/{site_id}").json()
    assert (site["fuel_heating_value"], site["closed_return_pricing"]) == ("hhv", "as_steam_lost")
    after = api.get(f"/api/v1/sites/{site_id}/summary").json()
    # CO2 per gross GJ is 0.9 of the factor per net GJ (IPCC 2006 vol. 2 ch. 1, from memory).
    assert after["totals"]["annual_installation_co2_t"] == pytest.approx(
        before["totals"]["annual_installation_co2_t"] * 0.9, rel=1e-9
    )
    report = api.get(f"/sites/{site_id}/report").text
    assert "Gross (higher) heating value, HHV" in report
    assert "As steam lost, made again from make-up" in report
    refused = api.post(f"/sites/{site_id}/settings", data={**typed, "net_to_gross_ratio": "1.4"})
    assert refused.status_code == 422
    assert 'value="1.4"' in refused.text


def test_the_calculator_answers_and_explains_bad_input(client: TestClient) -> None:
    answer = client.get(
        "/calculator", params={"calc": "flash", "inlet": "1034.2136", "return": "206.8427"}
    )
    assert answer.status_code == 200
    # US DOE Steam Tip Sheet: 150 psig condensate flashed to 30 psig, 10.3 %.
    assert answer.context["result"].flash_fraction == pytest.approx(0.103, abs=5e-4)  # type: ignore[attr-defined]
    us = client.get(
        "/calculator", params={"calc": "flash", "units": "us", "inlet": "150", "return": "30"}
    )
    assert us.context["result"].flash_fraction == pytest.approx(0.103, abs=5e-4)  # type: ignore[attr-defined]
    bad = client.get("/calculator", params={"calc": "saturation", "pressure": "30000"})
    assert bad.status_code == 422
    assert "outside the range of boiling water" in bad.text
    trap = client.get(
        "/calculator",
        params={
            "calc": "trap",
            "inlet": "1000",
            "return": "0",
            "orifice": "4",
            "hours": "8000",
            "price": "30",
        },
    )
    assert trap.context["result"].method == "napier"  # type: ignore[attr-defined]
    uphill = client.get(
        "/calculator",
        params={"calc": "trap", "inlet": "100", "return": "200", "hours": "8000"},
    )
    assert uphill.status_code == 422
    errors = uphill.context["form"].errors  # type: ignore[attr-defined]
    assert {"return", "orifice"} <= set(errors)
    assert 'value="200"' in uphill.text


def test_the_calculator_recovers_flash_and_takes_the_sites_atmosphere(client: TestClient) -> None:
    # US DOE Steam Tip Sheet #12: 5,000 lb/h of 150 psig condensate flashed at 30 psig,
    # make-up at 70 degF, 8,760 h, steam at $10/MMBtu: $51,156 a year (0.5 %: see the API test).
    recovery = client.get(
        "/calculator",
        params={
            "calc": "flash_recovery",
            "units": "us",
            "currency": "USD",
            "fr_load": "5000",
            "fr_inlet": "150",
            "fr_vessel": "30",
            "fr_hours": "8760",
            "fr_makeup": "70",
            "fr_price": "10",
        },
    )
    assert recovery.status_code == 200, recovery.text
    assert recovery.context["result"].annual_value == pytest.approx(51_156.0, rel=0.005)  # type: ignore[attr-defined]
    assert "discharge against its pressure" in recovery.text
    # Gauge pressures read against a high site's atmosphere boil lower.
    sea = client.get("/calculator", params={"calc": "saturation", "pressure": "0"})
    high = client.get(
        "/calculator", params={"calc": "saturation", "pressure": "0", "atmosphere": "89.87"}
    )
    assert high.context["result"].temperature_c < sea.context["result"].temperature_c - 3.0  # type: ignore[attr-defined]
    bad = client.get(
        "/calculator", params={"calc": "saturation", "pressure": "0", "atmosphere": "300"}
    )
    assert bad.status_code == 422
    assert "atmospheric pressure lies above" in bad.text
    above = client.get(
        "/calculator",
        params={
            "calc": "flash_recovery",
            "fr_load": "100",
            "fr_inlet": "100",
            "fr_vessel": "200",
            "fr_hours": "8000",
        },
    )
    assert above.status_code == 422
    assert "fr_vessel" in above.context["form"].errors  # type: ignore[attr-defined]


def test_the_import_page_previews_then_confirms(api: TestClient, demo: dict[str, Any]) -> None:
    site_id = demo["site"]["id"]
    bad = (
        b"tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
        b"return_pressure_kpa_g\nX-1,kettle,thermodynamic,3,400,0\n"
    )
    preview = api.post(
        f"/sites/{site_id}/import",
        data={"kind": "register"},
        files={"file": ("register.csv", bad, "text/csv")},
    )
    assert preview.status_code == 422
    assert "kettle" in preview.text or "application" in preview.text
    good = bad.replace(b"kettle", b"drip")
    preview = api.post(
        f"/sites/{site_id}/import",
        data={"kind": "register"},
        files={"file": ("register.csv", good, "text/csv")},
    )
    assert preview.status_code == 200
    content = re.search(r'name="content" value="([^"]+)"', preview.text)
    assert content is not None
    assert (
        api.get(f"/api/v1/sites/{site_id}/traps", params={"tag_prefix": "X-"}).json()["total"] == 0
    )
    confirmed = api.post(
        f"/sites/{site_id}/import",
        data={"kind": "register", "content": content.group(1), "confirm": "yes"},
        follow_redirects=False,
    )
    assert confirmed.status_code == 303
    assert (
        api.get(f"/api/v1/sites/{site_id}/traps", params={"tag_prefix": "X-"}).json()["total"] == 1
    )
    empty = api.post(f"/sites/{site_id}/import", data={"kind": "register"})
    assert empty.status_code == 422


def test_downloads_open_in_a_spreadsheet(api: TestClient, demo: dict[str, Any]) -> None:
    site_id, survey_id = demo["site"]["id"], demo["latest"]["id"]
    sheet = api.get(f"/sites/{site_id}/downloads/repair-list.xlsx")
    rows = list(load_workbook(io.BytesIO(sheet.content)).active.iter_rows(values_only=True))
    summary = api.get(f"/api/v1/sites/{site_id}/summary").json()
    assert rows[0][:2] == ("rank", "tag")
    assert len(rows) == 1 + len(summary["repair_list"])
    findings = api.get(f"/surveys/{survey_id}/downloads/findings.xlsx")
    assert len(list(load_workbook(io.BytesIO(findings.content)).active.iter_rows())) == 205
    assert api.get(f"/surveys/{survey_id}/downloads/findings.csv").text.startswith("tag,tested_at")
    assert api.get(f"/sites/{site_id}/downloads/repair-list.pdf").status_code == 404


def test_pages_answer_with_pages_not_json(api: TestClient, demo: dict[str, Any]) -> None:
    missing = api.get("/traps/999999")
    assert missing.status_code == 404
    assert missing.headers["content-type"].startswith("text/html")
    assert "There is no trap 999999" in missing.text
    odd = api.get(f"/sites/{demo['site']['id']}/register", params={"offset": "-4"})
    assert odd.status_code == 422
    assert odd.headers["content-type"].startswith("text/html")


def test_the_register_and_a_traps_page(api: TestClient, demo: dict[str, Any]) -> None:
    site_id = demo["site"]["id"]
    listing = api.get(
        f"/sites/{site_id}/register", params={"q": "BH-", "condition": "blow_through"}
    )
    api_listing = api.get(
        f"/api/v1/sites/{site_id}/traps", params={"tag_prefix": "BH-", "condition": "blow_through"}
    ).json()
    assert listing.context["traps"].total == api_listing["total"]  # type: ignore[attr-defined]
    trap = api_listing["items"][0]
    page = api.get(f"/traps/{trap['id']}")
    assert page.status_code == 200
    summary = api.get(f"/api/v1/sites/{site_id}/summary").json()
    item = next(i for i in summary["repair_list"] if i["trap_id"] == trap["id"])
    assert page.context["loss"].failure.cost == pytest.approx(item["annual_cost"])  # type: ignore[attr-defined]
    assert "Findings and repairs, newest first" in page.text
    assert api.get(f"/sites/{site_id}/register", params={"offset": 50}).status_code == 200


def test_every_answer_carries_the_security_headers(client: TestClient) -> None:
    for path in ("/calculator", "/api/v1/health", "/static/traptally.css"):
        headers = client.get(path).headers
        policy = headers["content-security-policy"]
        assert "script-src 'self'" in policy
        assert "unsafe-inline" not in policy
        for part in ("object-src 'none'", "base-uri 'none'", "frame-ancestors 'none'"):
            assert part in policy
        assert headers["x-content-type-options"] == "nosniff"
        assert headers["referrer-policy"] == "same-origin"
        assert "strict-transport-security" not in headers
    secure = TestClient(client.app, base_url="https://testserver").get("/api/v1/health")
    assert secure.headers["strict-transport-security"].startswith("max-age=")


def test_the_route_is_paged(api: TestClient, demo: dict[str, Any]) -> None:
    survey_id = demo["latest"]["id"]
    first = api.get(f"/surveys/{survey_id}/walk")
    assert "Further on the route (61 to 120 of 204)" in first.text
    later = api.get(f"/surveys/{survey_id}/walk", params={"offset": 180})
    assert "Earlier on the route" in later.text
    assert len(later.context["route"]) == 24  # type: ignore[attr-defined]
    one_area = api.get(f"/surveys/{survey_id}/walk", params={"area": "Finishing and warehouse"})
    assert all(row.area_name == "Finishing and warehouse" for row in one_area.context["route"])  # type: ignore[attr-defined]


def test_a_retry_seconds_later_is_the_same_finding_and_a_changed_one_can_follow(
    api: TestClient, demo: dict[str, Any]
) -> None:
    survey = _walk_survey(api, demo["site"])
    trap_id = api.get(f"/api/v1/sites/{demo['site']['id']}/traps", params={"limit": 1}).json()[
        "items"
    ][0]["id"]
    page = api.get(f"/surveys/{survey['id']}/walk/traps/{trap_id}")
    typed = page.context["form"].typed  # type: ignore[attr-defined]
    fields = {
        "idempotency_key": typed["idempotency_key"],
        "opened_at": typed["opened_at"],
        "condition": "leaking",
        "method": "ultrasonic",
    }
    path = f"/surveys/{survey['id']}/walk/traps/{trap_id}"
    assert api.post(path, data=fields, follow_redirects=False).status_code == 303
    # The answer was lost; the tablet sends the same form again later: one finding.
    assert api.post(path, data=fields, follow_redirects=False).status_code == 303
    findings = f"/api/v1/surveys/{survey['id']}/findings"
    assert api.get(findings).json()["total"] == 1
    # The technician changed the condition before saving again: told, and it can follow.
    changed = api.post(path, data={**fields, "condition": "blow_through"})
    assert changed.status_code == 422
    assert "reached the server before the connection dropped" in changed.text
    fresh = changed.context["form"].typed["idempotency_key"]  # type: ignore[attr-defined]
    assert fresh != fields["idempotency_key"]
    again = api.post(
        path,
        data={**fields, "condition": "blow_through", "idempotency_key": fresh},
        follow_redirects=False,
    )
    assert again.status_code == 303
    assert [f["condition"] for f in api.get(findings).json()["items"]] == [
        "leaking",
        "blow_through",
    ]


def test_the_sites_page_shows_each_sites_latest_headline(
    api: TestClient, demo: dict[str, Any]
) -> None:
    api.post("/api/v1/sites", json={"name": "Empty Works", "steam_cost_per_tonne": 25})
    listing = api.get("/")
    summary = api.get(f"/api/v1/sites/{demo['site']['id']}/summary").json()
    show = listing.context["displays"][demo["site"]["id"]]  # type: ignore[attr-defined]
    assert show.money(summary["annual_cost"]) in listing.text
    assert "Empty Works" in listing.text
    assert "No survey yet." in listing.text


def test_the_summarys_flash_vessel_what_if_equals_the_api(
    api: TestClient, demo: dict[str, Any]
) -> None:
    site_id = demo["site"]["id"]
    area = "Boiler house and HP header"
    page = api.get(f"/sites/{site_id}/summary", params={"vessel": "150", "area": area})
    assert page.status_code == 200
    shown = page.context["recovery"]  # type: ignore[attr-defined]
    from_api = api.get(
        f"/api/v1/sites/{site_id}/flash-recovery",
        params={"vessel_pressure_kpa_g": 150, "area": area},
    ).json()
    assert shown.model_dump(mode="json") == from_api
    assert from_api["traps"] > 0
    assert (
        0
        < from_api["annual_value"]
        < api.get(f"/api/v1/sites/{site_id}/summary").json()["totals"]["annual_flash_cost"]
    )
    assert "discharge against its pressure" in page.text
    bad = api.get(f"/sites/{site_id}/summary", params={"vessel": "lots"})
    assert bad.status_code == 422
    assert "is not a number" in bad.text
    assert 'value="lots"' in bad.text
    off_line = api.get(
        f"/api/v1/sites/{site_id}/flash-recovery", params={"vessel_pressure_kpa_g": 30000}
    )
    assert off_line.status_code == 422
    assert "flash-what-if" not in api.get(f"/sites/{site_id}/report").text
