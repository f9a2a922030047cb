"""Large generated sites: an import against a raw bulk insert; the summary API by size
and shape of data against a bare read; a streamed export; and sixteen technicians
writing findings at once on SQLite."""

import asyncio
import csv
import io
import random
import statistics
import time
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

import httpx
from sqlalchemy import insert
from sqlalchemy.orm import Session

from bench.common import bearer_for, fresh_sqlite, heading, percentile, served
from bench.plant import Shape, generated_traps
from service.reports.summary import summary_rows
from service.store import exports, imports, register, surveys
from service.store.collection import fewer_collections
from service.store.csv_format import csv_chunks
from service.store.database import Database
from service.store.models import Role, Site, Survey, Trap
from service.store.schemas import SiteCreate, SurveyCreate

PART = 25_000

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


def _import_in_parts(
    session: Session, content: bytes, plan_of: Callable[..., Any], apply: Callable[..., Any]
) -> None:
    """An import of `content` in parts of PART rows (one import takes 5 MB at most)."""
    header, *lines = content.decode().splitlines()
    for start in range(0, len(lines), PART):
        part = "\n".join([header, *lines[start : start + PART]]).encode()
        plan = plan_of(part)
        assert plan.ready, plan.problems[:3]
        apply(plan)


def _import_findings(session: Session, survey: Survey, content: bytes) -> None:
    _import_in_parts(
        session,
        content,
        lambda part: imports.plan_findings(session=session, survey=survey, content=part),
        lambda plan: imports.apply_findings(session=session, survey=survey, plan=plan),
    )


def build_site(
    database: Database,
    name: str,
    traps: int,
    shape: Shape = "levels",
    years: tuple[int, ...] = (2024, 2025, 2026),
) -> int:
    """A site of `traps` traps and a survey a year, every trap tested; its id."""
    with database.writing() as session:
        site = register.create_site(
            session=session, data=SiteCreate(name=name, steam_cost_per_tonne=32.0)
        )
        _import_in_parts(
            session,
            register_file(traps, shape),
            lambda part: imports.plan_register(
                session=session, site=site, content=part, create_areas=True
            ),
            lambda plan: imports.apply_register(session=session, site=site, plan=plan),
        )
        site_id = site.id
    for year in years:
        with database.writing() as session:
            site = session.get_one(Site, site_id)
            survey = surveys.create_survey(
                session=session,
                site=site,
                data=SurveyCreate(name=f"Survey {year}", started_on=f"{year}-03-01"),
            )
            _import_findings(session, survey, findings_file(traps, year, seed=year))
    return site_id


def _spread(seconds: list[float]) -> str:
    return f"{min(seconds):7.3f} / {statistics.median(seconds):7.3f} / {max(seconds):7.3f} s"


def _raw_rows(content: bytes, site_id: int) -> list[dict[str, Any]]:
    """The register's rows as a plain program would insert them: read by the csv module,
    numbers made floats, no check of any kind."""
    rows = []
    for line in csv.DictReader(io.StringIO(content.decode())):
        row: dict[str, Any] = {"site_id": site_id, "area_id": None, "hours_per_year": 8760.0}
        for name, text in line.items():
            if name == "area":
                continue
            row[name] = float(text) if name in FIGURES and text else (text or None)
        rows.append(row)
    return rows


FIGURES = {
    "route_position",
    "orifice_diameter_mm",
    "inlet_pressure_kpa_g",
    "return_pressure_kpa_g",
    "condensate_load_kg_h",
    "steam_temperature_c",
}


