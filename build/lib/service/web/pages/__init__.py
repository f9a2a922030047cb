"""The HTML pages: one router module per screen, over the same services as the API."""

from service.web.pages import (
    accounts,
    audit,
    calculator,
    downloads,
    people,
    register,
    settings,
    site,
    summary,
    transfer,
    walk,
)

__all__ = [
    "accounts",
    "audit",
    "calculator",
    "downloads",
    "people",
    "register",
    "settings",
    "site",
    "summary",
    "transfer",
    "walk",
]
