"""The `traptally` command: serve the web app, and keep its database's schema current."""

import argparse
import getpass
import os
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import uvicorn
from sqlalchemy import select

from service.accounts import tokens, users
from service.accounts.demo import add_demo_accounts
from service.logs import LOG_CONFIG
from service.settings import DATABASE_URL_VARIABLE, Settings
from service.store.audit import Actor
from service.store.backup import BackupError, back_up
from service.store.database import Database
from service.store.demo import load_demo
from service.store.errors import ConflictError, FieldError, NotFoundError
from service.store.models import Role, Site, User
from service.web.app import create_app

APP_FACTORY = "service.web.app:create_app"


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
    serve.add_argument(
        "--workers",
        type=int,
        default=1,
        help="worker processes (default 1); sessions and sign-in limits are in the "
        "database, so every worker sees the same",
    )
    _add_database_option(serve)
    db = commands.add_parser("db", help="the database's schema")
    db_commands = db.add_subparsers(dest="db_command", required=True)
    upgrade = db_commands.add_parser("upgrade", help="apply every migration not yet applied")
    _add_database_option(upgrade)
    current = db_commands.add_parser("current", help="say which migration the database is at")
    _add_database_option(current)
    backup = db_commands.add_parser(
        "backup",
        help="write a consistent copy while the server runs (SQLite: a database file; "
        "PostgreSQL: pg_dump's custom format, for pg_restore)",
    )
    backup.add_argument("file", type=Path, help="where to write the copy (replaced)")
    _add_database_option(backup)
    _add_account_commands(commands)
    return parser


def _add_account_commands(commands: "argparse._SubParsersAction[argparse.ArgumentParser]") -> None:
    user = commands.add_parser("user", help="people who sign in")
    user_commands = user.add_subparsers(dest="user_command", required=True)
    add = user_commands.add_parser("add", help="add a person (the password is asked for)")
    add.add_argument("name")
    add.add_argument("--role", required=True, choices=[role.value for role in Role])
    add.add_argument(
        "--site", type=int, action="append", default=[], metavar="ID", help="a site id (repeat)"
    )
    add.add_argument(
        "--password-stdin", action="store_true", help="read the password from standard input"
    )
    disable = user_commands.add_parser(
        "disable", help="stop a person signing in; ends their sessions and tokens now"
    )
    disable.add_argument("name")
    user_commands.add_parser("list", help="list people, their roles and sites")
    token = commands.add_parser("token", help="bearer tokens for integrations")
    token_commands = token.add_subparsers(dest="token_command", required=True)
    create = token_commands.add_parser("create", help="make a token and print it once")
    create.add_argument("--user", required=True)
    create.add_argument("--label", default="", help="what the token is for")
    listing = token_commands.add_parser("list", help="a person's tokens (never the secrets)")
    listing.add_argument("--user", required=True)
    revoke = token_commands.add_parser("revoke", help="refuse a token from now on")
    revoke.add_argument("token_id", type=int)
    for parser in (add, disable, user_commands.choices["list"], create, listing, revoke):
        _add_database_option(parser)


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
            accounts = add_demo_accounts(session, list(session.scalars(select(Site))))
        print(
            f"Demo plant loaded: {site.name}."
            if site is not None
            else "The database already holds sites: demo data not loaded."
        )
        for name, (role, password) in accounts.items():
            print(f"Demo {role.value}: sign in as {name} with password {password}")
        if accounts:
            print("These passwords are shown only now.")
    print(f"Traptally on http://{arguments.host}:{arguments.port}")
    # Our own request log (service/web/request_log.py) replaces uvicorn's access log.
    options: dict[str, Any] = {
        "host": arguments.host,
        "port": arguments.port,
        "log_config": LOG_CONFIG,
        "access_log": False,
    }
    if arguments.workers > 1:
        # Each worker process builds its own app from the environment: pass the database on.
        os.environ[DATABASE_URL_VARIABLE] = database.engine.url.render_as_string(
            hide_password=False
        )
        uvicorn.run(APP_FACTORY, factory=True, workers=arguments.workers, **options)
    else:
        uvicorn.run(create_app(database), **options)
    return 0


def _command_line_actor() -> Actor:
    return Actor(user_id=None, name=f"command line ({getpass.getuser()})"[:80])


def _new_password(arguments: argparse.Namespace) -> str:
    if arguments.password_stdin:
        return sys.stdin.readline().rstrip("\r\n")
    first = getpass.getpass("Password: ")
    if getpass.getpass("Password again: ") != first:
        raise FieldError("password", "The two passwords differ.")
    return first


def _users(arguments: argparse.Namespace, database: Database) -> int:
    command = arguments.user_command
    if command == "list":
        with database.reading() as session:
            for person in session.scalars(select(User).order_by(User.name)):
                sites = ", ".join(str(site.id) for site in person.sites) or "-"
                state = "disabled" if person.disabled else "active"
                print(f"{person.name}\t{person.role.value}\t{state}\tsites: {sites}")
        return 0
    password = _new_password(arguments) if command == "add" else ""
    with database.writing(_command_line_actor()) as session:
        if command == "add":
            users.add_user(
                session,
                name=arguments.name,
                role=Role(arguments.role),
                password=password,
                site_ids=arguments.site,
            )
            print(f"user {arguments.name} added as {arguments.role}")
        else:
            users.disable_user(session, users.existing_user(session, arguments.name))
            print(f"user {arguments.name} disabled; their sessions and tokens have ended")
    return 0


def _tokens(arguments: argparse.Namespace, database: Database) -> int:
    with database.writing(_command_line_actor()) as session:
        if arguments.token_command == "revoke":
            token = tokens.revoke_token(session, arguments.token_id)
            print(f"token {token.id} revoked")
            return 0
        person = users.existing_user(session, arguments.user)
        if arguments.token_command == "create":
            secret, token = tokens.create_token(session, person, arguments.label)
            print(f"token {token.id} for {person.name} (shown only now):\n{secret}")
            return 0
        for each in tokens.tokens_of(session, person):
            state = f"revoked {each.revoked_at:%Y-%m-%d}" if each.revoked_at else "live"
            print(f"{each.id}\t{each.label or '-'}\tmade {each.created_at:%Y-%m-%d}\t{state}")
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the `traptally` console command."""
    arguments = _parser().parse_args(argv)
    settings = Settings.from_environment(arguments.database_url)
    database = Database.at(settings.database_url)
    try:
        if arguments.command == "serve":
            return _serve(arguments, database)
        if arguments.command in {"user", "token"}:
            try:
                run = _users if arguments.command == "user" else _tokens
                return run(arguments, database)
            except (FieldError, ConflictError, NotFoundError) as error:
                print(f"traptally: {error}", file=sys.stderr)
                return 1
        if arguments.db_command == "backup":
            try:
                back_up(database=database, to=arguments.file)
            except BackupError as error:
                print(f"traptally: {error}", file=sys.stderr)
                return 1
            print(f"backed up to {arguments.file}")
            return 0
        if arguments.db_command == "upgrade":
            database.upgrade()
        print(f"database at migration {database.schema_revision()}")
        return 0
    finally:
        database.dispose()
