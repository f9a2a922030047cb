"""Static files with a fingerprint: pages link `/static/NAME?v=HASH` (`static_url`), and
an answer to the current fingerprint may be kept a year; any other asks again each time
(with its ETag, so a tablet on poor Wi-Fi re-downloads nothing unchanged)."""

import functools
import hashlib

from fastapi.staticfiles import StaticFiles
from starlette.responses import Response
from starlette.types import Scope

from service.shipped import STATIC

KEEP_A_YEAR = "public, max-age=31536000, immutable"
ASK_EACH_TIME = "no-cache"


@functools.cache
def fingerprint(name: str) -> str:
    """The first 12 hex digits of the SHA-256 of a shipped static file (read once)."""
    return hashlib.sha256((STATIC / name).read_bytes()).hexdigest()[:12]


def static_url(name: str) -> str:
    """The link to a static file that changes whenever the file does.

    >>> static_url("walk.js").startswith("/static/walk.js?v=")
    True
    """
    return f"/static/{name}?v={fingerprint(name)}"


class FingerprintedStatic(StaticFiles):
    async def get_response(self, path: str, scope: Scope) -> Response:
        response = await super().get_response(path, scope)
        if response.status_code in (200, 304):
            query = scope.get("query_string", b"").decode()
            current = query == f"v={fingerprint(path)}"
            response.headers["Cache-Control"] = KEEP_A_YEAR if current else ASK_EACH_TIME
        return response
