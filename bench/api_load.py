"""The flash endpoint under a local load generator."""

import asyncio
from pathlib import Path
from typing import Any

from bench.common import bearer_for, heading, load, percentile, served
from service.store.models import Role


def run(tmp: Path) -> None:
    heading("api: POST /api/v1/calc/flash for 10 s, 8 concurrent clients on loopback")
    url = f"sqlite:///{tmp / 'bench-api.db'}"
    headers = bearer_for(url, "bench-technician", Role.TECHNICIAN)
    with served(url) as base:

        def body(number: int) -> dict[str, Any]:
            return {
                "inlet_pressure_kpa_g": 100.0 + (number % 50) * 20.0,
                "return_pressure_kpa_g": 0.0,
            }

        latencies, errors = asyncio.run(load(f"{base}/api/v1/calc/flash", body, 10.0, 8, headers))
    print(f"requests           : {len(latencies)} ({errors} errors)")
    print(f"requests per second: {len(latencies) / 10.0:9.0f}")
    print(f"latency p50        : {percentile(latencies, 0.50) * 1000:9.2f} ms")
    print(f"latency p99        : {percentile(latencies, 0.99) * 1000:9.2f} ms")
    print("(load generator and server share this machine's 2 cores)")