def run_import(tmp: Path) -> None:
    traps = 20_000
    heading(
        f"import: a {traps:,}-trap register (realistic), the whole import (read, check, "
        "write, audit) against a raw bulk insert of the same rows; min / median / max of 3"
    )
    database = Database.at(fresh_sqlite(tmp / "import.db"))
    content = register_file(traps, "realistic")
    ours, raw = [], []
    for repeat in range(3):
        with database.writing() as session:
            site = register.create_site(
                session=session, data=SiteCreate(name=f"Ours {repeat}", steam_cost_per_tonne=30)
            )
            start = time.perf_counter()
            plan = imports.plan_register(
                session=session, site=site, content=content, create_areas=True
            )
            imports.apply_register(session=session, site=site, plan=plan)
        ours.append(time.perf_counter() - start)  # the commit included
        with database.writing() as session:
            site = register.create_site(
                session=session, data=SiteCreate(name=f"Raw {repeat}", steam_cost_per_tonne=30)
            )
            site_id = site.id
        start = time.perf_counter()
        with fewer_collections():  # the same collector settings as the import's
            rows = _raw_rows(content, site_id)
            with database.engine.begin() as connection:
                connection.execute(insert(Trap), rows)
        raw.append(time.perf_counter() - start)
    print(f"Traptally's import     {_spread(ours)}")
    print(f"raw bulk insert        {_spread(raw)}")
    print(
        f"ratio of the medians   {statistics.median(ours) / statistics.median(raw):7.2f} x, "
        f"of the fastest {min(ours) / min(raw):.2f} x"
    )
    database.dispose()


def _get_seconds(client: httpx.Client, path: str) -> float:
    start = time.perf_counter()
    answer = client.get(path)
    assert answer.status_code == 200, (path, answer.status_code)
    return time.perf_counter() - start


def _bare_read_seconds(database: Database, site_id: int) -> list[float]:
    """The traps and their latest findings read in process, nothing priced."""
    seconds = []
    with database.reading() as session:
        site = session.get_one(Site, site_id)
        survey = surveys.latest_survey(session=session, site=site)
        assert isinstance(survey, Survey)
        for _ in range(3):
            start = time.perf_counter()
            summary_rows(session, site, survey)
            seconds.append(time.perf_counter() - start)
    return seconds


SITES: list[tuple[int, Shape]] = [
    (20_000, "levels"),
    (20_000, "realistic"),
    (20_000, "continuous"),
    (100_000, "realistic"),
]


def run(tmp: Path) -> None:
    heading(
        "scale: the summary API over HTTP, signed in, by size and shape of data (SQLite, "
        "one worker); cold = first request after start, warm = min / median / max of 5"
    )
    url = fresh_sqlite(tmp / "scale.db")
    database = Database.at(url)
    built = {}
    for traps, shape in SITES:
        start = time.perf_counter()
        built[(traps, shape)] = build_site(database, f"{shape} {traps}", traps, shape)
        print(f"built {traps:7,d} traps, {shape:10s}: {time.perf_counter() - start:6.1f} s")
    headers = bearer_for(url, "bench-admin", Role.ADMIN)
    for (traps, shape), site_id in built.items():
        with (
            served(url) as base,
            httpx.Client(base_url=base, headers=headers, timeout=600) as client,
        ):
            path = f"/api/v1/sites/{site_id}/summary"
            cold = _get_seconds(client, path)
            warm = [_get_seconds(client, path) for _ in range(5)]
        bare = _bare_read_seconds(database, site_id)
        ratio = statistics.median(warm) / statistics.median(bare)
        print(
            f"{traps:7,d} traps, {shape:10s}: cold {cold:6.2f} s; warm {_spread(warm)}; "
            f"bare read {_spread(bare)}; warm / bare {ratio:4.2f}"
        )
    traps, shape = SITES[-1]
    site_id = built[(traps, shape)]
    with served(url) as base, httpx.Client(base_url=base, headers=headers, timeout=600) as client:
        start = time.perf_counter()
        with client.stream("GET", f"/api/v1/sites/{site_id}/exports/register.csv") as answer:
            first = None
            size = 0
            for chunk in answer.iter_bytes():
                first = first or time.perf_counter() - start
                size += len(chunk)
        whole = time.perf_counter() - start
    print(
        f"register export of {traps:,} traps, streamed: first bytes after {first or 0:.3f} s, "
        f"all {size / 1e6:.1f} MB after {whole:.2f} s"
    )
    with database.reading() as session:
        for label, held in (("streamed", False), ("held whole", True)):
            tracemalloc.start()
            chunks = csv_chunks(*exports.register_rows(session=session, site_id=site_id))
            if held:
                "".join(chunks)
            else:
                for _ in chunks:
                    pass
            _, peak = tracemalloc.get_traced_memory()
            tracemalloc.stop()
            print(f"  its peak memory in process, {label:10s}: {peak / 1e6:6.1f} MB")
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
