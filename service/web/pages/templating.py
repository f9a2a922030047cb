"""The Jinja2 environment the pages share, and what every template may call."""

from typing import Any

from fastapi import Request
from fastapi.responses import HTMLResponse
from fastapi.templating import Jinja2Templates

from service import __version__
from service.accounts.roles import Permission
from service.physics.conditions import TrapCondition, is_failed, is_flooding_risk
from service.shipped import TEMPLATES
from service.store.models import Site
from service.store.vocabulary import label
from service.web.access import masked_csrf_token
from service.web.display import Display, percent
from service.web.static import static_url

templates = Jinja2Templates(directory=TEMPLATES)
templates.env.globals.update(
    label=label,
    percent=percent,
    version=__version__,
    conditions=list(TrapCondition),
    is_failed=is_failed,
    is_flooding_risk=is_flooding_risk,
    Permission=Permission,
    static_url=static_url,
)
templates.env.trim_blocks = True
templates.env.lstrip_blocks = True


def display_for(site: Site | None) -> Display:
    if site is None:
        return Display()
    return Display(
        system=site.unit_system,
        currency=site.currency,
        atmospheric_pressure_kpa=site.atmospheric_pressure_kpa,
    )


def page(
    request: Request,
    template: str,
    *,
    site: Site | None = None,
    status_code: int = 200,
    **context: Any,
) -> HTMLResponse:
    """A rendered page; `show` formats numbers in the site's units; `viewer` is who is
    signed in (None on the sign-in page), and `csrf_token` goes in every changing form."""
    viewer = getattr(request.state, "viewer", None)
    return templates.TemplateResponse(
        request,
        template,
        {
            "site": site,
            "show": display_for(site),
            "viewer": viewer,
            "csrf_token": masked_csrf_token(viewer.csrf_token if viewer is not None else None),
            **context,
        },
        status_code=status_code,
    )
