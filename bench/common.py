"""What the benchmarks share: a server on loopback, a bounded load generator, figures."""

import asyncio
import contextlib
import secrets
import socket
import subprocess
import sys
import time
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import httpx

from service.accounts import tokens, users
from service.store.database import Database
from service.store.models import Role


def bearer_for(
    database_url: str, name: str, role: Role, site_ids: tuple[int, ...] = ()
) -> dict[str, str]:
    """Headers with a new API token of the user `name` (made with a random password when
    new) in the database at `database_url`, migrated first."""
    database = Database.at(database_url)
    database.upgrade()
    with database.writing() as session:
        user = users.user_named(session, name) or users.add_user(
            session, name=name, role=role, password=secrets.token_urlsafe(16), site_ids=site_ids
        )
        secret, _ = tokens.create_token(session, user, "benchmark")
    database.dispose()
    return {"Authorization": f"Bearer {secret}"}


def fresh_sqlite(path: Path) -> str:
    """The URL of an empty SQLite database at `path` (any earlier one and its WAL gone),
    migrated."""
    for suffix in ("", "-wal", "-shm"):
        Path(f"{path}{suffix}").unlink(missing_ok=True)
    url = f"sqlite:///{path}"
    database = Database.at(url)
    database.upgrade()
    database.dispose()
    return url


def heading(title: str) -> None:
    print(f"\n== {title}")


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


@contextlib.contextmanager
def served(database_url: str, *extra: str) -> Iterator[str]:
    """A `traptally serve` child process on a free loopback port; yields its base URL."""
    port = _free_port()
    command = [
        sys.executable,
        "-m",
        "service",
        "serve",
        "--port",
        str(port),
        "--database-url",
        database_url,
        *extra,
    ]
    server = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    base = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 60
        while time.monotonic() < deadline:
            with contextlib.suppress(httpx.HTTPError):
                if httpx.get(f"{base}/api/v1/health", timeout=1).status_code == 200:
                    break
            time.sleep(0.2)
        else:
            raise RuntimeError("the server did not start")
        yield base
    finally:
        server.terminate()
        server.wait(timeout=10)


async def load(
    url: str,
    body_for: Callable[[int], dict[str, Any]],
    seconds: float,
    workers: int,
    headers: dict[str, str],
) -> tuple[list[float], int]:
    latencies: list[float] = []
    errors = 0
    deadline = time.perf_counter() + seconds

    async def worker(client: httpx.AsyncClient, number: int) -> None:
        nonlocal errors
        sent = 0
        while time.perf_counter() < deadline:
            start = time.perf_counter()
            answer = await client.post(url, json=body_for(number * 1_000_000 + sent))
            latencies.append(time.perf_counter() - start)
            errors += answer.status_code != 200
            sent += 1

    async with httpx.AsyncClient(timeout=10, headers=headers) as client:
        await asyncio.gather(*(worker(client, number) for number in range(workers)))
    return latencies, errors


def percentile(values: list[float], share: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, int(share * len(ordered)))]
