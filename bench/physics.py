"""Trap-loss evaluations: the adapter's caches against IAPWS97 computed afresh."""

import contextlib
import functools
import random
import time
from collections.abc import Iterator
from types import ModuleType
from typing import Any

from bench.common import heading
from service.physics import orifice, steam_tables
from service.physics.annual import Economics
from service.physics.conditions import TrapCondition
from service.physics.trap_loss import CondensateDestination, TrapService, trap_loss


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


def run() -> None:
    heading("physics: 10,000 trap-loss evaluations over 50 pressure levels")
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
