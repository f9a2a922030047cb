"""The site roll-up and the survey comparison, checked against the calculation API."""

from typing import Any

import pytest
from fastapi.testclient import TestClient

from service.store.database import Database
from service.store.demo import load_demo
from tests.factories import make_finding, make_site, make_survey, make_trap

TOTALS = ("annual_steam_loss_t", "annual_energy_loss_gj", "annual_cost", "annual_co2_t")


@pytest.fixture
def demo(store: Database, api: TestClient) -> dict[str, Any]:
    with store.writing() as session:
        site = load_demo(session=session)
    assert site is not None
    body: dict[str, Any] = api.get(f"/api/v1/sites/{site.id}").json()
    return body


def _trap_loss_request(site: dict[str, Any], item: dict[str, Any]) -> dict[str, Any]:
    """The same trap and site, as a request to POST /api/v1/calc/trap-loss."""
    atmosphere = site["atmospheric_pressure_kpa"]
    request = {
        "atmospheric_pressure_kpa": atmosphere,
        "condition": item["condition"],
        "inlet_pressure_kpa_g": item["inlet_pressure_kpa_abs"] - atmosphere,
        "return_pressure_kpa_g": item["return_pressure_kpa_abs"] - atmosphere,
        "orifice_diameter_mm": item["orifice_diameter_mm"],
        "hours_per_year": item["hours_per_year"],
        "condensate_load_kg_h": item["condensate_load_kg_h"],
        "condensate_destination": item["condensate_destination"],
        "discharge_coefficient": item["discharge_coefficient"],
        "discharge_coefficient_low": item["discharge_coefficient_low"],
        "discharge_coefficient_high": item["discharge_coefficient_high"],
        "boiler_efficiency": site["boiler_efficiency"],
        "makeup_water_temperature_c": site["makeup_water_temperature_c"],
        "co2_kg_per_gj_fuel": site["co2_kg_per_gj_fuel"],
        "water_and_treatment_cost_per_tonne": site["water_and_treatment_cost_per_tonne"],
        "sewer_cost_per_tonne": site["sewer_cost_per_tonne"],
        "fuel_heating_value": site["fuel_heating_value"],
        "co2_factor_heating_value": site["co2_factor_heating_value"],
        "net_to_gross_ratio": site["net_to_gross_ratio"],
        "closed_return_pricing": site["closed_return_pricing"],
        "steam_temperature_c": item["steam_temperature_c"],
        "inlet_temperature_c": item["condensate_temperature_c"],
        "trap_type": item["trap_type"],
    }
    if item["loss_factor_high"] > 0:
        request |= {
            "loss_factor": item["loss_factor"],
            "loss_factor_low": item["loss_factor_low"],
            "loss_factor_high": item["loss_factor_high"],
        }
    basis = "fuel_price_per_gj" if site["cost_basis"] == "fuel_price" else "steam_cost_per_tonne"
    request[basis] = site[basis]
    return request


def test_each_trap_in_the_summary_equals_the_calculation_api(
    api: TestClient, demo: dict[str, Any]
) -> None:
    summary = api.get(f"/api/v1/sites/{demo['id']}/summary").json()
    assert summary["repair_list"], "the demo's latest survey has failed traps"
    for item in summary["repair_list"] + summary["risks"]:
        priced = api.post("/api/v1/calc/trap-loss", json=_trap_loss_request(demo, item)).json()
        for figure in (
            "steam_loss_kg_h",
            "steam_loss_kg_h_low",
            "steam_loss_kg_h_high",
            "annual_steam_loss_t",
            "annual_energy_loss_gj",
            "annual_cost",
            "annual_cost_low",
            "annual_cost_high",
            "annual_co2_t",
        ):
            assert priced[figure] == pytest.approx(item[figure], rel=1e-12), (item["tag"], figure)
        installation = priced["annual_flash_cost"] + priced["annual_drain_cost"]
        assert installation == pytest.approx(item["annual_installation_cost"], rel=1e-12)


def test_the_breakdowns_add_up_to_the_totals(api: TestClient, demo: dict[str, Any]) -> None:
    summary = api.get(f"/api/v1/sites/{demo['id']}/summary").json()
    for breakdown in ("by_condition", "by_area", "by_application", "by_destination"):
        groups = summary[breakdown]
        assert sum(group["traps"] for group in groups) == summary["totals"]["traps"]
        for figure in (
            *TOTALS,
            "annual_installation_cost",
            "annual_flash_vented_t",
            "annual_condensate_to_drain_t",
        ):
            assert sum(group[figure] for group in groups) == pytest.approx(
                summary["totals"][figure], rel=1e-9
            ), (breakdown, figure)
    for figure in TOTALS:
        assert summary[figure] == summary["totals"][figure]
        assert summary[f"{figure}_low"] < summary[figure] < summary[f"{figure}_high"]
    # One order everywhere: quickest payback on failure losses first.
    paybacks = [item["payback_years"] for item in summary["repair_list"]]
    assert None not in paybacks
    assert paybacks == sorted(paybacks)


