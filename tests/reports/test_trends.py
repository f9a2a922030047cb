"""Every round side by side through the API and the pages, and any two rounds compared."""

import re
from typing import Any

from fastapi.testclient import TestClient

from tests.reports.test_reliability import ROUNDS, plant

__all__ = ["plant"]  # the small plant of three rounds, by hand


def test_each_rounds_figures_are_its_summarys_and_repairs_fall_after_their_round(
    api: TestClient, plant: dict[str, Any]
) -> None:
    site_id = plant["site"]["id"]
    trends = api.get(f"/api/v1/sites/{site_id}/trends").json()
    assert [trend["survey"]["started_on"] for trend in trends] == ROUNDS  # oldest first
    # By hand: nothing failed in 2024; A-2 in 2025 (replaced in June 2025); A-1 in 2026.
    assert [trend["failed_count"] for trend in trends] == [0, 1, 1]
    assert [trend["repairs_after"] for trend in trends] == [0, 1, 0]
    for trend in trends:
        summary = api.get(
            f"/api/v1/sites/{site_id}/summary", params={"survey_id": trend["survey"]["id"]}
        ).json()
        assert trend["annual_cost"] == summary["annual_cost"]
        assert trend["annual_installation_cost"] == summary["totals"]["annual_installation_cost"]


def test_the_site_home_and_the_report_show_every_round(
    api: TestClient, plant: dict[str, Any]
) -> None:
    site_id = plant["site"]["id"]
    trends = api.get(f"/api/v1/sites/{site_id}/trends").json()
    for path in (f"/sites/{site_id}", f"/sites/{site_id}/report"):
        page = api.get(path)
        shown = page.context["show"]  # type: ignore[attr-defined]
        assert "Every round" in page.text
        for trend in trends:
            assert trend["survey"]["name"] in page.text
            assert shown.money(trend["annual_cost"]) in page.text


def test_any_two_rounds_compare_over_the_traps_tested_in_both(
    api: TestClient, plant: dict[str, Any]
) -> None:
    site_id = plant["site"]["id"]
    first, _, last = api.get(f"/api/v1/sites/{site_id}/trends").json()
    page = api.get(
        f"/sites/{site_id}/summary",
        params={"survey_id": last["survey"]["id"], "compared_with": first["survey"]["id"]},
    )
    assert page.status_code == 200
    assert re.search(rf"Since {re.escape(first['survey']['name'])}", page.text)
    compared = api.get(
        f"/api/v1/sites/{site_id}/compare",
        params={"from_survey": first["survey"]["id"], "to_survey": last["survey"]["id"]},
    ).json()
    context = page.context["comparison"]  # type: ignore[attr-defined]
    assert context.traps_compared == compared["traps_compared"] == 3  # B-2 not tested in 2024
    assert context.annual_cost_change == compared["annual_cost_change"]
