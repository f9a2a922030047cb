"""How this Traptally process is run: where its database is, how long a sign-in lasts,
and how many failed sign-ins it allows.

Every setting has a name, a default, a unit and a meaning, listed in README.md under
"Settings"; tests/test_settings.py fails when one is not documented there.
"""

import datetime as dt
import os
from collections.abc import Mapping
from dataclasses import dataclass

from service.accounts.sessions import SessionLimits

DATABASE_URL_VARIABLE = "TRAPTALLY_DATABASE_URL"
DEFAULT_DATABASE_URL = "sqlite:///traptally.db"
PREFIX = "TRAPTALLY_"


@dataclass(frozen=True, slots=True)
class Settings:
    """The process's settings; `from_environment` reads them at start-up, each from
    TRAPTALLY_ and its name in capitals (TRAPTALLY_SESSION_IDLE_MINUTES, ...)."""

    database_url: str = DEFAULT_DATABASE_URL
    # A tablet may sit in a pocket between traps; two hours idle, and a 12-hour shift in all.
    session_idle_minutes: int = 120
    session_absolute_hours: int = 12
    sign_in_failures_per_account: str = "5/15 minutes"
    sign_in_failures_per_address: str = "30/15 minutes"

    @property
    def session_limits(self) -> SessionLimits:
        return SessionLimits(
            idle=dt.timedelta(minutes=self.session_idle_minutes),
            absolute=dt.timedelta(hours=self.session_absolute_hours),
        )

    @classmethod
    def from_environment(
        cls, database_url: str | None = None, environment: Mapping[str, str] = os.environ
    ) -> "Settings":
        """An explicit URL wins over TRAPTALLY_DATABASE_URL, which wins over the default.

        >>> Settings.from_environment(environment={"TRAPTALLY_SESSION_IDLE_MINUTES": "30"})
        Settings(database_url='sqlite:///traptally.db', session_idle_minutes=30, ...)
        """
        defaults = cls()

        def read(name: str) -> str | None:
            return environment.get(PREFIX + name.upper())

        def minutes(name: str, default: int) -> int:
            text = read(name)
            if text is None:
                return default
            if not text.isdigit() or int(text) < 1:
                raise SystemExit(f"{PREFIX}{name.upper()} must be a whole number above 0")
            return int(text)

        return cls(
            database_url=database_url or read("database_url") or DEFAULT_DATABASE_URL,
            session_idle_minutes=minutes("session_idle_minutes", defaults.session_idle_minutes),
            session_absolute_hours=minutes(
                "session_absolute_hours", defaults.session_absolute_hours
            ),
            sign_in_failures_per_account=read("sign_in_failures_per_account")
            or defaults.sign_in_failures_per_account,
            sign_in_failures_per_address=read("sign_in_failures_per_address")
            or defaults.sign_in_failures_per_address,
        )
