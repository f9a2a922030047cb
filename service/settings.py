"""How this Traptally process is run: where its database is, and how it serves.

Every setting has a name, a default, a unit and a meaning, listed in README.md under
"Settings"; tests/test_settings.py fails when one is not documented there.
"""

import os
from dataclasses import dataclass

DATABASE_URL_VARIABLE = "TRAPTALLY_DATABASE_URL"
DEFAULT_DATABASE_URL = "sqlite:///traptally.db"


@dataclass(frozen=True, slots=True)
class Settings:
    """The process's settings; `from_environment` reads them at start-up."""

    database_url: str = DEFAULT_DATABASE_URL

    @classmethod
    def from_environment(cls, database_url: str | None = None) -> "Settings":
        """An explicit URL wins over TRAPTALLY_DATABASE_URL, which wins over the default."""
        return cls(
            database_url=database_url
            or os.environ.get(DATABASE_URL_VARIABLE)
            or DEFAULT_DATABASE_URL
        )
