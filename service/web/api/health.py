"""Is the service up, which version is it, and can it serve: for a load balancer in front
of several workers (liveness answers without the database, readiness asks it)."""

from typing import Literal

from fastapi import APIRouter
from fastapi.responses import JSONResponse
from pydantic import BaseModel
from sqlalchemy import text
from sqlalchemy.exc import SQLAlchemyError

from service import __version__
from service.web.dependencies import Db

router = APIRouter(tags=["health"])


class HealthOut(BaseModel):
    status: str
    version: str


class ReadyOut(BaseModel):
    status: Literal["ready", "not ready"]
    database: Literal["ok", "unreachable", "schema not current"]


@router.get("/health", summary="Liveness and version")
def health() -> HealthOut:
    return HealthOut(status="ok", version=__version__)


@router.get(
    "/health/ready",
    summary="Readiness: the database answers and its schema is the program's",
    response_model=ReadyOut,
    responses={503: {"model": ReadyOut, "description": "Not ready: the database is not"}},
)
def ready(db: Db) -> JSONResponse:
    """200 when a query reaches the database and its migrations are current, else 503
    (a worker whose database is down, or not yet upgraded, should be given no requests).
    It says which, never why: the error itself goes to no one unsigned."""
    try:
        with db.engine.connect() as connection:
            connection.execute(text("SELECT 1"))
        state: Literal["ok", "unreachable", "schema not current"] = (
            "ok" if db.schema_is_current() else "schema not current"
        )
    except SQLAlchemyError:
        state = "unreachable"
    answer = ReadyOut(status="ready" if state == "ok" else "not ready", database=state)
    return JSONResponse(answer.model_dump(), status_code=200 if state == "ok" else 503)
