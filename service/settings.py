"""How this Traptally process is run: where its database is, how long a sign-in lasts,
and how many failed sign-ins it allows.

Every setting has a name, a default, a unit and a meaning, listed in README.md under
"Settings"; tests/test_settings.py fails when one is not documented there.
"""

import datetime as dt
import os
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

from sqlalchemy.engine import make_url

from service.accounts.sessions import SessionLimits

DATABASE_URL_VARIABLE = "TRAPTALLY_DATABASE_URL"
DEFAULT_DATABASE_URL = "sqlite:///traptally.db"
PREFIX = "TRAPTALLY_"
PHOTO_FOLDER_NAME = "traptally-photos"


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
    # Blank: a folder `traptally-photos` beside a SQLite file, else in the working folder.
    photo_dir: str = ""

    def photo_folder(self, database_url: str) -> Path:
        """Where photos of findings are written: `photo_dir`, else beside the SQLite file
        at `database_url` (the database the program opened), else the working folder.

        >>> Settings().photo_folder("sqlite:////data/plant.db")
        PosixPath('/data/traptally-photos')
        """
        if self.photo_dir:
            return Path(self.photo_dir)
        url = make_url(database_url)
        on_disk = url.get_backend_name() == "sqlite" and url.database not in (None, ":memory:")
        beside = Path(str(url.database)).parent if on_disk else Path()
        return beside / PHOTO_FOLDER_NAME

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
            photo_dir=read("photo_dir") or defaults.photo_dir,
        )
