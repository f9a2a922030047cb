"""The database: engines, sessions, and the schema's migrations.

SQLite is the embedded default; PostgreSQL (psycopg 3) serves larger sites. On SQLite
every connection turns on WAL (readers never block the writer), foreign keys and a
busy timeout, and a writing transaction begins with BEGIN IMMEDIATE: it takes the
write lock at its start, so two technicians saving at once queue for the lock
instead of failing halfway with "database is locked". Reads begin deferred.

Within one process, writers to SQLite also queue on a lock of their own before BEGIN
IMMEDIATE: SQLite's busy handler waits by sleeping in steps of up to 100 ms, so sixteen
threads polling for the file's lock saw waits of seconds (a save's p99 846 ms, its
longest 2.1 s); queued in the process, a writer starts the moment the one before ends.
Workers in other processes still meet at the file's lock.
"""

import threading
from collections.abc import Iterator
from contextlib import contextmanager, nullcontext
from dataclasses import dataclass
from importlib.resources import files
from typing import Any

from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory
from sqlalchemy import Engine, create_engine, event
from sqlalchemy.engine import Connection
from sqlalchemy.orm import Session, sessionmaker

from service.store.access_changes import AccessChanges
from service.store.audit import ACTOR_KEY, Actor, write_audit_entries
from service.store.revisions import bump_revisions

SQLITE_BUSY_TIMEOUT_MS = 30_000
_READ_ONLY = "traptally_read_only"


def _configure_sqlite(engine: Engine) -> None:
    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_connection: Any, _record: Any) -> None:
        # Let SQLAlchemy's "begin" event, not the driver, open each transaction.
        dbapi_connection.isolation_level = None
        cursor = dbapi_connection.cursor()
        cursor.execute("PRAGMA journal_mode=WAL")
        cursor.execute("PRAGMA foreign_keys=ON")
        cursor.execute(f"PRAGMA busy_timeout={SQLITE_BUSY_TIMEOUT_MS}")
        cursor.execute("PRAGMA synchronous=NORMAL")
        cursor.close()

    @event.listens_for(engine, "begin")
    def _on_begin(connection: Connection) -> None:
        read_only = connection.get_execution_options().get(_READ_ONLY, False)
        connection.exec_driver_sql("BEGIN" if read_only else "BEGIN IMMEDIATE")


def make_engine(database_url: str) -> Engine:
    """An engine for the URL, configured for safe concurrent use."""
    if database_url.startswith("sqlite"):
        engine = create_engine(
            database_url,
            connect_args={"check_same_thread": False, "timeout": SQLITE_BUSY_TIMEOUT_MS / 1000},
        )
        _configure_sqlite(engine)
        return engine
    return create_engine(database_url, pool_pre_ping=True)


def _alembic_config(engine: Engine) -> Config:
    config = Config()
    config.set_main_option("script_location", str(files("service.store") / "migrations"))
    config.attributes["engine"] = engine
    return config


@dataclass
class Database:
    """One database: its engine and the sessions that write to it or read from it."""

    engine: Engine

    def __post_init__(self) -> None:
        self._writer = sessionmaker(self.engine, expire_on_commit=False)
        event.listen(self._writer, "after_flush", bump_revisions)
        event.listen(self._writer, "after_flush", write_audit_entries)
        self.access_changes = AccessChanges()
        event.listen(self._writer, "after_flush", self.access_changes.note_flush)
        event.listen(self._writer, "do_orm_execute", self.access_changes.note_statement)
        event.listen(self._writer, "after_commit", self.access_changes.after_commit)
        self._reader = sessionmaker(
            self.engine.execution_options(**{_READ_ONLY: True}), expire_on_commit=False
        )
        self._sqlite_writers = threading.RLock()

    @classmethod
    def at(cls, database_url: str) -> "Database":
        return cls(make_engine(database_url))

    @property
    def is_sqlite(self) -> bool:
        return self.engine.dialect.name == "sqlite"

    @contextmanager
    def writing(self, actor: Actor | None = None) -> Iterator[Session]:
        """A session whose work is one transaction: committed at the end, or rolled back.
        The audit trail names `actor` (default: the system) for what it writes."""
        queue = self._sqlite_writers if self.is_sqlite else nullcontext()
        with queue, self._writer.begin() as session:
            if actor is not None:
                session.info[ACTOR_KEY] = actor
            yield session

    @contextmanager
    def reading(self) -> Iterator[Session]:
        """A session for reads, which never takes the write lock."""
        with self._reader() as session:
            yield session

    def schema_revision(self) -> str | None:
        """The migration the database is at, or None for an empty database."""
        with self.engine.connect() as connection:
            return MigrationContext.configure(connection).get_current_revision()

    def latest_revision(self) -> str | None:
        return ScriptDirectory.from_config(_alembic_config(self.engine)).get_current_head()

    def schema_is_current(self) -> bool:
        return self.schema_revision() == self.latest_revision()

    def upgrade(self) -> None:
        """Apply every migration not yet applied."""
        command.upgrade(_alembic_config(self.engine), "head")

    def dispose(self) -> None:
        self.engine.dispose()
