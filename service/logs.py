"""Logging as an operator reads it: one JSON object a line on standard error, with the
request id that ties a request's line to any error it raised.

What is never logged: request bodies, query strings, headers, cookies, tokens and
passwords. A request's line names its method, path, answer, time and user id.

`LOG_CONFIG` is a `logging.config.dictConfig` dictionary; `traptally serve` hands it to
uvicorn, which applies it in every worker process it starts."""

from typing import Any

LOGGER = "traptally"
REQUESTS = f"{LOGGER}.requests"

LOG_CONFIG: dict[str, Any] = {
    "version": 1,
    "disable_existing_loggers": False,
    "formatters": {
        "json": {
            "()": "pythonjsonlogger.json.JsonFormatter",
            "fmt": "{asctime}{levelname}{name}{message}",
            "style": "{",
            "rename_fields": {"asctime": "time", "levelname": "level", "name": "logger"},
        }
    },
    "handlers": {
        "stderr": {
            "class": "logging.StreamHandler",
            "formatter": "json",
            "stream": "ext://sys.stderr",
        }
    },
    "loggers": {
        name: {"handlers": ["stderr"], "level": "INFO", "propagate": False}
        for name in (LOGGER, "uvicorn", "uvicorn.error")
    },
}
