"""Logging as an operator reads it: one JSON object a line on standard error, with the
request id that ties a request's line to any error it raised.

What is never logged: request bodies, query strings, headers, cookies, tokens and
passwords. A request's line names its method, path, answer, time and user id."""

import logging
import sys

from pythonjsonlogger.json import JsonFormatter

LOGGER = "traptally"
REQUESTS = f"{LOGGER}.requests"


def configure_logging(level: int = logging.INFO) -> None:
    """Send the program's log (and uvicorn's own errors) to standard error as JSON lines."""
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(
        JsonFormatter(
            "{asctime}{levelname}{name}{message}",
            style="{",
            rename_fields={"asctime": "time", "levelname": "level", "name": "logger"},
        )
    )
    for name in (LOGGER, "uvicorn.error"):
        logger = logging.getLogger(name)
        logger.handlers = [handler]
        logger.setLevel(level)
        logger.propagate = False
