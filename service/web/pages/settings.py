"""A site's settings: every price, factor and default it is priced with."""

from typing import Any

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError

from service.physics.annual import ClosedReturnPricing, HeatingValue
from service.physics.conditions import LIVE_STEAM_CONDITIONS
from service.physics.units import Dimension, UnitSystem
from service.store import register
from service.store.errors import ConflictError, FieldError
from service.store.models import Site
from service.store.vocabulary import CostBasis
from service.web.access import Managing
from service.web.dependencies import Db, RecordId
from service.web.display import Display
from service.web.forms import Form
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)


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
        "test_cost_per_trap",
        None,
        "Cost of testing one trap",
        "Labour and overheads of one trap's test, for the test-interval advice. Default 10 "
        "(common practice: 10 to 15 traps an hour).",
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
    for condition in LIVE_STEAM_CONDITIONS:
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
        for condition in LIVE_STEAM_CONDITIONS
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
        loss_conditions=LIVE_STEAM_CONDITIONS,
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
