"""The reliability roll-up through the API and the page: lives counted by hand from a
small plant's rounds and repairs, the page showing the API's figures, and the demo."""

import csv
import io
import math
from typing import Any

import pytest
from fastapi.testclient import TestClient

from service.store.database import Database
from service.store.demo import load_demo
from tests.factories import make_finding, make_site, make_survey, make_trap

ROUNDS = ["2024-03-04", "2025-03-03", "2026-03-02"]
# Each trap's condition at each round (invented data).
FOUND = {
    "A-1": ("thermodynamic", ["working", "working", "leaking"]),
    "A-2": ("thermodynamic", ["working", "blow_through", "working"]),  # repaired in 2025
    "B-1": ("inverted_bucket", ["working", "working", "working"]),
    "B-2": ("inverted_bucket", ["not_accessible", "working", "working"]),
}


@pytest.fixture
def plant(api: TestClient) -> dict[str, Any]:
    site = make_site(api, test_cost_per_trap=12.0)
    traps = {tag: make_trap(api, site, tag=tag, trap_type=kind) for tag, (kind, _) in FOUND.items()}
    for number, day in enumerate(ROUNDS):
        survey = make_survey(api, site, name=f"Round {day}", started_on=day)
        for tag, (_, conditions) in FOUND.items():
            make_finding(
                api, survey, traps[tag], condition=conditions[number], tested_at=f"{day}T09:00:00Z"
            )
    api.post(
        f"/api/v1/traps/{traps['A-2']['id']}/repairs",
        json={"repaired_on": "2025-06-02", "kind": "replaced", "cost": 480},
    )
    return {"site": site, "traps": traps}


def _group(answer: dict[str, Any], breakdown: str, key: str) -> dict[str, Any]:
    found: dict[str, Any] = next(
        group
        for group in answer["groups"]
        if (group["breakdown"], group["key"]) == (breakdown, key)
    )
    return found


def test_lives_and_failures_are_counted_from_the_rounds_and_repairs(
    api: TestClient, plant: dict[str, Any]
) -> None:
    answer = api.get(f"/api/v1/sites/{plant['site']['id']}/reliability").json()
    # By hand: A-1 worked 2024 and 2025, failed by 2026; A-2 failed by 2025, then a new
    # life from its repair, working in 2026; B-1 worked throughout; B-2 from 2025.
    disc = _group(answer, "trap_type", "thermodynamic")
    assert (disc["lives"], disc["failures"]) == (3, 2)
    bucket = _group(answer, "trap_type", "inverted_bucket")
    assert (bucket["lives"], bucket["failures"]) == (2, 0)
    # No failure: a zero rate whose upper end is -ln(0.05) over the working years
    # (B-1 728 days, B-2 364; common practice, "the rule of three").
    assert bucket["failures_per_year"] == 0.0
    assert bucket["failures_per_year_high"] == pytest.approx(
        2.996 / bucket["exposure_years"], rel=1e-3
    )
    assert bucket["exposure_years"] == pytest.approx((728 + 364) / 365.25, rel=1e-12)  # days
    assert (answer["traps"], answer["lives"], answer["failures"]) == (4, 5, 2)
    assert answer["test_cost_per_trap"] == 12.0
    # The test interval follows the closed form from the group's own figures.
    if disc["best_test_interval_years"] is not None:
        expected = math.sqrt(2 * 12.0 / (disc["failures_per_year"] * disc["mean_failure_loss"]))
        assert disc["best_test_interval_years"] == pytest.approx(expected, rel=1e-9)


def test_the_next_round_counts_a_trap_failed_now_in_full(
    api: TestClient, plant: dict[str, Any]
) -> None:
    answer = api.get(
        f"/api/v1/sites/{plant['site']['id']}/reliability",
        params={"next_round_on": "2027-03-01"},
    ).json()
    upcoming = answer["next_round"]
    assert upcoming["on"] == "2027-03-01"
    chances = {trap["tag"]: trap["chance"] for trap in upcoming["route"]}
    assert chances["A-1"] == 1.0  # leaking in 2026, not repaired since
    losses = [trap["expected_loss"] for trap in upcoming["route"]]
    assert losses == sorted(losses, reverse=True)
    assert upcoming["expected_failed"] == pytest.approx(sum(chances.values()), rel=1e-9)


def test_the_page_and_the_csv_show_the_apis_figures(api: TestClient, plant: dict[str, Any]) -> None:
    site_id = plant["site"]["id"]
    answer = api.get(f"/api/v1/sites/{site_id}/reliability").json()
    page = api.get(f"/sites/{site_id}/reliability")
    assert page.status_code == 200
    shown = page.context["show"]  # type: ignore[attr-defined]
    disc = _group(answer, "trap_type", "thermodynamic")
    assert shown.money(disc["mean_failure_loss"]) in page.text
    assert f"{answer['failures']} of them ended by a failure" in page.text
    rows = list(
        csv.DictReader(
            io.StringIO(api.get(f"/api/v1/sites/{site_id}/exports/reliability.csv").text)
        )
    )
    assert len(rows) == len(answer["groups"])
    assert {(row["breakdown"], row["key"]) for row in rows} == {
        (group["breakdown"], group["key"]) for group in answer["groups"]
    }


def test_the_demo_mill_has_every_breakdown_and_its_expectations_add_up(
    store: Database, api: TestClient
) -> None:
    with store.writing() as session:
        site = load_demo(session=session)
    assert site is not None
    answer = api.get(f"/api/v1/sites/{site.id}/reliability").json()
    assert {group["breakdown"] for group in answer["groups"]} == {
        "trap_type",
        "application",
        "pressure_class",
    }
    for group in answer["groups"]:
        assert (
            group["failures_per_year_low"]
            <= group["failures_per_year"]
            <= group["failures_per_year_high"]
        )
    upcoming = answer["next_round"]
    assert sum(area["expected_failed"] for area in upcoming["by_area"]) == pytest.approx(
        upcoming["expected_failed"], rel=1e-9
    )
    assert (
        upcoming["expected_failure_loss_low"]
        <= upcoming["expected_failure_loss"]
        <= upcoming["expected_failure_loss_high"]
    )


def test_a_trap_seen_once_gives_no_bound_and_no_interval_rather_than_infinity(
    api: TestClient,
) -> None:
    # Found working at its only test, with no installation date: a life of unknown
    # length so far, no working time seen, so the rate has no upper bound (JSON: null).
    site = make_site(api)
    trap = make_trap(api, site, tag="ONCE-1")
    make_finding(api, make_survey(api, site), trap, condition="working")
    answer = api.get(f"/api/v1/sites/{site['id']}/reliability")
    assert answer.status_code == 200
    group = _group(answer.json(), "trap_type", "thermodynamic")
    assert (group["failures_per_year"], group["failures_per_year_high"]) == (0.0, None)
    assert group["best_test_interval_years"] is None
    assert group["cost_curve"] == []
    assert api.get(f"/sites/{site['id']}/reliability").status_code == 200
