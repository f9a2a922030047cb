"""A trap's fields as a form types them (numbers in the site's units) and back: the one
reader the walk's "add a trap" form and a manager's "edit this trap" form share."""

from typing import Any

from sqlalchemy.orm import Session

from service.physics.trap_loss import CondensateDestination
from service.physics.units import Dimension
from service.store.models import Site, Trap
from service.store.register import areas_of
from service.store.vocabulary import Application, TrapType
from service.web.dependencies import record_id
from service.web.display import Display
from service.web.forms import Form

# Model field -> form field, for the quantities a form types in the site's units.
QUANTITIES: dict[str, tuple[str, Dimension]] = {
    "orifice_diameter_mm": ("orifice_diameter", Dimension.LENGTH),
    "inlet_pressure_kpa_g": ("inlet_pressure", Dimension.PRESSURE),
    "steam_temperature_c": ("steam_temperature", Dimension.TEMPERATURE),
    "return_pressure_kpa_g": ("return_pressure", Dimension.PRESSURE),
    "condensate_load_kg_h": ("condensate_load", Dimension.MASS_FLOW),
}
FORM_NAMES = {model: form for model, (form, _) in QUANTITIES.items()}
TEXTS = ("tag", "location", "connection_size", "notes")
WORDS = ("application", "trap_type", "condensate_destination")


def trap_fields(form: Form, show: Display) -> dict[str, Any]:
    """Every trap field the form holds, in the program's units; a blank is None (or ""
    for text). Numbers that are not numbers are in `form.errors`."""
    fields: dict[str, Any] = {name: form.text(name) for name in TEXTS if name in form.typed}
    fields |= {name: form.text(name) or None for name in WORDS if name in form.typed}
    if "area_id" in form.typed:
        fields["area_id"] = record_id(form.text("area_id"))
    for model_name, (form_name, dimension) in QUANTITIES.items():
        if form_name in form.typed:
            fields[model_name] = form.number(form_name, show, dimension)
    for name in ("route_position", "hours_per_year"):
        if name in form.typed:
            fields[name] = form.number(name)
    if "installed_on" in form.typed:
        fields["installed_on"] = form.text("installed_on") or None
    if "in_service_shown" in form.typed:  # an unticked box sends nothing: this says it was there
        fields["in_service"] = form.text("in_service") == "yes"
    return fields


def typed_from_trap(trap: Trap, show: Display) -> dict[str, str]:
    """A stored trap as its edit form shows it, in the site's units."""
    typed = {name: getattr(trap, name) or "" for name in (*TEXTS, *WORDS)}
    typed["area_id"] = str(trap.area_id or "")
    for model_name, (form_name, dimension) in QUANTITIES.items():
        value = getattr(trap, model_name)
        typed[form_name] = "" if value is None else f"{show.value(dimension, value):.6g}"
    for name in ("route_position", "hours_per_year"):
        value = getattr(trap, name)
        typed[name] = "" if value is None else f"{value:g}"
    typed["installed_on"] = trap.installed_on.isoformat() if trap.installed_on else ""
    typed["in_service"] = "yes" if trap.in_service else ""
    typed["in_service_shown"] = "yes"
    return {name: str(value) for name, value in typed.items()}


def choices(session: Session, site: Site) -> dict[str, Any]:
    """What a trap form's lists offer: the site's areas and the trade's words."""
    return {
        "areas": areas_of(session=session, site=site),
        "applications": list(Application),
        "trap_types": list(TrapType),
        "destinations": list(CondensateDestination),
    }
