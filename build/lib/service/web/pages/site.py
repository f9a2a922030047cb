"""Sites, a site's home, its summary and printed report, downloads, and its settings."""

import datetime as dt
from typing import Annotated, Any

from fastapi import APIRouter, Query, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.physics.annual import ClosedReturnPricing, HeatingValue
from service.physics.conditions import TrapCondition
from service.physics.units import Dimension, UnitSystem
from service.reports.compare import compare_surveys
from service.reports.exports import repair_list_csv, repair_list_table, xlsx_bytes
from service.reports.opportunities import flash_recovery_what_if
from service.reports.pricing import SitePricing
from service.reports.schemas import ComparisonOut, FlashRecoveryWhatIfOut, SummaryOut
from service.reports.summary import SiteSummary, site_summary
from service.store import exports, register, surveys
from service.store.errors import ConflictError, FieldError
from service.store.models import Site, Survey
from service.store.schemas import SurveyCreate
from service.store.vocabulary import CostBasis
from service.web.access import Managing, Reading
from service.web.api.sites import survey_of_site
from service.web.dependencies import MAX_RECORD_ID, Db, RecordId
from service.web.display import Display
from service.web.forms import Form
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)


def survey_choice(session: Session, site: Site, survey_id: int | None) -> Survey | None:
    if survey_id is None:
        return surveys.latest_survey(session=session, site=site)
    return survey_of_site(session, site, survey_id)


def _previous(session: Session, site: Site, survey: Survey | None) -> Survey | None:
    if survey is None:
        return None
    earlier = [
        other
        for other in surveys.surveys_of(session=session, site=site)
        if (other.started_on, other.id) < (survey.started_on, survey.id)
    ]
    return earlier[0] if earlier else None


SCREEN_ROWS = 100  # rows of a list on screen; the downloads and the report hold them all
TAGS_SHOWN = 12  # tags named for each kind of change since the survey before


def summary_context(
    request: Request,
    session: Session,
    site: Site,
    survey: Survey | None,
    row_limit: int | None = SCREEN_ROWS,
    what_if: Form | None = None,
) -> dict[str, Any]:
    """Everything the summary, the report and the site home show: one context. The
    survey before, for the comparison, comes from the app's cache of roll-ups. With
    `what_if` (the flash-recovery form), its answer or its errors."""
    pricing = SitePricing.of(site)
    rolled_up = site_summary(session=session, site=site, survey=survey, pricing=pricing)
    summary = SummaryOut.of(rolled_up)
    recovery = None
    if what_if is not None:
        recovery = _flash_recovery(what_if, rolled_up, pricing, display_for(site))
    previous = _previous(session, site, survey)
    comparison = None
    if previous is not None and survey is not None:
        comparison = ComparisonOut.of(
            at_most=TAGS_SHOWN,
            comparison=compare_surveys(
                session=session,
                site=site,
                before=previous,
                after=survey,
                after_summary=rolled_up,
                before_summary=request.app.state.rollups.summary(
                    session=session, site=site, survey=previous, pricing=pricing
                ),
                pricing=pricing,
            ),
        )
    return {
        "summary": summary,
        "comparison": comparison,
        "surveys": surveys.surveys_of(session=session, site=site),
        "survey": survey,
        "today": dt.date.today(),
        "row_limit": row_limit,
        "what_if": what_if or Form({}),
        "recovery": recovery,
    }


def _flash_recovery(
    form: Form, summary: SiteSummary, pricing: SitePricing, show: Display
) -> FlashRecoveryWhatIfOut | None:
    """The summary's flash-recovery what-if, from its form (vessel pressure in the site's
    units, an area or every one); None with the errors in the form."""
    vessel_kpa_g = form.number("vessel", show, Dimension.PRESSURE)
    if vessel_kpa_g is None:
        form.errors.setdefault("vessel", "enter the vessel's pressure")
        return None
    area = form.text("area") or None
    if area is not None and area not in summary.by_area:
        form.errors["area"] = f"the survey has no area '{area}'"
        return None
    try:
        what_if = flash_recovery_what_if(
            summary=summary, pricing=pricing, vessel_pressure_kpa_g=vessel_kpa_g, area_name=area
        )
    except ValueError as error:
        form.errors["vessel"] = str(error)
        return None
    return FlashRecoveryWhatIfOut.model_validate(what_if)


