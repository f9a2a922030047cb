"""The HTML pages: one router module per screen, over the same services as the API.

A new page is its module here, its template, and its line in `ROUTERS` (in the order the
app tries them)."""

from fastapi import APIRouter

from service.web.pages import (
    accounts,
    audit,
    calculator,
    downloads,
    labels,
    people,
    register,
    reliability,
    settings,
    site,
    summary,
    transfer,
    trap_changes,
    walk,
    work_orders,
)

ROUTERS: tuple[APIRouter, ...] = (
    accounts.router,
    audit.router,
    people.router,
    site.router,
    summary.router,
    reliability.router,
    work_orders.router,
    downloads.router,
    settings.router,
    register.router,
    labels.router,
    trap_changes.router,
    walk.router,
    calculator.router,
    transfer.router,
)
