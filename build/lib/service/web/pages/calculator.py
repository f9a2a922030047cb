"""The steam calculator: saturation, the state of a mixture, flash, flash recovery and
one trap's loss, for an engineer checking a number by hand. Nothing is stored, so every
form is a GET. Gauge pressures are read against the atmosphere given with them (a
site's, when it links here), else one standard atmosphere."""

from typing import Any, TypeVar

from fastapi import APIRouter, Depends, Request
from fastapi.responses import HTMLResponse
from pydantic import BaseModel, ValidationError

from service.accounts.roles import Permission
from service.physics import steam_tables
from service.physics.conditions import TrapCondition
from service.physics.flash import flash_of_condensate
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA, absolute_from_gauge
from service.physics.states import state_from_enthalpy, state_from_quality, state_from_temperature
from service.physics.trap_loss import CondensateDestination, trap_loss
from service.physics.units import Dimension, UnitSystem
from service.web.access import require
from service.web.api.calc import FlashRecoveryIn, TrapLossIn
from service.web.display import Display
from service.web.forms import Form
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False, dependencies=[Depends(require(Permission.READ))])


def _required(form: Form, name: str, value: float | None) -> float | None:
    if value is None and name not in form.errors:
        form.errors[name] = "enter a number"
    return value


# 50 kPa is the standard atmosphere near 5 500 m; 110 kPa is above any sea-level high.
ATMOSPHERE_RANGE_KPA = (50.0, 110.0)


def _atmosphere_kpa(form: Form) -> float:
    """The atmosphere the form's gauge pressures are read against [kPa]."""
    typed = form.number("atmosphere")
    if typed is None:
        return STANDARD_ATMOSPHERE_KPA
    low, high = ATMOSPHERE_RANGE_KPA
    if not low < typed <= high:
        form.errors["atmosphere"] = (
            f"an atmospheric pressure lies above {low:g} and up to {high:g} kPa"
        )
    return typed


def _saturation(form: Form, show: Display) -> Any:
    pressure = _required(form, "pressure", form.number("pressure", show, Dimension.PRESSURE))
    atmosphere = _atmosphere_kpa(form)
    if pressure is None or not form.ok:
        return None
    return steam_tables.saturation_at_pressure(absolute_from_gauge(pressure, atmosphere))


def _state(form: Form, show: Display) -> Any:
    pressure = _required(form, "pressure", form.number("pressure", show, Dimension.PRESSURE))
    given = form.text("given")
    value = _required(
        form,
        "value",
        form.number("value", show, Dimension.TEMPERATURE if given == "temperature" else None),
    )
    atmosphere = _atmosphere_kpa(form)
    if pressure is None or value is None or not form.ok:
        return None
    absolute = absolute_from_gauge(pressure, atmosphere)
    if given == "temperature":
        return state_from_temperature(absolute, value)
    if given == "enthalpy":
        return state_from_enthalpy(absolute, value)
    return state_from_quality(absolute, value)


def _flash(form: Form, show: Display) -> Any:
    inlet = _required(form, "inlet", form.number("inlet", show, Dimension.PRESSURE))
    outlet = _required(form, "return", form.number("return", show, Dimension.PRESSURE))
    temperature = form.number("flash_temp", show, Dimension.TEMPERATURE)
    atmosphere = _atmosphere_kpa(form)
    if inlet is None or outlet is None or not form.ok:
        return None
    return flash_of_condensate(
        absolute_from_gauge(inlet, atmosphere), absolute_from_gauge(outlet, atmosphere), temperature
    )


# The trap form's fields, by the trap-loss request's names.
TRAP_FIELDS = {
    "inlet_pressure_kpa_g": "inlet",
    "return_pressure_kpa_g": "return",
    "orifice_diameter_mm": "orifice",
    "hours_per_year": "hours",
    "steam_cost_per_tonne": "price",
    "condensate_load_kg_h": "load",
    "condition": "condition",
    "condensate_destination": "destination",
    "inlet_temperature_c": "inlet_temp",
    "steam_temperature_c": "steam_temp",
    "atmospheric_pressure_kpa": "atmosphere",
}


