"""Demo accounts: one per role, for trying the demo plant. Each gets a random password,
which the caller prints once; only its hash is kept."""

import secrets

from sqlalchemy.orm import Session

from service.accounts.users import add_user, user_named
from service.store.models import Role, Site

DEMO_NAMES = {role: f"demo-{role.value}" for role in Role}


def add_demo_accounts(session: Session, sites: list[Site]) -> dict[str, tuple[Role, str]]:
    """The demo accounts not yet made, added now: {name: (role, password)}."""
    made: dict[str, tuple[Role, str]] = {}
    for role, name in DEMO_NAMES.items():
        if user_named(session, name) is None:
            password = secrets.token_urlsafe(12)
            add_user(
                session,
                name=name,
                role=role,
                password=password,
                site_ids=[site.id for site in sites],
            )
            made[name] = (role, password)
    return made
