"""A large generated site: import time, summary against a bare read, growth, memory;
and eight technicians writing findings at once on SQLite."""

import asyncio
import io
import random
import time
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

import httpx

from bench.common import bearer_for, fresh_sqlite, heading, percentile, served
from bench.plant import Shape, generated_traps
from service.reports.schemas import SummaryOut
from service.reports.summary import site_summary, summary_rows
from service.store import imports, register, surveys
from service.store.database import Database
from service.store.models import Role, Site, Survey
from service.store.schemas import SiteCreate, SurveyCreate

CONDITIONS = [
    ("working", 80),
    ("leaking", 7),
    ("blow_through", 4),
    ("rapid_cycling", 1),
    ("plugged", 3),
    ("flooded", 1),
    ("not_accessible", 3),
    ("out_of_service", 1),
]


def _csv(header: list[str], rows: list[list[Any]]) -> bytes:
    out = io.StringIO()
    out.write(",".join(header) + "\n")
    for row in rows:
        out.write(",".join(str(cell) for cell in row) + "\n")
    return out.getvalue().encode()


REGISTER_COLUMNS = [
    "tag",
    "area",
    "route_position",
    "application",
    "trap_type",
    "orifice_diameter_mm",
    "inlet_pressure_kpa_g",
    "return_pressure_kpa_g",
    "condensate_destination",
    "condensate_load_kg_h",
    "steam_temperature_c",
]


def register_file(traps: int, shape: Shape = "levels", seed: int = 11) -> bytes:
    rows = [
        ["" if (value := getattr(trap, column)) is None else value for column in REGISTER_COLUMNS]
        for trap in generated_traps(traps, shape, seed)
    ]
    return _csv(REGISTER_COLUMNS, rows)


def findings_file(traps: int, year: int, seed: int) -> bytes:
    chooser = random.Random(seed)
    names, weights = zip(*CONDITIONS, strict=True)
    rows = [
        [
            f"T{number:06d}",
            f"{year}-03-{1 + number % 28:02d}T{8 + number % 9:02d}:00:00Z",
            "ultrasonic",
            chooser.choices(names, weights)[0],
        ]
        for number in range(traps)
    ]
    return _csv(["tag", "tested_at", "method", "condition"], rows)


def _timed(work: Callable[[], Any]) -> tuple[float, Any]:
    start = time.perf_counter()
    result = work()
    return time.perf_counter() - start, result


def _best_of(repeats: int, work: Callable[[], Any]) -> float:
    return min(_timed(work)[0] for _ in range(repeats))


def build_site(
    database: Database, name: str, traps: int, years: tuple[int, ...] = (2024, 2025, 2026)
) -> tuple[float, float]:
    """A site of `traps` traps and a survey a year; (register import s, findings import s)."""
    content = register_file(traps)
    with database.writing() as session:
        site = register.create_site(
            session=session, data=SiteCreate(name=name, steam_cost_per_tonne=32.0)
        )
        register_seconds, plan = _timed(
            lambda: imports.plan_register(
                session=session, site=site, content=content, create_areas=True
            )
        )
        register_seconds += _timed(
            lambda: imports.apply_register(session=session, site=site, plan=plan)
        )[0]
    findings_seconds = 0.0
    for year in years:
        content = findings_file(traps, year, seed=year)
        with database.writing() as session:
            site = session.get_one(Site, site_id_named(database, name))
            survey = surveys.create_survey(
                session=session,
                site=site,
                data=SurveyCreate(name=f"Survey {year}", started_on=f"{year}-03-01"),
            )
            start = time.perf_counter()
            plan = imports.plan_findings(session=session, survey=survey, content=content)
            assert plan.clean, plan.problems[:3]
            imports.apply_findings(session=session, survey=survey, plan=plan)
            findings_seconds += time.perf_counter() - start
    return register_seconds, findings_seconds


def site_id_named(database: Database, name: str) -> int:
    from sqlalchemy import select

    with database.reading() as session:
        found = session.scalar(select(Site.id).where(Site.name == name))
        assert found is not None
        return found


def _summary_timings(database: Database, name: str) -> dict[str, float]:
    with database.reading() as session:
        site = session.get_one(Site, site_id_named(database, name))
        survey = surveys.latest_survey(session=session, site=site)
        assert isinstance(survey, Survey)
        read = _best_of(3, lambda: summary_rows(session, site, survey))
        summary = _best_of(3, lambda: site_summary(session=session, site=site, survey=survey))
        api = _best_of(
            3, lambda: SummaryOut.of(site_summary(session=session, site=site, survey=survey))
        )
        tracemalloc.start()
        site_summary(session=session, site=site, survey=survey)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
    return {"read": read, "summary": summary, "api": api, "peak_mb": peak / 1e6}


