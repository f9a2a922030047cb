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
from service.web.calculations import FlashRecoveryIn, TrapLossIn
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


# A form's number fields: (the request's field, the form's field, its dimension or None).
NumberFields = list[tuple[str, str, Dimension | None]]

TRAP_NUMBERS: NumberFields = [
    ("inlet_pressure_kpa_g", "inlet", Dimension.PRESSURE),
    ("return_pressure_kpa_g", "return", Dimension.PRESSURE),
    ("orifice_diameter_mm", "orifice", Dimension.LENGTH),
    ("hours_per_year", "hours", None),
    ("steam_cost_per_tonne", "price", Dimension.PRICE_PER_MASS),
    ("condensate_load_kg_h", "load", Dimension.MASS_FLOW),
    ("inlet_temperature_c", "inlet_temp", Dimension.TEMPERATURE),
    ("steam_temperature_c", "steam_temp", Dimension.TEMPERATURE),
    ("atmospheric_pressure_kpa", "atmosphere", None),
]
RECOVERY_NUMBERS: NumberFields = [
    ("condensate_load_kg_h", "fr_load", Dimension.MASS_FLOW),
    ("inlet_pressure_kpa_g", "fr_inlet", Dimension.PRESSURE),
    ("vessel_pressure_kpa_g", "fr_vessel", Dimension.PRESSURE),
    ("hours_per_year", "fr_hours", None),
    ("steam_energy_price_per_gj", "fr_price", Dimension.PRICE_PER_ENERGY),
    ("makeup_water_temperature_c", "fr_makeup", Dimension.TEMPERATURE),
    ("atmospheric_pressure_kpa", "atmosphere", None),
]


def _numbers(form: Form, show: Display, fields: NumberFields) -> dict[str, Any]:
    """The form's numbers by the request's field names, read in the shown units."""
    return {field: form.number(name, show, dimension) for field, name, dimension in fields}


def _trap(form: Form, show: Display) -> Any:
    """One trap priced exactly as POST /api/v1/calc/trap-loss prices it."""
    typed = {
        **_numbers(form, show, TRAP_NUMBERS),
        "condition": form.text("condition") or "blow_through",
        "condensate_destination": form.text("destination") or "closed_return",
    }
    names = {"condition": "condition", "condensate_destination": "destination"}
    request = _validated(form, TrapLossIn, typed, TRAP_NUMBERS, names)
    return None if request is None else trap_loss(request.trap_service(), request.economics())


def _flash_recovery(form: Form, show: Display) -> Any:
    """Flash recovered at a vessel, priced exactly as POST /api/v1/calc/flash-recovery."""
    request = _validated(
        form, FlashRecoveryIn, _numbers(form, show, RECOVERY_NUMBERS), RECOVERY_NUMBERS
    )
    return None if request is None else request.answer()


Request_ = TypeVar("Request_", bound=BaseModel)


def _validated(
    form: Form,
    model: type[Request_],
    typed: dict[str, Any],
    numbers: NumberFields,
    other_names: dict[str, str] | None = None,
) -> Request_ | None:
    """The request a form's fields make, or None with the errors beside its fields."""
    if not form.ok:
        return None
    try:
        return model.model_validate(
            {name: value for name, value in typed.items() if value is not None}
        )
    except ValidationError as error:
        names = {field: name for field, name, _ in numbers} | (other_names or {})
        form.absorb(error, names)
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
