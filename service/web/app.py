"""The application factory: one FastAPI app with the JSON API under /api/v1."""

from collections.abc import AsyncIterator
from contextlib import asynccontextmanager
from typing import Any

from fastapi import FastAPI
from fastapi.exceptions import RequestValidationError
from pydantic import BaseModel, ValidationError

from service import __version__
from service.accounts.sign_in_limits import SignInLimits
from service.reports.cache import RollupCache
from service.settings import Settings
from service.shipped import STATIC
from service.store.database import Database
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.web import errors, pages
from service.web.access import CsrfRefused, NotPermitted, NotSignedIn, Viewer
from service.web.api import (
    areas,
    calc,
    findings,
    health,
    reliability,
    repairs,
    session,
    sites,
    steam,
    surveys,
    transfer,
    traps,
)
from service.web.compression import Compressed
from service.web.headers import SecurityHeaders
from service.web.request_log import RequestLog
from service.web.static import FingerprintedStatic
from service.web.viewer_cache import ViewerCache

# Smaller answers gain nothing from compression (a header costs about as much).
GZIP_MINIMUM_BYTES = 1000

API_ROUTERS = (
    health.router,
    session.router,
    steam.router,
    calc.router,
    sites.router,
    areas.router,
    traps.router,
    surveys.router,
    findings.router,
    repairs.router,
    reliability.router,
    transfer.router,
)


class Refusal(BaseModel):
    """Why a request was refused, in a sentence."""

    detail: str


# What any signed-in route may answer besides its own results (see service/web/access.py).
REFUSALS: dict[int | str, dict[str, Any]] = {
    400: {"model": Refusal, "description": "The body could not be parsed at all"},
    401: {"model": Refusal, "description": "No live session or API token"},
    403: {
        "model": Refusal,
        "description": "The role may not do this, or the CSRF token is missing",
    },
    404: {"model": Refusal, "description": "No such record among the user's sites"},
    409: {"model": Refusal, "description": "The change would break a rule of the register"},
}


def create_app(database: Database | None = None, settings: Settings | None = None) -> FastAPI:
    """A new Traptally application on `database` (default: the settings' database URL)."""
    settings = settings or Settings.from_environment()
    store = database or Database.at(settings.database_url)

    @asynccontextmanager
    async def lifespan(app: FastAPI) -> AsyncIterator[None]:
        yield
        store.dispose()

    app = FastAPI(
        title="Traptally",
        version=__version__,
        summary="Prices a steam-trap survey in steam, fuel, money and CO2.",
        lifespan=lifespan,
    )
    app.state.database = store
    app.state.rollups = RollupCache()
    app.state.viewers = ViewerCache[Viewer](store.access_changes)
    app.state.settings = settings
    app.state.photo_folder = settings.photo_folder(
        store.engine.url.render_as_string(hide_password=False)
    )
    app.state.sign_in_limits = SignInLimits.of(
        settings.sign_in_failures_per_account, settings.sign_in_failures_per_address
    )
    for router in API_ROUTERS:
        app.include_router(
            router, prefix="/api/v1", responses={} if router is health.router else REFUSALS
        )
    for router in pages.ROUTERS:
        app.include_router(router)
    app.mount("/static", FingerprintedStatic(directory=STATIC), name="static")
    app.add_middleware(SecurityHeaders)
    # Compressed answers; the CSRF token in a page is masked afresh each time (BREACH).
    app.add_middleware(Compressed, minimum_size=GZIP_MINIMUM_BYTES)
    app.add_middleware(RequestLog)  # outermost: it times and logs every answer
    app.add_exception_handler(RequestValidationError, errors.validation_error_as_422)
    app.add_exception_handler(ValidationError, errors.pydantic_error_as_422)
    app.add_exception_handler(FieldError, errors.field_error_as_422)
    app.add_exception_handler(NotFoundError, errors.not_found_as_404)
    app.add_exception_handler(ConflictError, errors.conflict_as_409)
    app.add_exception_handler(Exception, errors.unexpected_error_as_500)
    app.add_exception_handler(NotSignedIn, errors.not_signed_in)
    app.add_exception_handler(NotPermitted, errors.forbidden_as_403)
    app.add_exception_handler(CsrfRefused, errors.forbidden_as_403)
    return app
