"""The accounting a manager signs, checked on the roll-up and comparison services
directly (a session, no HTTP): failure losses apart from installation losses, risks
counted, comparisons over traps tested in both rounds."""

import datetime as dt

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from sqlalchemy.orm import Session

from service.physics.annual import Economics
from service.physics.conditions import FindingCategory, TrapCondition, category_of
from service.physics.trap_loss import CondensateDestination, TrapService, trap_loss
from service.reports.compare import Change, compare_surveys
from service.reports.summary import site_summary
from service.store import register, surveys
from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Site, Survey, Trap
from service.store.schemas import (
    FindingCreate,
    RepairCreate,
    SiteCreate,
    SurveyCreate,
    TrapCreate,
)


@settings(max_examples=80, deadline=None)
@given(
    condition=st.sampled_from(list(TrapCondition)),
    destination=st.sampled_from(list(CondensateDestination)),
    load_kg_h=st.floats(min_value=0.0, max_value=2000.0),
    inlet_kpa_abs=st.floats(min_value=150.0, max_value=4000.0),
)
def test_failure_and_installation_losses_add_up_to_the_whole(
    condition: TrapCondition,
    destination: CondensateDestination,
    load_kg_h: float,
    inlet_kpa_abs: float,
) -> None:
    # Nothing is lost or counted twice by the split: failure + installation = the total
    # the program reported before the split, and only a failure has a failure loss.
    service = TrapService(
        inlet_kpa_abs,
        101.325,
        4.0,
        condition,
        8000.0,
        condensate_load_kg_h=load_kg_h,
        destination=destination,
    )
    loss = trap_loss(service, Economics(fuel_price_per_gj=10.0))
    assert loss.failure.cost + loss.installation.cost == pytest.approx(loss.total.cost)  # type: ignore[operator]
    if category_of(condition) is not FindingCategory.FAILURE:
        assert loss.failure.cost == 0.0


def test_the_demos_totals_split_into_failure_installation_and_unknown(store: Database) -> None:
    with store.writing() as session:
        site = load_demo(session=session)
        assert site is not None
        summary = site_summary(
            session=session, site=site, survey=surveys.latest_survey(session=session, site=site)
        )
    whole = sum(priced.loss.total.cost or 0.0 for priced in summary.priced)
    by_category: dict[FindingCategory, float] = {}
    for priced in summary.priced:
        share = (priced.loss.failure.cost or 0.0) + (priced.loss.installation.cost or 0.0)
        by_category[priced.category] = by_category.get(priced.category, 0.0) + share
    totals = summary.totals
    assert (totals.failure.cost or 0.0) + (totals.installation.cost or 0.0) == pytest.approx(
        whole, rel=1e-9
    )
    assert sum(by_category.values()) == pytest.approx(whole, rel=1e-9)
    # The demo's working traps lose flash and drained condensate: installation, not failure.
    working = [p for p in summary.priced if p.category is FindingCategory.WORKING]
    assert sum(p.loss.failure.cost or 0.0 for p in working) == 0.0
    assert sum(p.loss.installation.cost or 0.0 for p in working) > 0.0
    assert totals.unknown == summary.traps_not_accessible
    # Every payback rests on the failure loss alone.
    for priced in summary.repair_list:
        assert priced.payback == pytest.approx(
            (priced.repair_cost or 0.0) / (priced.loss.failure.cost or 1.0)
        )


def _site(session: Session) -> Site:
    return register.create_site(
        session=session,
        data=SiteCreate(name="Test works", cost_basis="fuel_price", fuel_price_per_gj=10.0),
    )


def _trap(session: Session, site: Site, tag: str, destination: str = "drain") -> Trap:
    return register.create_trap(
        session=session,
        site=site,
        data=TrapCreate.model_validate(
            {
                "tag": tag,
                "application": "drip",
                "trap_type": "thermodynamic",
                "orifice_diameter_mm": 4.0,
                "inlet_pressure_kpa_g": 1000.0,
                "return_pressure_kpa_g": 0.0,
                "condensate_destination": destination,
                "condensate_load_kg_h": 40.0,
            }
        ),
    )


def _survey(session: Session, site: Site, name: str, started_on: dt.date) -> Survey:
    return surveys.create_survey(
        session=session, site=site, data=SurveyCreate(name=name, started_on=started_on)
    )


def _found(session: Session, survey: Survey, trap: Trap, condition: str, day: dt.date) -> None:
    surveys.record_finding(
        session=session,
        survey=survey,
        data=FindingCreate.model_validate(
            {
                "trap_id": trap.id,
                "tested_at": dt.datetime.combine(day, dt.time(9), dt.UTC),
                "method": "ultrasonic",
                "condition": condition,
            }
        ),
    )


