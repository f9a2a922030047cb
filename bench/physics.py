"""Trap-loss evaluations against two plain programs, side by side in one run.

Each prices the same realistic register (bench.plant): Traptally's `trap_loss` with its
caches cleared (cold) and again (warm); and the four saturation states a plain program
needs for one trap (hf and hg at the inlet and at the return: live steam by Napier, flash
by the mixing rule) computed afresh for every trap, once by `iapws.IAPWS97` and once by
CoolProp's IF97 backend (an AbstractState reused). The plain programs do less: no nozzle
correction for back pressure or superheat, no spreads, no yearly pricing; so the ratios
flatter them. Figures are min / median / max over the repeats.
"""

import functools
import statistics
import time
from collections.abc import Callable

from CoolProp.CoolProp import PQ_INPUTS, AbstractState
from iapws import IAPWS97

from bench.common import heading
from bench.plant import Shape, generated_traps
from service.physics import orifice, steam_tables
from service.physics.annual import Economics
from service.physics.conditions import TrapCondition
from service.physics.trap_loss import CondensateDestination, TrapService, trap_loss

ATMOSPHERE_KPA = 101.325
TRAPS, REPEATS = 4_000, 5
CONDITIONS = [
    TrapCondition.WORKING,
    TrapCondition.LEAKING,
    TrapCondition.BLOW_THROUGH,
    TrapCondition.PLUGGED,
]


def _services(shape: Shape) -> list[TrapService]:
    return [
        TrapService(
            inlet_pressure_kpa_abs=trap.inlet_pressure_kpa_g + ATMOSPHERE_KPA,
            return_pressure_kpa_abs=trap.return_pressure_kpa_g + ATMOSPHERE_KPA,
            orifice_diameter_mm=trap.orifice_diameter_mm,
            condition=CONDITIONS[number % len(CONDITIONS)],
            hours_per_year=8000.0,
            condensate_load_kg_h=trap.condensate_load_kg_h,
            destination=CondensateDestination(trap.condensate_destination),
            steam_temperature_c=trap.steam_temperature_c,
        )
        for number, trap in enumerate(generated_traps(TRAPS, shape))
    ]


def _clear_caches() -> None:
    for module in (steam_tables, orifice):
        for value in vars(module).values():
            if isinstance(value, functools._lru_cache_wrapper):
                value.cache_clear()


def _iapws_flash(traps: list[TrapService]) -> list[float]:
    fractions = []
    for trap in traps:
        inlet_liquid = IAPWS97(P=trap.inlet_pressure_kpa_abs / 1000, x=0.0)
        IAPWS97(P=trap.inlet_pressure_kpa_abs / 1000, x=1.0)  # hg: the live steam's heat
        outlet_liquid = IAPWS97(P=trap.return_pressure_kpa_abs / 1000, x=0.0)
        outlet_vapour = IAPWS97(P=trap.return_pressure_kpa_abs / 1000, x=1.0)
        fractions.append((inlet_liquid.h - outlet_liquid.h) / (outlet_vapour.h - outlet_liquid.h))
    return fractions


def _coolprop_flash(traps: list[TrapService]) -> list[float]:
    state = AbstractState("IF97", "Water")

    def enthalpy(pressure_kpa: float, quality: float) -> float:
        state.update(PQ_INPUTS, pressure_kpa * 1000, quality)
        return float(state.hmass()) / 1000

    fractions = []
    for trap in traps:
        inlet_hf = enthalpy(trap.inlet_pressure_kpa_abs, 0.0)
        enthalpy(trap.inlet_pressure_kpa_abs, 1.0)
        outlet_hf = enthalpy(trap.return_pressure_kpa_abs, 0.0)
        outlet_hg = enthalpy(trap.return_pressure_kpa_abs, 1.0)
        fractions.append((inlet_hf - outlet_hf) / (outlet_hg - outlet_hf))
    return fractions


def _ours(traps: list[TrapService], economics: Economics, cold: bool) -> list[float]:
    if cold:
        _clear_caches()
    return [trap_loss(trap, economics).total.cost or 0.0 for trap in traps]


def _repeat(work: Callable[[], object]) -> list[float]:
    seconds = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        work()
        seconds.append(time.perf_counter() - start)
    return seconds


def _line(label: str, seconds: list[float], baseline: list[float] | None = None) -> str:
    per = [value * 1e6 / TRAPS for value in seconds]
    text = (
        f"{label:28s} {min(per):8.1f} / {statistics.median(per):8.1f} / {max(per):8.1f} us a trap"
    )
    if baseline is not None:
        text += f"   {statistics.median(baseline) / statistics.median(seconds):6.1f} x faster"
    return text


def run() -> None:
    for shape in ("realistic", "continuous"):
        _run_shape(shape)


def _run_shape(shape: Shape) -> None:
    economics = Economics(steam_cost_per_tonne=30.0)
    traps = _services(shape)
    pairs = len({(t.inlet_pressure_kpa_abs, t.return_pressure_kpa_abs) for t in traps})
    heading(
        f"physics: {TRAPS:,} traps, {shape} pressures ({pairs:,} pressure pairs); "
        f"min / median / max of {REPEATS}"
    )
    iapws_seconds = _repeat(lambda: _iapws_flash(traps))
    coolprop_seconds = _repeat(lambda: _coolprop_flash(traps))
    cold_seconds = _repeat(lambda: _ours(traps, economics, cold=True))
    warm_seconds = _repeat(lambda: _ours(traps, economics, cold=False))
    print(_line("plain, iapws.IAPWS97", iapws_seconds))
    print(_line("plain, CoolProp IF97", coolprop_seconds, iapws_seconds))
    print(_line("Traptally, caches cleared", cold_seconds, iapws_seconds))
    print(_line("Traptally, caches warm", warm_seconds, iapws_seconds))
    agree = max(
        abs(a - b) / b
        for a, b in zip(_iapws_flash(traps[:200]), _coolprop_flash(traps[:200]), strict=True)
        if b > 0
    )
    print(f"plain programs' flash fractions agree within {agree:.1e} (relative)")
