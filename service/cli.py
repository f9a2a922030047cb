"""The `traptally` command: serve the web app, and keep its database's schema current."""

import argparse
from collections.abc import Sequence

import uvicorn

from service.settings import DATABASE_URL_VARIABLE, Settings
from service.store.database import Database
from service.store.demo import load_demo
from service.web.app import create_app


def _add_database_option(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--database-url",
        help=f"SQLAlchemy URL of the database (default: ${DATABASE_URL_VARIABLE}, "
        "else sqlite:///traptally.db in the working folder)",
    )


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="traptally",
        description="Prices a steam-trap survey in steam, fuel, money and CO2.",
    )
    commands = parser.add_subparsers(dest="command", required=True)
    serve = commands.add_parser("serve", help="serve the web app and its JSON API")
    serve.add_argument("--host", default="127.0.0.1", help="address to listen on")
    serve.add_argument("--port", type=int, default=8000, help="TCP port to listen on")
    serve.add_argument(
        "--demo", action="store_true", help="load the demo plant into an empty database"
    )
    _add_database_option(serve)
    db = commands.add_parser("db", help="the database's schema")
    db_commands = db.add_subparsers(dest="db_command", required=True)
    upgrade = db_commands.add_parser("upgrade", help="apply every migration not yet applied")
    _add_database_option(upgrade)
    current = db_commands.add_parser("current", help="say which migration the database is at")
    _add_database_option(current)
    return parser


def _ready_to_serve(database: Database) -> str | None:
    """None when the schema is current, else what the operator must do.

    A SQLite file is upgraded in place (it belongs to this one program); a server
    database is never changed behind its administrator's back.
    """
    if database.schema_is_current():
        return None
    if database.is_sqlite:
        database.upgrade()
        return None
    return (
        f"the database is at migration {database.schema_revision() or 'none (empty)'}, "
        f"this version needs {database.latest_revision()}: run `traptally db upgrade` first"
    )


def _serve(arguments: argparse.Namespace, database: Database) -> int:
    refusal = _ready_to_serve(database)
    if refusal is not None:
        print(f"traptally: {refusal}")
        return 2
    if arguments.demo:
        with database.writing() as session:
            site = load_demo(session=session)
        print(
            f"Demo plant loaded: {site.name}."
            if site is not None
            else "The database already holds sites: demo data not loaded."
        )
    print(f"Traptally on http://{arguments.host}:{arguments.port}")
    uvicorn.run(create_app(database), host=arguments.host, port=arguments.port)
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the `traptally` console command."""
    arguments = _parser().parse_args(argv)
    settings = Settings.from_environment(arguments.database_url)
    database = Database.at(settings.database_url)
    try:
        if arguments.command == "serve":
            return _serve(arguments, database)
        if arguments.db_command == "upgrade":
            database.upgrade()
        print(f"database at migration {database.schema_revision()}")
        return 0
    finally:
        database.dispose()
