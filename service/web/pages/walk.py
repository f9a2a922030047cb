"""The survey walk: a survey's traps in route order, and the finding form, one trap at a
time, built for a gloved technician on a tablet with poor Wi-Fi.

Each form carries an idempotency key made when it is shown, so a save retried after
a dropped connection stores one finding. After a save the next page reads the finding
back from the database and says so: that is what "reached the server" means here.
"""

import datetime as dt
import uuid
from typing import Annotated, Any
from urllib.parse import unquote

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError
from sqlalchemy.orm import Session

from service.accounts.roles import Permission
from service.physics.evidence import Doubt, temperature_doubts
from service.physics.pressure import absolute_from_gauge
from service.physics.units import Dimension
from service.shipped import STATIC
from service.store import photos, register, route, surveys
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.store.models import Finding, Site, Survey, Trap
from service.store.records import get
from service.store.schemas import FindingCreate, TrapCreate
from service.store.vocabulary import RecommendedAction, TestMethod
from service.web.access import NotPermitted, Reading, Recording, Viewer
from service.web.dependencies import Db, OptionalRecordIdQuery, RecordId, record_id
from service.web.forms import Form
from service.web.pages import trap_form
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)

# Kept in a cookie from one save to the next: the name a manager typed, and the test
# method only while the technician pins it (a method carried over unseen is a wrong one).
COOKIE_PREFIX = "traptally_walk_"
TESTED_BY_COOKIE, PINNED_METHOD_COOKIE = COOKIE_PREFIX + "tested_by", COOKIE_PREFIX + "method"
REMEMBERED_DAYS = 14


