"""One worker process against several, side by side in one run: the latency of sequential
requests on one kept-alive connection, and the throughput of the summary API under 16
concurrent clients; on SQLite (1 and 2 workers) and, given a server, PostgreSQL (1, 2
and 4). The load generator shares the machine's cores with the workers."""

import asyncio
import os
import time
from pathlib import Path

import httpx
from sqlalchemy import create_engine, make_url, text

from bench.common import bearer_for, fresh_sqlite, heading, percentile, served
from bench.scale import build_site
from service.store.database import Database
from service.store.models import Role

KEEP_ALIVE_REQUESTS = 300
CLIENTS, SECONDS = 16, 8.0
SITE_TRAPS = 2_000


def _keep_alive_ms(base: str) -> list[float]:
    times = []
    with httpx.Client(base_url=base) as client:
        for _ in range(KEEP_ALIVE_REQUESTS):
            start = time.perf_counter()
            client.get("/api/v1/health")
            times.append((time.perf_counter() - start) * 1000)
    return times


async def _summaries(base: str, headers: dict[str, str], site_id: int) -> int:
    done = 0
    deadline = time.perf_counter() + SECONDS

    async def client_loop(client: httpx.AsyncClient) -> None:
        nonlocal done
        while time.perf_counter() < deadline:
            answer = await client.get(f"/api/v1/sites/{site_id}/summary")
            done += answer.status_code == 200

    async with httpx.AsyncClient(base_url=base, headers=headers, timeout=30) as client:
        await asyncio.gather(*(client_loop(client) for _ in range(CLIENTS)))
    return done


def _site_at(url: str) -> tuple[dict[str, str], int]:
    """A generated site of SITE_TRAPS traps (realistic) and one round; headers of a
    manager's token, and the site's id."""
    database = Database.at(url)
    database.upgrade()
    site_id = build_site(database, "Workers", SITE_TRAPS, "realistic", years=(2026,))
    database.dispose()
    return bearer_for(url, "bench-manager", Role.ADMIN), site_id


def _fresh_postgres(server_url: str) -> str:
    """A new empty database `traptally_bench` on the server of `server_url`; its URL."""
    engine = create_engine(server_url, isolation_level="AUTOCOMMIT")
    with engine.connect() as connection:
        connection.execute(text("DROP DATABASE IF EXISTS traptally_bench"))
        connection.execute(text("CREATE DATABASE traptally_bench"))
    engine.dispose()
    return str(make_url(server_url).set(database="traptally_bench").render_as_string(False))


def _compare(label: str, url: str, counts: tuple[int, ...]) -> None:
    headers, site_id = _site_at(url)
    single = 0.0
    for workers in counts:
        with served(url, "--workers", str(workers)) as base:
            latencies = _keep_alive_ms(base)
            summaries = asyncio.run(_summaries(base, headers, site_id)) / SECONDS
        single = single or summaries
        print(
            f"{label} workers={workers}: keep-alive GET /api/v1/health p50 "
            f"{percentile(latencies, 0.5):.2f} ms, p99 {percentile(latencies, 0.99):.2f} ms; "
            f"summary API with {CLIENTS} clients {summaries:.1f} per second "
            f"({summaries / single:.2f} x one worker)"
        )


def run(tmp: Path) -> None:
    heading(
        f"workers: one against several, a site of {SITE_TRAPS:,} traps, {CLIENTS} clients; this "
        f"machine has {os.cpu_count()} cores, shared with the load generator"
    )
    _compare("SQLite", fresh_sqlite(tmp / "bench-workers.db"), (1, 2))
    server = os.environ.get("TRAPTALLY_BENCH_POSTGRES_URL")
    if server:
        _compare("PostgreSQL", _fresh_postgres(server), (1, 2, 4))
    else:
        print("PostgreSQL: set TRAPTALLY_BENCH_POSTGRES_URL (a server URL) to compare 1, 2, 4")