def run(tmp: Path) -> None:
    heading("scale: generated sites, 2,000 and 20,000 traps, three surveys each (SQLite)")
    url = fresh_sqlite(tmp / "scale.db")
    database = Database.at(url)
    timings = {}
    for traps in (2_000, 20_000):
        name = f"Generated {traps}"
        register_seconds, findings_seconds = build_site(database, name, traps)
        print(
            f"{traps:6d} traps: register import {register_seconds:6.2f} s, "
            f"{3 * traps} findings import {findings_seconds:6.2f} s"
        )
        timings[traps] = _summary_timings(database, name)
    for traps, figures in timings.items():
        ratio = figures["summary"] / figures["read"]
        print(
            f"{traps:6d} traps: read of traps + latest findings {figures['read']:6.3f} s, "
            f"summary {figures['summary']:6.3f} s (ratio {ratio:4.2f}), as the API's shape "
            f"{figures['api']:6.3f} s, summary's peak memory {figures['peak_mb']:6.1f} MB"
        )
    growth = timings[20_000]["summary"] / timings[2_000]["summary"]
    print(f"growth of the summary from 2,000 to 20,000 traps: {growth:4.1f} x (linear is 10)")
    database.dispose()


async def _writers(
    base: str, survey_id: int, trap_ids: list[int], writers: list[dict[str, str]], each: int
) -> tuple[int, list[float], float]:
    errors = 0
    latencies: list[float] = []

    async def writer(number: int) -> None:
        nonlocal errors
        for index in range(each):
            body = {
                "trap_id": trap_ids[(number * each + index) % len(trap_ids)],
                "tested_at": f"2026-03-02T{8 + index // 60:02d}:{index % 60:02d}:{number:02d}Z",
                "method": "ultrasonic",
                "condition": "working" if index % 5 else "leaking",
            }
            sent_at = time.perf_counter()
            answer = await clients[number].post(
                f"{base}/api/v1/surveys/{survey_id}/findings",
                json=body,
                headers={"Idempotency-Key": f"writer-{number:02d}-finding-{index:04d}"},
            )
            latencies.append(time.perf_counter() - sent_at)
            errors += answer.status_code != 201

    start = time.perf_counter()
    clients = [httpx.AsyncClient(timeout=60, headers=headers) for headers in writers]
    await asyncio.gather(*(writer(number) for number in range(len(writers))))
    for client in clients:
        await client.aclose()
    return errors, latencies, time.perf_counter() - start


WRITERS, EACH = 16, 100


def run_writers(tmp: Path) -> None:
    heading(
        f"writers: {WRITERS} technicians recording {EACH} findings each at once "
        "(SQLite, over HTTP, one worker)"
    )
    url = fresh_sqlite(tmp / "writers.db")
    admin = bearer_for(url, "bench-admin", Role.ADMIN)
    with served(url) as base:
        site = httpx.post(
            f"{base}/api/v1/sites",
            json={"name": "Writers", "steam_cost_per_tonne": 30},
            headers=admin,
        ).json()
        traps = [
            httpx.post(
                f"{base}/api/v1/sites/{site['id']}/traps",
                json={
                    "tag": f"W-{number:03d}",
                    "application": "drip",
                    "trap_type": "thermodynamic",
                    "orifice_diameter_mm": 3.0,
                    "inlet_pressure_kpa_g": 700,
                    "return_pressure_kpa_g": 0,
                },
                headers=admin,
            ).json()["id"]
            for number in range(40)
        ]
        survey = httpx.post(
            f"{base}/api/v1/sites/{site['id']}/surveys",
            json={"name": "Load", "started_on": "2026-03-02"},
            headers=admin,
        ).json()
        technicians = [
            bearer_for(url, f"bench-technician-{number}", Role.TECHNICIAN, (site["id"],))
            for number in range(WRITERS)
        ]
        errors, latencies, seconds = asyncio.run(
            _writers(base, survey["id"], traps, technicians, EACH)
        )
        stored = httpx.get(
            f"{base}/api/v1/surveys/{survey['id']}/findings", params={"limit": 1}, headers=admin
        ).json()["total"]
    sent = len(latencies)
    print(f"findings sent {sent}, stored {stored}, error answers {errors}")
    print(
        f"requests per second: {sent / seconds:7.0f} ({seconds:.1f} s); a save's latency "
        f"p50 {percentile(latencies, 0.5) * 1000:.0f} ms, p99 "
        f"{percentile(latencies, 0.99) * 1000:.0f} ms, max {max(latencies) * 1000:.0f} ms"
    )
