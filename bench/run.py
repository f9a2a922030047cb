"""Traptally's benchmarks: prints figures, asserts nothing. `make bench` runs them all.

    python bench/run.py                 # every benchmark
    python bench/run.py physics api     # only those named

Each figure that is a comparison is measured side by side in the same run.
"""

import argparse
import asyncio
import contextlib
import functools
import random
import socket
import subprocess
import sys
import time
from collections.abc import Callable, Iterator
from pathlib import Path
from types import ModuleType
from typing import Any

import httpx

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from service.physics import orifice, steam_tables
from service.physics.annual import Economics
from service.physics.conditions import TrapCondition
from service.physics.trap_loss import CondensateDestination, TrapService, trap_loss


def _heading(title: str) -> None:
    print(f"\n== {title}")


def _cached_functions(module: ModuleType) -> dict[str, Any]:
    return {
        name: value
        for name, value in vars(module).items()
        if isinstance(value, functools._lru_cache_wrapper)
    }


@contextlib.contextmanager
def _without_caches() -> Iterator[None]:
    """Every cached property lookup replaced by its uncached original: each property
    is computed afresh by iapws.IAPWS97, as code without the adapter's cache would."""
    saved: list[tuple[ModuleType, str, Any]] = []
    for module in (steam_tables, orifice):
        for name, cached in _cached_functions(module).items():
            saved.append((module, name, cached))
            setattr(module, name, cached.__wrapped__)
    try:
        yield
    finally:
        for module, name, cached in saved:
            setattr(module, name, cached)


def _clear_caches() -> None:
    for module in (steam_tables, orifice):
        for cached in _cached_functions(module).values():
            cached.cache_clear()


def _trap_population(count: int, levels: int, seed: int = 7) -> list[TrapService]:
    """Traps spread over `levels` distinct inlet pressures, a realistic mix of conditions."""
    chooser = random.Random(seed)
    pressures = [150.0 + 1750.0 * index / (levels - 1) for index in range(levels)]
    conditions = [
        (TrapCondition.WORKING, 70),
        (TrapCondition.LEAKING, 12),
        (TrapCondition.BLOW_THROUGH, 8),
        (TrapCondition.RAPID_CYCLING, 3),
        (TrapCondition.PLUGGED, 4),
        (TrapCondition.FLOODED, 3),
    ]
    names, weights = zip(*conditions, strict=True)
    traps = []
    for _ in range(count):
        inlet = chooser.choice(pressures)
        traps.append(
            TrapService(
                inlet_pressure_kpa_abs=inlet,
                return_pressure_kpa_abs=chooser.choice([101.325, 101.325, 0.72 * inlet]),
                orifice_diameter_mm=chooser.choice([3.0, 4.5, 6.0, 8.0]),
                condition=chooser.choices(names, weights)[0],
                hours_per_year=8000.0,
                condensate_load_kg_h=chooser.choice([0.0, 20.0, 150.0]),
                destination=chooser.choice(list(CondensateDestination)),
            )
        )
    return traps


def _time_evaluations(traps: list[TrapService], economics: Economics) -> tuple[float, list[float]]:
    start = time.perf_counter()
    costs = [trap_loss(trap, economics).total.cost or 0.0 for trap in traps]
    return time.perf_counter() - start, costs


def bench_physics() -> None:
    _heading("physics: 10,000 trap-loss evaluations over 50 pressure levels")
    traps = _trap_population(10_000, 50)
    economics = Economics(steam_cost_per_tonne=30.0)
    _clear_caches()
    cached_seconds, cached_costs = _time_evaluations(traps, economics)
    warm_seconds, _ = _time_evaluations(traps, economics)
    with _without_caches():
        fresh_seconds, fresh_costs = _time_evaluations(traps, economics)
    worst = max(
        abs(a - b) / max(abs(b), 1e-300) for a, b in zip(cached_costs, fresh_costs, strict=True)
    )
    count = len(traps)
    print(f"cached, cold start : {cached_seconds * 1e6 / count:9.1f} us per evaluation")
    print(f"cached, warm       : {warm_seconds * 1e6 / count:9.1f} us per evaluation")
    print(f"IAPWS97 afresh     : {fresh_seconds * 1e6 / count:9.1f} us per evaluation")
    print(f"speed-up (cold)    : {fresh_seconds / cached_seconds:9.1f} x")
    print(f"speed-up (warm)    : {fresh_seconds / warm_seconds:9.1f} x")
    print(f"largest relative difference in yearly cost: {worst:.1e}")


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


async def _load(
    url: str, body_for: Callable[[int], dict[str, Any]], seconds: float, workers: int
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

    async with httpx.AsyncClient(timeout=10) as client:
        await asyncio.gather(*(worker(client, number) for number in range(workers)))
    return latencies, errors


def _percentile(values: list[float], share: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, int(share * len(ordered)))]


def bench_api(tmp: Path) -> None:
    _heading("api: POST /api/v1/calc/flash for 10 s, 8 concurrent clients on loopback")
    with served(f"sqlite:///{tmp / 'bench-api.db'}") as base:

        def body(number: int) -> dict[str, Any]:
            return {
                "inlet_pressure_kpa_g": 100.0 + (number % 50) * 20.0,
                "return_pressure_kpa_g": 0.0,
            }

        latencies, errors = asyncio.run(_load(f"{base}/api/v1/calc/flash", body, 10.0, 8))
    print(f"requests           : {len(latencies)} ({errors} errors)")
    print(f"requests per second: {len(latencies) / 10.0:9.0f}")
    print(f"latency p50        : {_percentile(latencies, 0.50) * 1000:9.2f} ms")
    print(f"latency p99        : {_percentile(latencies, 0.99) * 1000:9.2f} ms")
    print("(load generator and server share this machine's 2 cores)")


BENCHMARKS: dict[str, Callable[[Path], None]] = {
    "physics": lambda tmp: bench_physics(),
    "api": bench_api,
}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("names", nargs="*", help=f"which to run: {', '.join(BENCHMARKS)}")
    arguments = parser.parse_args()
    unknown = set(arguments.names) - set(BENCHMARKS)
    if unknown:
        parser.error(f"unknown benchmarks: {', '.join(sorted(unknown))}")
    out = Path(__file__).resolve().parent / "out"
    out.mkdir(exist_ok=True)
    print(f"python {sys.version.split()[0]}, {time.strftime('%Y-%m-%d %H:%M')}")
    for name in arguments.names or BENCHMARKS:
        BENCHMARKS[name](out)


if __name__ == "__main__":
    main()
