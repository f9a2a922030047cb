"""The HTML pages: one router module per screen, over the same services as the API."""

from service.web.pages import calculator, register, site, transfer, walk

__all__ = ["calculator", "register", "site", "transfer", "walk"]
