"""The `traptally` command: serve the web app (and, later, manage its database)."""

import argparse
from collections.abc import Sequence

import uvicorn

from service.settings import DATABASE_URL_VARIABLE, Settings
from service.web.app import create_app


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
        "--database-url",
        help=f"SQLAlchemy URL of the database (default: ${DATABASE_URL_VARIABLE}, "
        "else sqlite:///traptally.db in the working folder)",
    )
    serve.add_argument(
        "--demo", action="store_true", help="load the demo plant into an empty database"
    )
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the `traptally` console command."""
    arguments = _parser().parse_args(argv)
    settings = Settings.from_environment(arguments.database_url)
    if arguments.command == "serve":
        print(f"Traptally on http://{arguments.host}:{arguments.port}  ({settings.database_url})")
        uvicorn.run(create_app(), host=arguments.host, port=arguments.port)
    return 0