@router.get("/", response_class=HTMLResponse)
def sites(request: Request, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        found = [
            each
            for each in session.scalars(select(Site).order_by(Site.name))
            if viewer.sees(each.id)
        ]
        headlines: dict[int, SummaryOut | None] = {}
        for each in found:
            latest = surveys.latest_survey(session=session, site=each)
            headlines[each.id] = (
                SummaryOut.of(
                    request.app.state.rollups.summary(
                        session=session, site=each, survey=latest, pricing=SitePricing.of(each)
                    )
                )
                if latest is not None
                else None
            )
        return page(
            request,
            "sites.html",
            sites=found,
            headlines=headlines,
            displays={each.id: display_for(each) for each in found},
        )


@router.get("/sites/{site_id}", response_class=HTMLResponse)
def site_home(request: Request, site_id: RecordId, db: Db, viewer: Reading) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = surveys.latest_survey(session=session, site=site)
        context = summary_context(request, session, site, survey)
        return page(request, "site_home.html", site=site, **context)


@router.post("/sites/{site_id}/surveys", response_class=HTMLResponse)
async def start_survey(request: Request, site_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    fields = {
        "name": form.text("name"),
        "started_on": form.text("started_on") or None,
        "notes": form.text("notes"),
    }
    try:
        with db.writing(viewer.actor) as session:
            site = viewer.get(session, Site, site_id)
            data = SurveyCreate.model_validate(fields)
            survey = surveys.create_survey(session=session, site=site, data=data)
        return RedirectResponse(f"/surveys/{survey.id}/walk", status_code=303)
    except ValidationError as error:
        form.absorb(error)
    except ConflictError as error:
        form.errors["name"] = str(error)
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        context = summary_context(
            request, session, site, surveys.latest_survey(session=session, site=site)
        )
        return page(request, "site_home.html", site=site, form=form, status_code=422, **context)


SurveyId = Annotated[
    int | None, Query(ge=1, le=MAX_RECORD_ID, description="Default: the latest survey")
]


@router.get("/sites/{site_id}/summary", response_class=HTMLResponse)
def summary_page(
    request: Request, site_id: RecordId, db: Db, viewer: Reading, survey_id: SurveyId = None
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        typed = {name: str(value) for name, value in request.query_params.items()}
        what_if = Form(typed) if "vessel" in typed else None
        context = summary_context(
            request, session, site, survey_choice(session, site, survey_id), what_if=what_if
        )
        status = 422 if what_if is not None and what_if.errors else 200
        return page(request, "summary.html", site=site, status_code=status, **context)


@router.get("/sites/{site_id}/report", response_class=HTMLResponse)
def report_page(
    request: Request, site_id: RecordId, db: Db, viewer: Reading, survey_id: SurveyId = None
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        context = summary_context(
            request, session, site, survey_choice(session, site, survey_id), row_limit=None
        )
        return page(request, "report.html", site=site, print_only=True, **context)


def _download(content: bytes | str, filename: str, media_type: str) -> Response:
    return Response(
        content=content,
        media_type=media_type,
        headers={"Content-Disposition": f'attachment; filename="{filename}"'},
    )


XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"


@router.get("/sites/{site_id}/downloads/repair-list.{suffix}")
def repair_list_download(
    site_id: RecordId, suffix: str, db: Db, viewer: Reading, survey_id: SurveyId = None
) -> Response:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        survey = survey_choice(session, site, survey_id)
        summary = SummaryOut.of(site_summary(session=session, site=site, survey=survey))
    if suffix == "csv":
        return _download(repair_list_csv(summary), "repair-list.csv", "text/csv; charset=utf-8")
    if suffix == "xlsx":
        return _download(
            xlsx_bytes("Repair list", *repair_list_table(summary)), "repair-list.xlsx", XLSX
        )
    return Response(status_code=404)


@router.get("/surveys/{survey_id}/downloads/findings.{suffix}")
def findings_download(survey_id: RecordId, suffix: str, db: Db, viewer: Reading) -> Response:
    with db.reading() as session:
        survey = viewer.get(session, Survey, survey_id)
        if suffix == "csv":
            text = exports.findings_csv(session=session, survey=survey)
            return _download(text, "findings.csv", "text/csv; charset=utf-8")
        if suffix == "xlsx":
            table = exports.findings_table(session=session, survey=survey)
            return _download(xlsx_bytes("Findings", *table), "findings.xlsx", XLSX)
    return Response(status_code=404)


# Settings -----------------------------------------------------------------------------

# (field, dimension or None, label, help and source of the default)
SETTINGS_FIELDS: list[tuple[str, Dimension | None, str, str]] = [
    (
        "steam_cost_per_tonne",
        Dimension.PRICE_PER_MASS,
        "Steam cost",
        "All-in cost of steam (fuel, water, treatment), used on the steam-cost basis.",
    ),
    (
        "fuel_price_per_gj",
        Dimension.PRICE_PER_ENERGY,
        "Fuel price",
        "Price of fuel energy, used on the fuel-price basis.",
    ),
    (
        "water_and_treatment_cost_per_tonne",
        Dimension.PRICE_PER_MASS,
        "Water and treatment",
        "Water and chemicals per tonne lost, added on the fuel-price basis.",
    ),
    (
        "boiler_efficiency",
        None,
        "Boiler efficiency (0 to 1)",
        "Fuel to steam. Typical 0.75 to 0.85 (common practice); default 0.80.",
    ),
    (
        "makeup_water_temperature_c",
        Dimension.TEMPERATURE,
        "Makeup water temperature",
        "Cold water that replaces what is lost. Default 15 °C (common practice).",
    ),
    (
        "sewer_cost_per_tonne",
        Dimension.PRICE_PER_MASS,
        "Sewer charge on drained condensate",
        "Sewer or trade-effluent charge per tonne run to drain, on either basis. Default 0.",
    ),
    (
        "drain_temperature_limit_c",
        Dimension.TEMPERATURE,
        "Hottest water the sewer may take",
        "Blank: no limit. Hot drains are cooled with make-up water to it, priced at water "
        "and treatment plus the sewer charge (local discharge consents set it).",
    ),
    (
        "co2_kg_per_gj_fuel",
        Dimension.EMISSION_FACTOR,
        "CO₂ per unit of fuel energy",
        "Natural gas 56.1 kg/GJ, IPCC 2006 Guidelines vol. 2 table 2.2 (LHV basis).",
    ),
    (
        "net_to_gross_ratio",
        None,
        "Net over gross heating value (0.8 to 1)",
        "Converts a CO₂ factor quoted on the other heating-value basis. Natural gas about "
        "0.9 (IPCC 2006 vol. 2 ch. 1, from memory).",
    ),
    (
        "hours_per_year",
        None,
        "Hours in service a year",
        "Default 8760 (common practice: all year); a trap may set its own.",
    ),
    (
        "discharge_coefficient",
        None,
        "Discharge coefficient Cd",
        "0.7 by default: between a sharp-edged orifice's 0.6 and the 0.73 the US DOE trap "
        "table implies (common practice).",
    ),
    ("discharge_coefficient_low", None, "Cd, low end", "For the low estimate. Default 0.6."),
    ("discharge_coefficient_high", None, "Cd, high end", "For the high estimate. Default 0.8."),
    (
        "elevation_m",
        None,
        "Elevation (m)",
        "Sets the atmospheric pressure by the ICAO standard atmosphere, unless given below.",
    ),
    (
        "atmospheric_pressure_kpa",
        None,
        "Atmospheric pressure (kPa)",
        "Leave blank to take it from the elevation (or 101.325 kPa).",
    ),
]
# (field, label, its words, help): the settings chosen from a list.
SETTINGS_CHOICES: list[tuple[str, str, list[str], str]] = [
    (
        "fuel_heating_value",
        "Heating value of the boiler efficiency and fuel price",
        list(HeatingValue),
        "Say which basis your efficiency and fuel price are quoted on.",
    ),
    (
        "co2_factor_heating_value",
        "Heating value of the CO₂ factor",
        list(HeatingValue),
        "IPCC factors are net (LHV); US EPA factors are gross (HHV).",
    ),
    (
        "closed_return_pricing",
        "Live steam blowing into a closed return",
        list(ClosedReturnPricing),
        "The water comes back: by default only the heat the return does not bring back is lost.",
    ),
]
LOSS_CONDITIONS = (TrapCondition.LEAKING, TrapCondition.BLOW_THROUGH, TrapCondition.RAPID_CYCLING)


def _settings_typed(site: Site, show: Display) -> dict[str, str]:
    typed: dict[str, str] = {
        "name": site.name,
        "location": site.location,
        "currency": site.currency,
        "unit_system": site.unit_system.value,
        "cost_basis": site.cost_basis.value,
    }
    for name, _, _, _ in SETTINGS_CHOICES:
        typed[name] = str(getattr(site, name))
    for name, dimension, _, _ in SETTINGS_FIELDS:
        value = getattr(site, name)
        if name == "atmospheric_pressure_kpa" and site.elevation_m is not None:
            value = None
        if value is not None and dimension is not None:
            value = show.value(dimension, value)
        typed[name] = "" if value is None else f"{value:.6g}"
    for condition in LOSS_CONDITIONS:
        for index, end in enumerate(("typical", "low", "high")):
            typed[f"loss_{condition}_{end}"] = f"{site.loss_factors[condition][index]:g}"
    for trap_type, costs in site.repair_costs.items():
        for kind, cost in costs.items():
            typed[f"cost_{trap_type}_{kind}"] = f"{cost:g}"
    return typed


def _settings_changes(form: Form, site: Site, show: Display) -> dict[str, Any]:
    changes: dict[str, Any] = {
        "name": form.text("name"),
        "location": form.text("location"),
        "currency": form.text("currency").upper(),
        "unit_system": form.text("unit_system"),
        "cost_basis": form.text("cost_basis"),
    }
    for name, _, _, _ in SETTINGS_CHOICES:
        changes[name] = form.text(name)
    for name, dimension, _, _ in SETTINGS_FIELDS:
        changes[name] = form.number(name, show, dimension)
    changes["loss_factors"] = {
        str(condition): {
            end: form.number(f"loss_{condition}_{end}") for end in ("typical", "low", "high")
        }
        for condition in LOSS_CONDITIONS
    }
    changes["repair_costs"] = {
        trap_type: {kind: form.number(f"cost_{trap_type}_{kind}") for kind in costs}
        for trap_type, costs in site.repair_costs.items()
    }
    return changes


def _settings_page(
    request: Request, site: Site, form: Form, saved: bool, status: int
) -> HTMLResponse:
    return page(
        request,
        "settings.html",
        site=site,
        form=form,
        saved=saved,
        fields=SETTINGS_FIELDS,
        choices=SETTINGS_CHOICES,
        loss_conditions=LOSS_CONDITIONS,
        unit_systems=list(UnitSystem),
        cost_bases=list(CostBasis),
        status_code=status,
    )


@router.get("/sites/{site_id}/settings", response_class=HTMLResponse)
def settings_page(
    request: Request, site_id: RecordId, db: Db, viewer: Managing, saved: bool = False
) -> HTMLResponse:
    with db.reading() as session:
        site = viewer.get(session, Site, site_id)
        form = Form(_settings_typed(site, display_for(site)))
        return _settings_page(request, site, form, saved, 200)


class _Refused(Exception):  # noqa: N818 - the form was refused, with reasons in it
    """Leaves a writing block, so that nothing of it is committed."""


@router.post("/sites/{site_id}/settings", response_class=HTMLResponse)
async def save_settings(request: Request, site_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    try:
        with db.writing(viewer.actor) as session:
            site = viewer.get(session, Site, site_id)
            # Typed figures are in the units the site shows now, before any change of system.
            changes = _settings_changes(form, site, display_for(site))
            if not form.ok:
                raise _Refused
            register.update_site(session=session, site=site, changes=changes)
    except ValidationError as error:
        _absorb_site_errors(form, error)
    except FieldError as error:
        form.errors[error.field] = str(error)
    except ConflictError as error:
        form.errors["name"] = str(error)
    except _Refused:
        pass
    if form.ok:
        return RedirectResponse(f"/sites/{site_id}/settings?saved=true", status_code=303)
    with db.reading() as session:
        return _settings_page(request, viewer.get(session, Site, site_id), form, False, 422)


def _absorb_site_errors(form: Form, error: ValidationError) -> None:
    for entry in error.errors():
        location = [str(part) for part in entry["loc"]] or ["form"]
        if location[0] == "loss_factors" and len(location) >= 2:
            end = location[2] if len(location) > 2 else "typical"
            name = f"loss_{location[1]}_{end}"
        elif location[0] == "repair_costs" and len(location) >= 3:
            name = f"cost_{location[1]}_{location[2]}"
        else:
            name = location[0]
        form.errors.setdefault(name, entry["msg"].removeprefix("Value error, "))
