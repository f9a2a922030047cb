"""The HTML pages: one router module per screen, over the same services as the API."""

from service.web.pages import accounts, audit, calculator, people, register, site, transfer, walk

__all__ = [
    "accounts",
    "audit",
    "calculator",
    "people",
    "register",
    "site",
    "transfer",
    "walk",
]
