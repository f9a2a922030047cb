"""The application factory: one FastAPI app with the JSON API under /api/v1."""

from fastapi import FastAPI
from fastapi.exceptions import RequestValidationError

from service import __version__
from service.web.api import calc, health, steam
from service.web.errors import validation_error_as_422, value_error_as_422


def create_app() -> FastAPI:
    """A new Traptally application."""
    app = FastAPI(
        title="Traptally",
        version=__version__,
        summary="Prices a steam-trap survey in steam, fuel, money and CO2.",
    )
    for router in (health.router, steam.router, calc.router):
        app.include_router(router, prefix="/api/v1")
    app.add_exception_handler(RequestValidationError, validation_error_as_422)
    app.add_exception_handler(ValueError, value_error_as_422)
    return app
