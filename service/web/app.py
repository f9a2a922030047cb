"""The application factory: one FastAPI app with the JSON API under /api/v1."""

from collections.abc import AsyncIterator
from contextlib import asynccontextmanager

from fastapi import FastAPI
from fastapi.exceptions import RequestValidationError
from fastapi.staticfiles import StaticFiles
from pydantic import ValidationError

from service import __version__
from service.reports.cache import RollupCache
from service.settings import Settings
from service.store.database import Database
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.web import errors, pages
from service.web.api import (
    areas,
    calc,
    findings,
    health,
    repairs,
    sites,
    steam,
    surveys,
    transfer,
    traps,
)
from service.web.headers import SecurityHeaders
from service.web.pages.templating import PROJECT

API_ROUTERS = (
    health.router,
    steam.router,
    calc.router,
    sites.router,
    areas.router,
    traps.router,
    surveys.router,
    findings.router,
    repairs.router,
    transfer.router,
)

PAGE_ROUTERS = (
    pages.site.router,
    pages.register.router,
    pages.walk.router,
    pages.calculator.router,
    pages.transfer.router,
)


def create_app(database: Database | None = None) -> FastAPI:
    """A new Traptally application on `database` (default: the settings' database URL)."""
    store = database or Database.at(Settings.from_environment().database_url)

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
    for router in API_ROUTERS:
        app.include_router(router, prefix="/api/v1")
    for router in PAGE_ROUTERS:
        app.include_router(router)
    app.mount("/static", StaticFiles(directory=PROJECT / "static"), name="static")
    app.add_middleware(SecurityHeaders)
    app.add_exception_handler(RequestValidationError, errors.validation_error_as_422)
    app.add_exception_handler(ValidationError, errors.pydantic_error_as_422)
    app.add_exception_handler(FieldError, errors.field_error_as_422)
    app.add_exception_handler(NotFoundError, errors.not_found_as_404)
    app.add_exception_handler(ConflictError, errors.conflict_as_409)
    app.add_exception_handler(ValueError, errors.value_error_as_422)
    return app