def test_the_demo_improves_from_the_first_survey_to_the_second(
    api: TestClient, demo: dict[str, Any]
) -> None:
    surveys = api.get(f"/api/v1/sites/{demo['id']}/surveys").json()["items"]
    later, earlier = surveys[0], surveys[1]
    first = api.get(
        f"/api/v1/sites/{demo['id']}/summary", params={"survey_id": earlier["id"]}
    ).json()
    second = api.get(f"/api/v1/sites/{demo['id']}/summary").json()
    assert second["survey"]["id"] == later["id"]
    assert second["failure_rate"] < first["failure_rate"]
    # US DOE tip sheet: 15-30 % failed after 3-5 years without maintenance.
    assert 0.15 <= first["failure_rate"] <= 0.30
    comparison = api.get(
        f"/api/v1/sites/{demo['id']}/compare",
        params={"from_survey": earlier["id"], "to_survey": later["id"]},
    ).json()
    assert comparison["annual_cost_change"] == pytest.approx(
        comparison["annual_cost_after"] - comparison["annual_cost_before"]
    )
    assert comparison["annual_cost_change"] < 0
    # The range holds the assumptions fixed on both sides, so a clear improvement does not
    # straddle zero, and it holds its middle.
    assert (
        comparison["annual_cost_change_low"]
        <= comparison["annual_cost_change"]
        <= comparison["annual_cost_change_high"]
        < 0
    )
    # Over traps tested in operation in both rounds, the rest counted as left out.
    assert comparison["traps_compared"] + comparison["traps_only_after"] == (second["traps_tested"])
    assert comparison["repaired_and_confirmed"]
    assert comparison["failed_before"] == first["failed_count"]
    exported = api.get(f"/api/v1/sites/{demo['id']}/exports/repair-list.csv").text.splitlines()
    assert len(exported) == 1 + len(second["repair_list"])
    assert exported[0].startswith("rank,tag,")


def test_risks_are_counted_apart_and_untested_traps_are_not_failures(api: TestClient) -> None:
    site = make_site(api)
    plugged, leaking = make_trap(api, site, tag="A"), make_trap(api, site, tag="B")
    make_trap(api, site, tag="C")  # never tested
    hidden = make_trap(api, site, tag="D")
    survey = make_survey(api, site)
    make_finding(api, survey, plugged, condition="plugged")
    make_finding(api, survey, leaking, condition="leaking", recommended_action="replace")
    make_finding(api, survey, hidden, condition="not_accessible")
    summary = api.get(f"/api/v1/sites/{site['id']}/summary").json()
    assert (summary["traps_in_service"], summary["traps_tested"], summary["traps_untested"]) == (
        4,
        2,
        1,
    )
    assert summary["failed_count"] == 2
    assert summary["failure_rate"] == 1.0
    assert summary["risk_count"] == 1
    assert summary["risks"][0]["tag"] == "A"
    (item,) = summary["repair_list"]
    assert item["tag"] == "B"
    assert item["repair_kind"] == "replaced"
    assert item["repair_cost"] == demo_repair_cost(site, "thermodynamic", "replaced")
    assert item["payback_years"] == pytest.approx(item["repair_cost"] / item["annual_cost"])
    assert item["payback_years_low"] < item["payback_years"] < item["payback_years_high"]


def demo_repair_cost(site: dict[str, Any], trap_type: str, kind: str) -> float:
    cost: float = site["repair_costs"][trap_type][kind]
    return cost


def test_a_repair_awaits_its_confirming_finding(api: TestClient) -> None:
    site = make_site(api)
    trap = make_trap(api, site)
    spring = make_survey(api, site, name="Spring", started_on="2026-03-02")
    make_finding(api, spring, trap, condition="blow_through")
    api.post(
        f"/api/v1/traps/{trap['id']}/repairs",
        json={"repaired_on": "2026-04-01", "kind": "replaced"},
    )
    (item,) = api.get(f"/api/v1/sites/{site['id']}/summary").json()["repair_list"]
    assert item["repaired_on"] == "2026-04-01"
    autumn = make_survey(api, site, name="Autumn", started_on="2026-09-01")
    make_finding(api, autumn, trap, condition="working", tested_at="2026-09-02T09:00:00Z")
    comparison = api.get(
        f"/api/v1/sites/{site['id']}/compare",
        params={"from_survey": spring["id"], "to_survey": autumn["id"]},
    ).json()
    assert [change["tag"] for change in comparison["repaired_and_confirmed"]] == ["T-001"]
    assert comparison["annual_cost_change"] < 0
    assert (
        comparison["annual_cost_change_low"]
        < comparison["annual_cost_change"]
        < comparison["annual_cost_change_high"]
    )


def test_a_summary_of_another_sites_survey_is_not_found(api: TestClient) -> None:
    site, other = make_site(api), make_site(api, name="Other")
    survey = make_survey(api, other)
    assert (
        api.get(
            f"/api/v1/sites/{site['id']}/summary", params={"survey_id": survey["id"]}
        ).status_code
        == 404
    )
    empty = api.get(f"/api/v1/sites/{site['id']}/summary").json()
    assert empty["survey"] is None
    assert empty["failure_rate"] is None


def test_the_current_round_is_priced_once_and_again_after_any_write(
    api: TestClient, monkeypatch: pytest.MonkeyPatch
) -> None:
    from service.reports import cache, summary

    site = make_site(api)
    trap = make_trap(api, site)
    survey = make_survey(api, site)
    make_finding(api, survey, trap, condition="leaking")
    priced: list[int] = []
    original = summary.site_summary

    def counting(**arguments: Any) -> Any:
        priced.append(arguments["survey"].id)
        return original(**arguments)

    monkeypatch.setattr(cache, "site_summary", counting)
    path = f"/api/v1/sites/{site['id']}/summary"
    first = api.get(path).json()
    assert api.get(path).json() == first
    assert api.get(f"/sites/{site['id']}/summary").status_code == 200
    assert priced == [survey["id"]]  # the API twice and the page: priced once
    make_finding(api, survey, trap, condition="working", tested_at="2026-03-03T09:00:00Z")
    assert api.get(path).json()["failure_count"] == 0  # the write bumped the revision
    assert priced == [survey["id"], survey["id"]]
