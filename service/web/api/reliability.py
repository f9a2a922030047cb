"""Fleet reliability: failure rates and survival by group, test-interval advice, what
the next round can expect, and every round's figures side by side."""

from fastapi import APIRouter, Request
from fastapi.responses import Response

from service.reports.schemas import ReliabilityOut, RoundTrendOut
from service.store.csv_format import write_table
from service.store.models import Site
from service.web.access import Reading
from service.web.dependencies import Db, RecordId
from service.web.rollups import NextRoundOn, reliability_for, trends_for

router = APIRouter(tags=["reliability"])

CSV_COLUMNS = (
    "breakdown",
    "key",
    "lives",
    "failures",
    "exposure_years",
    "failures_per_year",
    "failures_per_year_low",
    "failures_per_year_high",
    "weibull_shape",
    "weibull_scale_years",
    "mean_failure_loss",
    "best_test_interval_years",
    "doe_interval",
)


@router.get("/sites/{site_id}/reliability", summary="How long traps last; how often to test")
def reliability(
    site_id: RecordId, request: Request, db: Db, viewer: Reading, next_round_on: NextRoundOn = None
) -> ReliabilityOut:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        return ReliabilityOut.of(reliability_for(request, session, site, next_round_on))


@router.get(
    "/sites/{site_id}/exports/reliability.csv",
    summary="The reliability groups as CSV",
    response_class=Response,
)
def reliability_csv(site_id: RecordId, request: Request, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        found = ReliabilityOut.of(reliability_for(request, session, site, None))
    rows = [
        [group.model_dump()[name] for name in CSV_COLUMNS] + [found.currency]
        for group in found.groups
    ]
    return Response(
        write_table([*CSV_COLUMNS, "currency"], rows),
        media_type="text/csv; charset=utf-8",
        headers={"Content-Disposition": 'attachment; filename="reliability.csv"'},
    )


@router.get("/sites/{site_id}/trends", summary="Every round's failure and installation figures")
def trends(site_id: RecordId, request: Request, db: Db, viewer: Reading) -> list[RoundTrendOut]:
    """Oldest first; any two rounds compare at /sites/{id}/compare."""
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        return [RoundTrendOut.of(trend) for trend in trends_for(request, session, site)]
