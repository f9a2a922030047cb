"""Bad input answers 422 naming the field, never 500.

The calculation core raises ValueError with a sentence a technician can read; here
that sentence is attached to the request field it concerns, in the same shape
FastAPI uses for its own validation errors:
`{"detail": [{"loc": ["body", "field"], "msg": "...", "type": "value_error", "input": ...}]}`.
"""

import logging
import math
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any
from urllib.parse import urlencode

from fastapi import Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse, RedirectResponse, Response
from pydantic import ValidationError

from service.logs import LOGGER
from service.store.errors import FieldError
from service.store.surveys import IDEMPOTENCY_HEADER
from service.store.vocabulary import label
from service.web.request_log import REQUEST_ID_HEADER, request_id_of

_PYDANTIC_PREFIX = "Value error, "


@contextmanager
def reported_against(*location: str, typed: Any = None) -> Iterator[None]:
    """Turn a ValueError raised inside the block into a 422 on the field at `location`."""
    try:
        yield
    except ValueError as error:
        raise RequestValidationError(
            [{"type": "value_error", "loc": location, "msg": str(error), "input": typed}]
        ) from error


def _as_json(value: Any) -> Any:
    """What was typed, in a form JSON can carry (NaN and infinity as text)."""
    if isinstance(value, float) and not math.isfinite(value):
        return str(value)
    if isinstance(value, str | int | float | bool) or value is None:
        return value
    if isinstance(value, dict):
        return {str(key): _as_json(item) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [_as_json(item) for item in value]
    return str(value)


def problem(location: list[str | int], message: str, kind: str, typed: Any) -> dict[str, Any]:
    """One entry of a 422's `detail`."""
    return {
        "type": kind,
        "loc": location,
        "msg": message.removeprefix(_PYDANTIC_PREFIX),
        "input": _as_json(typed),
    }


async def validation_error_as_422(request: Request, error: Exception) -> Response:
    """FastAPI's validation errors, with readable messages and the typed value kept."""
    assert isinstance(error, RequestValidationError)
    detail = [
        problem(list(entry["loc"]), entry["msg"], entry["type"], entry.get("input"))
        for entry in error.errors()
    ]
    return _unprocessable(request, detail)


def _unprocessable(request: Request, detail: list[dict[str, Any]]) -> Response:
    """A 422: JSON for the API; for a page, a page that says which field and why (a form
    route keeps what was typed itself; this is the answer of last resort)."""
    if _for_a_person(request):
        lines = "; ".join(f"{label(str(entry['loc'][-1]))}: {entry['msg']}" for entry in detail)
        return _error_page(request, 422, "That was not saved", lines)
    return JSONResponse(status_code=422, content={"detail": detail})


async def pydantic_error_as_422(request: Request, error: Exception) -> Response:
    """A merged edit that fails validation in a store function: 422 on its fields."""
    assert isinstance(error, ValidationError)
    detail = [
        problem(["body", *entry["loc"]], entry["msg"], entry["type"], entry.get("input"))
        for entry in error.errors()
    ]
    return _unprocessable(request, detail)


async def field_error_as_422(request: Request, error: Exception) -> Response:
    assert isinstance(error, FieldError)
    where = "header" if error.field == IDEMPOTENCY_HEADER else "body"
    return _unprocessable(request, [problem([where, error.field], str(error), "value_error", None)])


def _for_a_person(request: Request) -> bool:
    """A page was asked for, not the API: answer with a page, never with JSON."""
    return not request.url.path.startswith("/api/")


def _error_page(request: Request, status: int, title: str, message: str) -> Response:
    from service.web.pages.templating import page

    return page(request, "error.html", status_code=status, title=title, message=message)


async def not_found_as_404(request: Request, error: Exception) -> Response:
    if _for_a_person(request):
        return _error_page(request, 404, "Not found", f"There is {error}.")
    return JSONResponse(status_code=404, content={"detail": str(error)})


async def conflict_as_409(request: Request, error: Exception) -> Response:
    if _for_a_person(request):
        return _error_page(request, 409, "Not done", str(error))
    return JSONResponse(status_code=409, content={"detail": str(error)})


LOG = logging.getLogger(LOGGER)


async def unexpected_error_as_500(request: Request, error: Exception) -> Response:
    """A fault of the program, not of the request: logged with its traceback and answered
    500 without its details. Every write is one transaction, so nothing was stored. Input
    errors never come here: routes tie them to their field (422)."""
    LOG.error(
        "unexpected error on %s %s",
        request.method,
        request.url.path,
        exc_info=error,
        extra={"request_id": request_id_of(request.scope)},
    )
    message = (
        "The server could not finish this, and nothing was saved. The error is logged; "
        "try again, or tell the person who runs Traptally."
    )
    answer = (
        _error_page(request, 500, "Something went wrong", message)
        if _for_a_person(request)
        else JSONResponse(status_code=500, content={"detail": message})
    )
    # Sent from outside the request log's middleware: the id a person can quote, all the same.
    answer.headers[REQUEST_ID_HEADER] = request_id_of(request.scope)
    return answer


async def not_signed_in(request: Request, error: Exception) -> Response:
    """The API answers 401; a page sends the person to sign in, and back here after."""
    if _for_a_person(request):
        back = request.url.path + (f"?{request.url.query}" if request.url.query else "")
        return RedirectResponse(f"/sign-in?{urlencode({'next': back})}", status_code=302)
    return JSONResponse(
        status_code=401, content={"detail": str(error)}, headers={"WWW-Authenticate": "Bearer"}
    )


async def forbidden_as_403(request: Request, error: Exception) -> Response:
    """A role without the permission, or a change without its CSRF token."""
    if _for_a_person(request):
        return _error_page(request, 403, "Not allowed", str(error))
    return JSONResponse(status_code=403, content={"detail": str(error)})
