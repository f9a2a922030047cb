"""Each request gets an id (the client's `X-Request-ID` when it is a plain token, else a
new one), answered in `X-Request-ID` and logged with one line when the answer is sent:
method, path (never the query string), status, milliseconds, and the signed-in user's id.

A plain ASGI middleware, like `headers.py`, so it costs no extra task per request."""

import logging
import re
import time
import uuid

from starlette.datastructures import MutableHeaders
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.logs import REQUESTS

REQUEST_ID_HEADER = "X-Request-ID"
_CLIENT_ID = re.compile(r"^[A-Za-z0-9._-]{8,64}$")
LOG = logging.getLogger(REQUESTS)


def request_id_of(scope: Scope) -> str:
    """The id of the request this scope belongs to ('' outside one)."""
    return str(scope.get("state", {}).get("request_id", ""))


class RequestLog:
    def __init__(self, app: ASGIApp) -> None:
        self.app = app

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        sent = dict(scope["headers"]).get(REQUEST_ID_HEADER.lower().encode(), b"").decode()
        request_id = sent if _CLIENT_ID.match(sent) else uuid.uuid4().hex
        scope.setdefault("state", {})["request_id"] = request_id
        started = time.perf_counter()
        status = 500  # unless an answer starts

        async def send_with_id(message: Message) -> None:
            nonlocal status
            if message["type"] == "http.response.start":
                status = message["status"]
                MutableHeaders(scope=message)[REQUEST_ID_HEADER] = request_id
            await send(message)

        try:
            await self.app(scope, receive, send_with_id)
        finally:
            viewer = scope["state"].get("viewer")
            LOG.info(
                "request",
                extra={
                    "request_id": request_id,
                    "method": scope["method"],
                    "path": scope["path"],
                    "status": status,
                    "ms": round((time.perf_counter() - started) * 1000, 1),
                    "user_id": getattr(viewer, "user_id", None),
                },
            )
