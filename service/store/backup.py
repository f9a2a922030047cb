"""A consistent copy of the database while the program runs.

SQLite: the online backup API (sqlite3's `Connection.backup`), page by page under a read
lock, so technicians keep saving while it copies. PostgreSQL: `pg_dump` in its custom
format, restored with `pg_restore`. The password (if the URL has one) goes to pg_dump in
its environment, never on its command line, where other users could see it."""

import os
import shutil
import sqlite3
import subprocess
from pathlib import Path

from service.store.database import Database


class BackupError(RuntimeError):
    """The copy could not be made; the message says why."""


def back_up(*, database: Database, to: Path) -> None:
    """Write a copy of `database` to the file `to` (replaced if it exists)."""
    url = database.engine.url
    if database.is_sqlite:
        if not url.database or url.database == ":memory:":
            raise BackupError("an in-memory database has nothing on disk to back up")
        with sqlite3.connect(url.database) as source, sqlite3.connect(to) as copy:
            source.backup(copy)
        return
    pg_dump = shutil.which("pg_dump")
    if pg_dump is None:
        raise BackupError("pg_dump is not installed (Debian: apt-get install postgresql-client)")
    environment = {**os.environ}
    if url.password is not None:
        environment["PGPASSWORD"] = str(url.password)
    target = url.set(drivername="postgresql", password=None).render_as_string()
    done = subprocess.run(
        [pg_dump, "--format=custom", f"--file={to}", f"--dbname={target}"],
        env=environment,
        capture_output=True,
        text=True,
        check=False,
    )
    if done.returncode != 0:
        raise BackupError(f"pg_dump failed: {done.stderr.strip()}")
