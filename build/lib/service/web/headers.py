"""Response headers every answer carries: a Content-Security-Policy with no inline
script, no sniffing of types, a strict referrer, and HSTS when served over HTTPS.

A plain ASGI middleware (not Starlette's BaseHTTPMiddleware, which costs every request
an extra task and a copy of the body)."""

from starlette.datastructures import MutableHeaders
from starlette.types import ASGIApp, Message, Receive, Scope, Send

CONTENT_SECURITY_POLICY = "; ".join(
    [
        "default-src 'self'",
        "script-src 'self'",
        "style-src 'self'",
        "img-src 'self' data:",
        "object-src 'none'",
        "base-uri 'none'",
        "frame-ancestors 'none'",
        "form-action 'self'",
    ]
)
# FastAPI's interactive API docs load their own scripts; they keep the framework's page.
_OWN_PAGES_OF_THE_FRAMEWORK = ("/docs", "/redoc")


class SecurityHeaders:
    def __init__(self, app: ASGIApp) -> None:
        self.app = app

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        framework_page = str(scope.get("path", "")).startswith(_OWN_PAGES_OF_THE_FRAMEWORK)
        secure = scope.get("scheme") == "https"

        async def send_with_headers(message: Message) -> None:
            if message["type"] == "http.response.start":
                headers = MutableHeaders(scope=message)
                if not framework_page:
                    headers["Content-Security-Policy"] = CONTENT_SECURITY_POLICY
                headers["X-Content-Type-Options"] = "nosniff"
                headers["Referrer-Policy"] = "same-origin"
                if secure:
                    headers["Strict-Transport-Security"] = "max-age=31536000; includeSubDomains"
            await send(message)

        await self.app(scope, receive, send_with_headers)
