"""The walk's route read a page at a time by SQL holds the same traps, in the same order,
with the same latest findings, as the whole route read at once and sorted by
`ROUTE_ORDER`; progress, the next trap to test and a trap's place agree with it."""

import datetime as dt
import random
from dataclasses import dataclass

import pytest
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.physics.conditions import TrapCondition
from service.store import register, route, surveys
from service.store.database import Database
from service.store.latest import is_latest_finding
from service.store.models import Area, Finding, Survey, Trap
from service.store.schemas import AreaCreate, FindingCreate, SiteCreate, SurveyCreate, TrapCreate

CONDITIONS = [
    TrapCondition.WORKING,
    TrapCondition.LEAKING,
    TrapCondition.NOT_ACCESSIBLE,
    TrapCondition.BLOW_THROUGH,
]


@dataclass(frozen=True)
class Expected:
    trap_id: int
    area: str
    condition: TrapCondition | None


def _plant(session: Session, seed: int) -> Survey:
    """An invented site: areas out of name order, traps with and without positions (ties
    broken by tag), unplaced and retired traps, and findings tested more than once."""
    chooser = random.Random(seed)
    site = register.create_site(
        session=session, data=SiteCreate(name=f"Route {seed}", steam_cost_per_tonne=30.0)
    )
    areas = [
        register.create_area(
            session=session, site=site, data=AreaCreate(name=name, route_order=order)
        )
        for name, order in [("Yard", 2), ("Boiler house", 1), ("Dryers", 1), ("Empty", 0)]
    ]
    survey = surveys.create_survey(
        session=session, site=site, data=SurveyCreate(name="Round", started_on="2026-03-01")
    )
    for number in range(47):
        area = chooser.choice([areas[0], areas[1], areas[2], None])
        trap = register.create_trap(
            session=session,
            site=site,
            data=TrapCreate(
                tag=f"{chooser.choice('ABC')}-{number:02d}",
                area_id=area.id if area else None,
                route_position=chooser.choice([None, 1, 2, 3, 5]),
                application="drip",
                trap_type="thermodynamic",
                orifice_diameter_mm=3.0,
                inlet_pressure_kpa_g=700.0,
                return_pressure_kpa_g=0.0,
                in_service=chooser.random() > 0.1,
            ),
        )
        for test in range(chooser.choice([0, 0, 1, 2])):
            surveys.record_finding(
                session=session,
                survey=survey,
                data=FindingCreate(
                    trap_id=trap.id,
                    tested_at=dt.datetime(2026, 3, 2, 8 + test, tzinfo=dt.UTC),
                    method="ultrasonic",
                    condition=chooser.choice(CONDITIONS),
                ),
            )
    return survey


def _whole_route(session: Session, survey: Survey) -> list[Expected]:
    """Every trap in service in `ROUTE_ORDER`, read at once: what the walk showed before."""
    rows = session.execute(
        select(Trap.id, Area.name, Finding.condition)
        .outerjoin(Area, Trap.area_id == Area.id)
        .outerjoin(Finding, is_latest_finding(survey_id=survey.id))
        .where(Trap.site_id == survey.site_id, Trap.in_service.is_(True))
        .order_by(*register.ROUTE_ORDER)
    ).all()
    return [
        Expected(trap_id, area or route.NO_AREA, condition) for trap_id, area, condition in rows
    ]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_pages_of_the_route_are_the_whole_route_in_order(store: Database, seed: int) -> None:
    with store.writing() as session:
        survey = _plant(session, seed)
        whole = _whole_route(session, survey)
        for area in [None, "Dryers", route.NO_AREA, "Empty"]:
            expected = [row for row in whole if area in (None, row.area)]
            paged: list[route.Stop] = []
            offset = 0
            while True:
                stops, shown = route.RouteOf(session, survey).page(
                    area=area, retest=False, offset=offset, limit=7
                )
                assert shown == len(expected)
                if not stops:
                    break
                paged.extend(stops)
                offset += 7
            assert [stop.trap_id for stop in paged] == [row.trap_id for row in expected]
            assert [stop.condition for stop in paged] == [row.condition for row in expected]
        walked = route.RouteOf(session, survey)
        again, count = walked.page(area=None, retest=True, offset=0, limit=100)
        not_accessible = [r.trap_id for r in whole if r.condition is TrapCondition.NOT_ACCESSIBLE]
        assert [stop.trap_id for stop in again] == not_accessible
        assert count == len(not_accessible)
        assert walked.trap_ids() == [row.trap_id for row in whole]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_progress_next_trap_and_place_agree_with_the_whole_route(
    store: Database, seed: int
) -> None:
    with store.writing() as session:
        survey = _plant(session, seed)
        whole = _whole_route(session, survey)
        walked = route.RouteOf(session, survey)
        so_far = walked.progress()
        assert so_far.total == len(whole)
        assert so_far.done == sum(row.condition is not None for row in whole)
        assert walked.not_accessible() == sum(
            row.condition is TrapCondition.NOT_ACCESSIBLE for row in whole
        )
        assert so_far.areas == list(dict.fromkeys(row.area for row in whole))
        first = next((row.trap_id for row in whole if row.condition is None), None)
        found = walked.next_untested()
        assert (found.trap_id if found else None) == first
        for index, row in enumerate(whole):
            trap = session.get_one(Trap, row.trap_id)
            wrapped = whole[index + 1 :] + whole[: index + 1]
            after = next((r.trap_id for r in wrapped if r.condition is None), None)
            found = walked.next_untested(after=trap)
            assert (found.trap_id if found else None) == after, row
            place = walked.place_of(trap)
            assert place.position == index
            following = whole[index + 1].trap_id if index + 1 < len(whole) else None
            assert (place.following.trap_id if place.following else None) == following
        retired = session.scalars(
            select(Trap).where(Trap.site_id == survey.site_id, Trap.in_service.is_(False))
        ).first()
        if retired is not None:
            assert walked.place_of(retired) == route.Place(None, None)
