"""One worker process against two, side by side in one run: the latency of sequential
requests on one kept-alive connection, and the throughput of the summary API under 16
concurrent clients. On this 2-core machine the load generator shares the cores."""

import asyncio
import time
from pathlib import Path

import httpx

from bench.common import bearer_for, heading, percentile, served
from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role

KEEP_ALIVE_REQUESTS = 300
CLIENTS, SECONDS = 16, 8.0


def _keep_alive_ms(base: str) -> list[float]:
    times = []
    with httpx.Client(base_url=base) as client:
        for _ in range(KEEP_ALIVE_REQUESTS):
            start = time.perf_counter()
            client.get("/api/v1/health")
            times.append((time.perf_counter() - start) * 1000)
    return times


async def _summaries(base: str, headers: dict[str, str]) -> int:
    done = 0
    deadline = time.perf_counter() + SECONDS

    async def client_loop(client: httpx.AsyncClient) -> None:
        nonlocal done
        while time.perf_counter() < deadline:
            answer = await client.get("/api/v1/sites/1/summary")
            done += answer.status_code == 200

    async with httpx.AsyncClient(base_url=base, headers=headers, timeout=30) as client:
        await asyncio.gather(*(client_loop(client) for _ in range(CLIENTS)))
    return done


def run(tmp: Path) -> None:
    heading("workers: 1 against 2 on SQLite, the demo mill (204 traps)")
    url = f"sqlite:///{tmp / 'bench-workers.db'}"
    (tmp / "bench-workers.db").unlink(missing_ok=True)
    database = Database.at(url)
    database.upgrade()
    with database.writing() as session:
        load_demo(session=session)
    database.dispose()
    headers = bearer_for(url, "bench-manager", Role.ADMIN)
    for workers in (1, 2):
        with served(url, "--workers", str(workers)) as base:
            latencies = _keep_alive_ms(base)
            summaries = asyncio.run(_summaries(base, headers))
        print(
            f"workers={workers}: keep-alive GET /api/v1/health p50 "
            f"{percentile(latencies, 0.5):.2f} ms, p99 {percentile(latencies, 0.99):.2f} ms; "
            f"summary API with {CLIENTS} clients {summaries / SECONDS:.1f} per second"
        )