def test_a_fair_comparison_over_traps_tested_in_both_rounds(store: Database) -> None:
    spring, autumn = dt.date(2026, 3, 2), dt.date(2026, 9, 1)
    with store.writing() as session:
        site = _site(session)
        was_plugged, now_plugged, blowing, only_later, hidden = (
            _trap(session, site, tag) for tag in ("A", "B", "C", "D", "E")
        )
        first = _survey(session, site, "Spring", spring)
        second = _survey(session, site, "Autumn", autumn)
        _found(session, first, was_plugged, "plugged", spring)
        _found(session, first, now_plugged, "working", spring)
        _found(session, first, blowing, "blow_through", spring)
        _found(session, first, hidden, "leaking", spring)
        for trap in (was_plugged, blowing):
            surveys.record_repair(
                session=session,
                trap=trap,
                data=RepairCreate(repaired_on=dt.date(2026, 4, 1), kind="repaired"),
            )
        _found(session, second, was_plugged, "working", autumn)
        _found(session, second, now_plugged, "plugged", autumn)
        _found(session, second, blowing, "working", autumn)
        _found(session, second, only_later, "leaking", autumn)
        _found(session, second, hidden, "not_accessible", autumn)
        comparison = compare_surveys(session=session, site=site, before=first, after=second)
        before = site_summary(session=session, site=site, survey=first)
        blowing_cost = next(p.yearly_cost for p in before.priced if p.tag == "C")

    tags = {change: [c.tag for c in items] for change, items in comparison.changes.items()}
    # A repaired plugged trap is a risk removed, not a new cost; one that plugged is a new
    # risk, not a saving, though its drain loss vanished.
    assert tags[Change.RISK_REMOVED] == ["A"]
    assert tags[Change.NEW_RISK] == ["B"]
    assert tags[Change.REPAIRED_AND_CONFIRMED] == ["C"]
    assert tags[Change.NEWLY_FAILED] == ["D"]
    assert tags[Change.NOT_RETESTED] == ["E"]
    # D (tested only now) and E (not accessible now) are left out of the costs.
    assert (comparison.traps_compared, comparison.traps_only_before) == (3, 1)
    assert comparison.traps_only_after == 1
    assert comparison.cost_change == pytest.approx(-blowing_cost)
    low, high = comparison.cost_change_range
    assert low <= comparison.cost_change <= high < 0.0


def test_a_flash_vessel_what_if_over_the_traps_that_vent_their_flash(store: Database) -> None:
    # The mixing rule per trap (US DOE Steam Tip Sheet #12's method): each vented trap's
    # condensate flashed at the vessel; traps to drain or to a closed return are not fed
    # to it, nor those whose inlet is not above the vessel's pressure.
    from service.physics.flash import flash_recovery
    from service.reports.opportunities import flash_recovery_what_if
    from service.reports.pricing import SitePricing

    day = dt.date(2026, 3, 2)
    with store.writing() as session:
        site = _site(session)
        vented = [_trap(session, site, tag, "vented_receiver") for tag in ("V1", "V2")]
        drained = _trap(session, site, "D1", "drain")
        survey = _survey(session, site, "Spring", day)
        for trap in [*vented, drained]:
            _found(session, survey, trap, "working", day)
        pricing = SitePricing.of(site)
        summary = site_summary(session=session, site=site, survey=survey, pricing=pricing)
        what_if = flash_recovery_what_if(
            summary=summary, pricing=pricing, vessel_pressure_kpa_g=200.0
        )
        too_high = flash_recovery_what_if(
            summary=summary, pricing=pricing, vessel_pressure_kpa_g=1000.0
        )
        makeup = pricing.economics.makeup_water_enthalpy_kj_kg
        atmosphere = site.atmospheric_pressure_kpa
    one = flash_recovery(
        condensate_load_kg_h=40.0,
        inlet_pressure_kpa_abs=1000.0 + atmosphere,
        vessel_pressure_kpa_abs=200.0 + atmosphere,
        hours_per_year=8760.0,
        makeup_water_enthalpy_kj_kg=makeup,
    )
    assert (what_if.traps, what_if.traps_below_vessel) == (2, 0)
    assert what_if.recovered_steam_kg_h == pytest.approx(2 * one.recovered_steam_kg_h)
    # Fuel basis: heat over the boiler efficiency at the fuel price.
    assert what_if.annual_value == pytest.approx(2 * one.annual_energy_gj / 0.8 * 10.0)
    assert (too_high.traps, too_high.traps_below_vessel) == (0, 2)
