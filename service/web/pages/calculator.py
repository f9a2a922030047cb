"""The steam calculator: saturation, the state of a mixture, flash, and one trap's loss,
for an engineer checking a number by hand. Nothing is stored, so every form is a GET."""

from typing import Any

from fastapi import APIRouter, Depends, Request
from fastapi.responses import HTMLResponse
from pydantic import ValidationError

from service.accounts.roles import Permission
from service.physics import steam_tables
from service.physics.conditions import TrapCondition
from service.physics.flash import flash_of_condensate
from service.physics.pressure import absolute_from_gauge
from service.physics.states import state_from_enthalpy, state_from_quality, state_from_temperature
from service.physics.trap_loss import CondensateDestination, trap_loss
from service.physics.units import Dimension, UnitSystem
from service.web.access import require
from service.web.api.calc import TrapLossIn
from service.web.display import Display
from service.web.forms import Form
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False, dependencies=[Depends(require(Permission.READ))])


def _required(form: Form, name: str, value: float | None) -> float | None:
    if value is None and name not in form.errors:
        form.errors[name] = "enter a number"
    return value


def _saturation(form: Form, show: Display) -> Any:
    pressure = _required(form, "pressure", form.number("pressure", show, Dimension.PRESSURE))
    if pressure is None:
        return None
    return steam_tables.saturation_at_pressure(absolute_from_gauge(pressure))


def _state(form: Form, show: Display) -> Any:
    pressure = _required(form, "pressure", form.number("pressure", show, Dimension.PRESSURE))
    given = form.text("given")
    value = _required(
        form,
        "value",
        form.number("value", show, Dimension.TEMPERATURE if given == "temperature" else None),
    )
    if pressure is None or value is None:
        return None
    absolute = absolute_from_gauge(pressure)
    if given == "temperature":
        return state_from_temperature(absolute, value)
    if given == "enthalpy":
        return state_from_enthalpy(absolute, value)
    return state_from_quality(absolute, value)


def _flash(form: Form, show: Display) -> Any:
    inlet = _required(form, "inlet", form.number("inlet", show, Dimension.PRESSURE))
    outlet = _required(form, "return", form.number("return", show, Dimension.PRESSURE))
    if inlet is None or outlet is None:
        return None
    return flash_of_condensate(absolute_from_gauge(inlet), absolute_from_gauge(outlet))


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
    }
    if not form.ok:
        return None
    try:
        request = TrapLossIn.model_validate(
            {name: value for name, value in typed.items() if value is not None}
        )
    except ValidationError as error:
        form.absorb(error, TRAP_FIELDS)
        return None
    return trap_loss(request.trap_service(), request.economics())


CALCULATIONS = {"saturation": _saturation, "state": _state, "flash": _flash, "trap": _trap}


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
        conditions=list(TrapCondition),
        destinations=list(CondensateDestination),
        status_code=status,
    )