@router.get("/sites/{site_id}/walk")
def site_walk(site_id: RecordId, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = surveys.latest_survey(session=session, site=site)
    target = f"/surveys/{survey.id}/walk" if survey else f"/sites/{site_id}#start-survey"
    return RedirectResponse(target, status_code=303)


ROUTE_PAGE = 60  # rows of the route on one page: light enough for a tablet on poor Wi-Fi


@router.get("/surveys/walk-sw.js")
def walk_service_worker() -> Response:
    """The walk's service worker, served from /surveys/ so that its scope holds every
    walk page (a worker's scope is at most the folder it is served from)."""
    return Response(
        (STATIC / "walk-sw.js").read_bytes(),
        media_type="text/javascript",
        headers={"Cache-Control": "no-cache"},  # a new version is picked up at once
    )


@router.get("/surveys/{survey_id}/walk/offline")
def walk_for_offline(survey_id: RecordId, db: Db, viewer: Reading) -> dict[str, Any]:
    """The pages a tablet keeps to walk this round without a connection: the route and
    each trap's form, in route order."""
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        trap_ids = route.RouteOf(session, survey).trap_ids()
    walk_url = f"/surveys/{survey_id}/walk"
    return {"pages": [walk_url, *(f"{walk_url}/traps/{trap_id}" for trap_id in trap_ids)]}


@router.get("/surveys/{survey_id}/walk", response_class=HTMLResponse)
def walk(
    request: Request,
    survey_id: RecordId,
    db: Db,
    viewer: Reading,
    area: str | None = None,
    retest: bool = False,
    offset: Annotated[int, Query(ge=0)] = 0,
) -> HTMLResponse:
    """The route; with `retest`, only the traps found not accessible in this round, to
    try again (a ladder fetched, a guard removed)."""
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        return _walk_page(request, session, survey, area, retest, offset)


def _walk_page(
    request: Request,
    session: Session,
    survey: Survey,
    area: str | None = None,
    retest: bool = False,
    offset: int = 0,
    find: Form | None = None,
    status_code: int = 200,
) -> HTMLResponse:
    site = get(session, Site, survey.site_id)
    walked = route.RouteOf(session, survey)
    stops, shown = walked.page(area=area, retest=retest, offset=offset, limit=ROUTE_PAGE)
    so_far = walked.progress()
    # Every trap on a "test again" list has a finding already: none is untested.
    untested = not retest and so_far.done < so_far.total
    return page(
        request,
        "walk.html",
        site=site,
        survey=survey,
        route=stops,
        areas=so_far.areas,
        area=area or "",
        retest=retest,
        not_accessible=walked.not_accessible(),
        done=so_far.done,
        total=so_far.total,
        shown=shown,
        offset=offset,
        page_size=ROUTE_PAGE,
        next_trap=walked.next_untested(area=area) if untested else None,
        find=find or Form({}),
        status_code=status_code,
    )


@router.get("/surveys/{survey_id}/walk/find", response_class=HTMLResponse)
def find_by_tag(
    request: Request,
    survey_id: RecordId,
    db: Db,
    viewer: Reading,
    tag: Annotated[str, Query(max_length=200)] = "",
) -> Response:
    """Open a trap by its tag, typed or read from its label's QR code (which holds an
    address ending in /tags/TAG: the tag is taken from it)."""
    typed = unquote(tag.rsplit("/tags/", 1)[-1]) if "/tags/" in tag else tag
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        site = get(session, Site, survey.site_id)
        try:
            trap = register.trap_tagged(session=session, site=site, tag=typed)
        except NotFoundError:
            find = Form({"tag": typed})
            find.errors["tag"] = f"No trap tagged '{typed.strip()}' in this site's register."
            return _walk_page(request, session, survey, find=find, status_code=404)
    return RedirectResponse(f"/surveys/{survey_id}/walk/traps/{trap.id}", status_code=303)


# What a reading that disagrees with the finding suggests, in the trade's words; the
# first figure is the reading, the second the temperature it is set against.
DOUBT_WORDS: dict[Doubt, str] = {
    Doubt.BACKED_UP: "The temperature before the trap, {reading}, is far below saturation at "
    "its inlet pressure, {against}: condensate backing up (a flooded or plugged trap) or a "
    "line out of use reads like this.",
    Doubt.STEAM_PASSING: "The temperature after the trap, {reading}, is close to saturation "
    "at its inlet pressure, {against}, well above its return's: live steam passing the trap "
    "reads like this.",
    Doubt.HOT_INLET: "The temperature before the trap, {reading}, is at saturation, "
    "{against}: a plugged trap usually backs condensate up and reads cooler before it.",
    Doubt.OUTLET_HOTTER: "The temperature after the trap, {reading}, is hotter than before "
    "it, {against}: check both readings.",
}


def _doubts(site: Site, trap: Trap, data: FindingCreate) -> list[str]:
    """What the temperatures typed suggest against the finding, in words and site units."""
    show = display_for(site)
    found = temperature_doubts(
        condition=data.condition,
        inlet_pressure_kpa_abs=absolute_from_gauge(
            trap.inlet_pressure_kpa_g, site.atmospheric_pressure_kpa
        ),
        return_pressure_kpa_abs=absolute_from_gauge(
            trap.return_pressure_kpa_g, site.atmospheric_pressure_kpa
        ),
        upstream_c=data.upstream_temperature_c,
        downstream_c=data.downstream_temperature_c,
    )
    return [
        DOUBT_WORDS[doubt.doubt].format(
            reading=show.temperature(doubt.reading_c), against=show.temperature(doubt.against_c)
        )
        for doubt in found
    ]


def _finding_page(
    request: Request,
    session: Session,
    survey: Survey,
    trap: Trap,
    form: Form,
    *,
    saved: Finding | None = None,
    doubts: list[str] | None = None,
    status_code: int = 200,
) -> HTMLResponse:
    site = get(session, Site, survey.site_id)
    walked = route.RouteOf(session, survey)
    so_far = walked.progress()
    # Where a save kept on the tablet (no connection) goes on to: the next trap in route
    # order, as the server cannot say which are still untested.
    place = walked.place_of(trap)
    following = place.following
    next_url = f"/surveys/{survey.id}/walk" + (
        f"/traps/{following.trap_id}" if following is not None else ""
    )
    earlier = surveys.list_findings(session=session, trap=trap, limit=1000, offset=0).items
    return page(
        request,
        "finding_form.html",
        site=site,
        survey=survey,
        trap=trap,
        form=form,
        saved=saved,
        saved_trap=get(session, Trap, saved.trap_id) if saved else None,
        position=place.position,
        total=so_far.total,
        done=so_far.done,
        history=list(reversed(earlier))[:3],
        methods=list(TestMethod),
        actions=list(RecommendedAction),
        doubts=doubts or [],
        next_url=next_url,
        status_code=status_code,
    )


def _blank_form(request: Request) -> Form:
    pinned = request.cookies.get(PINNED_METHOD_COOKIE, "")
    typed = {
        "tested_by": request.cookies.get(TESTED_BY_COOKIE, ""),
        "method": pinned,
        "pin_method": "yes" if pinned else "",
    }
    typed["idempotency_key"] = uuid.uuid4().hex
    # When the form was opened: the finding's moment unless one is typed. Sent with the
    # form, so a save retried after a dropped connection is the very same finding.
    typed["opened_at"] = dt.datetime.now(dt.UTC).replace(microsecond=0).isoformat()
    return Form(typed)


def _trap_of_survey(session: Session, survey: Survey, trap_id: int) -> Trap:
    trap = get(session, Trap, trap_id)
    if trap.site_id != survey.site_id:
        raise NotFoundError("trap", trap_id)
    return trap


@router.get("/surveys/{survey_id}/walk/traps/{trap_id}", response_class=HTMLResponse)
def finding_form(
    request: Request,
    survey_id: RecordId,
    trap_id: RecordId,
    db: Db,
    viewer: Reading,
    saved: OptionalRecordIdQuery = None,
) -> HTMLResponse:
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        trap = _trap_of_survey(session, survey, trap_id)
        stored = session.get(Finding, saved) if saved is not None else None
        return _finding_page(request, session, survey, trap, _blank_form(request), saved=stored)


def _finding_fields(form: Form, trap: Trap, site: Site, viewer: Viewer) -> dict[str, Any]:
    show = display_for(site)
    moment = form.text("tested_at") or form.text("opened_at")
    return {
        "trap_id": trap.id,
        "tested_at": moment or dt.datetime.now(dt.UTC).replace(microsecond=0),
        "tested_by": viewer.tester(form.text("tested_by")),
        "method": form.text("method") or None,
        "condition": form.text("condition") or None,
        "loss_factor_override": form.number("loss_factor_override"),
        "upstream_temperature_c": form.number("upstream_temperature", show, Dimension.TEMPERATURE),
        "downstream_temperature_c": form.number(
            "downstream_temperature", show, Dimension.TEMPERATURE
        ),
        "recommended_action": form.text("recommended_action") or RecommendedAction.NONE,
        "notes": form.text("notes"),
    }


FORM_NAMES = {
    "upstream_temperature_c": "upstream_temperature",
    "downstream_temperature_c": "downstream_temperature",
    "Idempotency-Key": "idempotency_key",
}


async def _photo_sent(request: Request) -> bytes:
    """The photo the form carries (b"" for none), read no further than the size limit
    allows, so that an oversized one is refused without being read whole."""
    upload = (await request.form()).get("photo")
    if upload is None or isinstance(upload, str):
        return b""
    try:
        return await upload.read(photos.MAX_PHOTO_BYTES + 1)
    finally:
        await upload.close()  # its spooled file; the form was read by hand, not by FastAPI


@router.post("/surveys/{survey_id}/walk/traps/{trap_id}", response_class=HTMLResponse)
async def save_finding(
    request: Request, survey_id: RecordId, trap_id: RecordId, db: Db, viewer: Recording
) -> Response:
    form = await Form.of(request)
    key = form.text("idempotency_key") or None
    correction = form.text("correction") == "yes"
    if correction and not viewer.may(Permission.MANAGE):
        raise NotPermitted
    photo = await _photo_sent(request)
    with db.writing(viewer.actor) as session:
        survey = viewer.get(session, Survey, survey_id)
        trap = _trap_of_survey(session, survey, trap_id)
        site = viewer.get(session, Site, survey.site_id)
        fields = _finding_fields(form, trap, site, viewer)
        finding: Finding | None = None
        if form.ok:
            try:
                if photo:
                    photos.check_photo(photo)
                data = FindingCreate.model_validate(fields)
                doubts = [] if form.text("confirmed") == "yes" else _doubts(site, trap, data)
                if doubts:
                    return _finding_page(request, session, survey, trap, form, doubts=doubts)
                finding, replayed = surveys.record_finding(
                    session=session,
                    survey=survey,
                    data=data,
                    idempotency_key=key,
                    correction=correction,
                )
                if photo and not replayed:
                    session.flush()
                    photos.store_photo(
                        session=session,
                        folder=request.app.state.photo_folder,
                        finding=finding,
                        content=photo,
                    )
            except ConflictError as error:
                form.errors["round"] = f"Not saved: {error}. What you entered is kept."
            except (ValidationError, FieldError) as error:
                form.absorb(error, FORM_NAMES)
                if isinstance(error, FieldError) and error.field == surveys.IDEMPOTENCY_HEADER:
                    # The first save reached the server before the answer was lost, and
                    # this entry differs: a new key lets it be saved as the latest finding.
                    form.typed["idempotency_key"] = uuid.uuid4().hex
                    form.errors["idempotency_key"] = (
                        "An earlier save of this trap reached the server before the "
                        "connection dropped, with other values. Save again to record this "
                        "entry as the latest finding."
                    )
        if finding is None:
            return _finding_page(request, session, survey, trap, form, status_code=422)
        session.flush()
        following = route.RouteOf(session, survey).next_untested(after=trap)
    target = (
        f"/surveys/{survey_id}/walk/traps/{following.trap_id}?saved={finding.id}"
        if following is not None
        else f"/surveys/{survey_id}/walk?saved={finding.id}"
    )
    answer = RedirectResponse(target, status_code=303)
    kept = {TESTED_BY_COOKIE: form.text("tested_by")}
    kept[PINNED_METHOD_COOKIE] = form.text("method") if form.text("pin_method") == "yes" else ""
    for name, value in kept.items():
        if value:
            answer.set_cookie(
                name, value, max_age=REMEMBERED_DAYS * 24 * 3600, samesite="lax", httponly=True
            )
        else:
            answer.delete_cookie(name)
    return answer


# A trap found in the field ------------------------------------------------------------


def _new_trap_page(
    request: Request, session: Session, survey: Survey, form: Form, status_code: int = 200
) -> HTMLResponse:
    site = get(session, Site, survey.site_id)
    return page(
        request,
        "new_trap.html",
        site=site,
        survey=survey,
        form=form,
        status_code=status_code,
        **trap_form.choices(session, site),
    )


@router.get("/surveys/{survey_id}/walk/new-trap", response_class=HTMLResponse)
def new_trap_form(
    request: Request,
    survey_id: RecordId,
    db: Db,
    viewer: Recording,
    after: OptionalRecordIdQuery = None,
) -> HTMLResponse:
    """`after`: the trap where this one was found; the new trap goes next to it."""
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        typed: dict[str, str] = {}
        if after is not None:
            found_after = _trap_of_survey(session, survey, after)
            typed = {"after": str(after), "area_id": str(found_after.area_id or "")}
            typed["location"] = f"Near {found_after.tag}"
        return _new_trap_page(request, session, survey, Form(typed))


@router.post("/surveys/{survey_id}/walk/new-trap", response_class=HTMLResponse)
async def add_trap(request: Request, survey_id: RecordId, db: Db, viewer: Recording) -> Response:
    form = await Form.of(request)
    with db.writing(viewer.actor) as session:
        survey = viewer.get(session, Survey, survey_id)
        site = viewer.get(session, Site, survey.site_id)
        # Left blank, a field takes the register's default.
        typed = trap_form.trap_fields(form, display_for(site))
        fields = {name: value for name, value in typed.items() if value not in (None, "")}
        fields.setdefault("notes", "Added during the survey walk.")
        trap: Trap | None = None
        after = record_id(form.text("after"))
        found_after = None
        if after is not None:
            try:
                found_after = _trap_of_survey(session, survey, after)
            except NotFoundError:
                form.errors["after"] = (
                    "The trap where this one was found is not in this site's register: add "
                    "it from the route instead."
                )
        if form.ok:
            try:
                trap = register.create_trap(
                    session=session, site=site, data=TrapCreate.model_validate(fields)
                )
                if found_after is not None:
                    register.place_after(session=session, trap=trap, found_after=found_after)
            except (ValidationError, FieldError) as error:
                form.absorb(error, trap_form.FORM_NAMES)
            except ConflictError as error:
                form.errors["tag"] = str(error)
        if trap is None:
            return _new_trap_page(request, session, survey, form, status_code=422)
        return RedirectResponse(f"/surveys/{survey_id}/walk/traps/{trap.id}", status_code=303)