def _trap(form: Form, show: Display) -> Any:
    """One trap priced exactly as POST /api/v1/calc/trap-loss prices it."""
    typed = {
        "inlet_pressure_kpa_g": form.number("inlet", show, Dimension.PRESSURE),
        "return_pressure_kpa_g": form.number("return", show, Dimension.PRESSURE),
        "orifice_diameter_mm": form.number("orifice", show, Dimension.LENGTH),
        "hours_per_year": form.number("hours"),
        "steam_cost_per_tonne": form.number("price", show, Dimension.PRICE_PER_MASS),
        "condensate_load_kg_h": form.number("load", show, Dimension.MASS_FLOW),
        "condition": form.text("condition") or "blow_through",
        "condensate_destination": form.text("destination") or "closed_return",
        "inlet_temperature_c": form.number("inlet_temp", show, Dimension.TEMPERATURE),
        "steam_temperature_c": form.number("steam_temp", show, Dimension.TEMPERATURE),
        "atmospheric_pressure_kpa": form.number("atmosphere"),
    }
    request = _validated(form, TrapLossIn, typed, TRAP_FIELDS)
    return None if request is None else trap_loss(request.trap_service(), request.economics())


# The flash-recovery form's fields, by the request's names.
RECOVERY_FIELDS = {
    "condensate_load_kg_h": "fr_load",
    "inlet_pressure_kpa_g": "fr_inlet",
    "vessel_pressure_kpa_g": "fr_vessel",
    "hours_per_year": "fr_hours",
    "steam_energy_price_per_gj": "fr_price",
    "makeup_water_temperature_c": "fr_makeup",
    "atmospheric_pressure_kpa": "atmosphere",
}


def _flash_recovery(form: Form, show: Display) -> Any:
    """Flash recovered at a vessel, priced exactly as POST /api/v1/calc/flash-recovery."""
    typed = {
        "condensate_load_kg_h": form.number("fr_load", show, Dimension.MASS_FLOW),
        "inlet_pressure_kpa_g": form.number("fr_inlet", show, Dimension.PRESSURE),
        "vessel_pressure_kpa_g": form.number("fr_vessel", show, Dimension.PRESSURE),
        "hours_per_year": form.number("fr_hours"),
        "steam_energy_price_per_gj": form.number("fr_price", show, Dimension.PRICE_PER_ENERGY),
        "makeup_water_temperature_c": form.number("fr_makeup", show, Dimension.TEMPERATURE),
        "atmospheric_pressure_kpa": form.number("atmosphere"),
    }
    request = _validated(form, FlashRecoveryIn, typed, RECOVERY_FIELDS)
    return None if request is None else request.answer()


Request_ = TypeVar("Request_", bound=BaseModel)


def _validated(
    form: Form, model: type[Request_], typed: dict[str, Any], fields: dict[str, str]
) -> Request_ | None:
    """The request a form's numbers make, or None with the errors beside its fields."""
    if not form.ok:
        return None
    try:
        return model.model_validate(
            {name: value for name, value in typed.items() if value is not None}
        )
    except ValidationError as error:
        form.absorb(error, fields)
        return None


CALCULATIONS = {
    "saturation": _saturation,
    "state": _state,
    "flash": _flash,
    "trap": _trap,
    "flash_recovery": _flash_recovery,
}


@router.get("/calculator", response_class=HTMLResponse)
def calculator(request: Request) -> HTMLResponse:
    typed = {name: str(value) for name, value in request.query_params.items()}
    form = Form(typed)
    system = UnitSystem.US_CUSTOMARY if typed.get("units") == "us" else UnitSystem.SI
    show = Display(system=system, currency=typed.get("currency", "EUR")[:3].upper() or "EUR")
    which = typed.get("calc", "")
    result = None
    status = 200
    if which in CALCULATIONS:
        try:
            result = CALCULATIONS[which](form, show)
        except ValueError as error:
            form.errors["form"] = str(error)
        if form.errors:
            result, status = None, 422
    return page(
        request,
        "calculator.html",
        form=form,
        blank=Form({}),
        calc=which,
        result=result,
        show=show,
        system=system,
        atmosphere=typed.get("atmosphere", ""),
        conditions=list(TrapCondition),
        destinations=list(CondensateDestination),
        status_code=status,
    )
