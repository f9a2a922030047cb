"""Writes the demo plant's files. Invented data, for the demo only.

Wrenfield Board Mill is a paperboard mill of our own invention: high-, medium- and
low-pressure steam (1000, 400 and 100 kPa(g)), four areas, about 200 traps, and five
yearly survey rounds: 2022 to 2024 surveyed with no repairs made, then the 2025 round,
a repair programme, and the 2026 round. Run from the project root:

    .venv/bin/python seed_data/generate.py

It rewrites register.csv, findings-2022.csv to findings-2026.csv and repairs.csv beside
this file; site.json and surveys.json are written by hand.

The earlier rounds are drawn last, from a generator of their own, so the 2025 and 2026
files stay as they were: a trap failed in 2025 failed at a time drawn between its
installation and that round at its type's and application's failure rate (invented
rates, below), and was found failed in every earlier round after that time.
"""

import csv
import datetime as dt
import math
import random
from pathlib import Path

HERE = Path(__file__).resolve().parent
RANDOM = random.Random(20250303)

HP, MP, LP = 1000.0, 400.0, 100.0

# (area, tag prefix, count, [(application, trap type, inlet, return, destination, load kg/h,
#   orifice mm)] choices with weights)
AREAS = [
    (
        "Boiler house and HP header",
        "BH",
        34,
        [
            (("drip", "thermodynamic", HP, 0.0, "vented_receiver", 15.0, 3.2), 5),
            (("drip", "inverted_bucket", HP, 0.0, "vented_receiver", 25.0, 4.0), 3),
            (("process", "float_thermostatic", HP, 30.0, "closed_return", 400.0, 6.4), 1),
            (("tracer", "thermostatic_bimetallic", HP, 0.0, "drain", 8.0, 2.4), 1),
        ],
    ),
    (
        "PM2 dryer section",
        "PM",
        82,
        [
            (("process", "float_thermostatic", MP, 60.0, "closed_return", 350.0, 7.9), 5),
            (("process", "inverted_bucket", MP, 60.0, "closed_return", 250.0, 6.4), 3),
            (("drip", "thermodynamic", MP, 0.0, "vented_receiver", 12.0, 3.2), 2),
            (("drip", "fixed_orifice", MP, 0.0, "vented_receiver", 10.0, 2.0), 1),
        ],
    ),
    (
        "Stock preparation",
        "SP",
        48,
        [
            (("process", "float_thermostatic", MP, 0.0, "vented_receiver", 180.0, 6.4), 3),
            (("tracer", "thermostatic_balanced_pressure", LP, 0.0, "drain", 6.0, 2.4), 3),
            (("drip", "thermodynamic", MP, 0.0, "vented_receiver", 12.0, 3.2), 2),
            (("tracer", "thermostatic_liquid_expansion", LP, 0.0, "drain", 5.0, 2.4), 1),
        ],
    ),
    (
        "Finishing and warehouse",
        "FW",
        40,
        [
            (
                (
                    "space_heating",
                    "thermostatic_balanced_pressure",
                    LP,
                    0.0,
                    "vented_receiver",
                    40.0,
                    3.2,
                ),
                4,
            ),
            (("space_heating", "float_thermostatic", LP, 0.0, "closed_return", 90.0, 4.8), 2),
            (("drip", "thermodynamic", LP, 0.0, "drain", 6.0, 2.4), 1),
        ],
    ),
]

YEAR_ONE = [  # (condition, weight): a site three years without trap maintenance
    ("working", 77),
    ("leaking", 8),
    ("blow_through", 5),
    ("rapid_cycling", 1),
    ("plugged", 3),
    ("flooded", 2),
    ("not_accessible", 3),
    ("out_of_service", 1),
]
YEAR_TWO_NEW = [  # what a working trap turns into over a year of scheduled maintenance
    ("working", 93),
    ("leaking", 3),
    ("blow_through", 1),
    ("plugged", 1),
    ("not_accessible", 1),
    ("rapid_cycling", 1),
]
FAILED = {"leaking", "blow_through", "rapid_cycling", "plugged", "flooded"}
TECHNICIANS = ["A. Okafor", "M. Lindqvist", "R. Patel"]
LOSS_METHOD = {
    "thermodynamic": "ultrasonic",
    "inverted_bucket": "ultrasonic_temperature",
    "float_thermostatic": "ultrasonic_temperature",
    "fixed_orifice": "temperature",
}


def _pick(choices: list[tuple[object, int]]) -> object:
    items, weights = zip(*choices, strict=True)
    return RANDOM.choices(items, weights)[0]


def _register() -> list[dict[str, object]]:
    traps = []
    for area, prefix, count, kinds in AREAS:
        for number in range(1, count + 1):
            application, trap_type, inlet, outlet, destination, load, orifice = _pick(kinds)  # type: ignore[misc]
            traps.append(
                {
                    "tag": f"{prefix}-{number:03d}",
                    "area": area,
                    "location": f"{area.split()[0]} line {1 + (number - 1) // 10}, point {number}",
                    "route_position": number * 10,
                    "application": application,
                    "trap_type": trap_type,
                    "connection_size": RANDOM.choice(["DN15", "DN20", "DN25"]),
                    "orifice_diameter_mm": orifice,
                    "inlet_pressure_kpa_g": inlet,
                    "return_pressure_kpa_g": outlet,
                    "condensate_destination": destination,
                    "condensate_load_kg_h": round(load * RANDOM.uniform(0.6, 1.4), 1),
                    "hours_per_year": 4200 if application == "space_heating" else "",
                    "in_service": "yes",
                    "installed_on": (
                        dt.date(2012, 1, 1) + dt.timedelta(days=RANDOM.randrange(3000))
                    ).isoformat(),
                    "notes": "",
                }
            )
    return traps


def _moment(start: dt.date, index: int) -> str:
    day = start + dt.timedelta(days=index // 25)
    when = dt.datetime.combine(day, dt.time(7, 30)) + dt.timedelta(minutes=(index % 25) * 14)
    return when.replace(tzinfo=dt.UTC).isoformat()


def _finding(trap: dict[str, object], condition: str, when: str) -> dict[str, object]:
    inlet = float(trap["inlet_pressure_kpa_g"])  # type: ignore[arg-type]
    saturation = {HP: 184.0, MP: 152.0, LP: 120.0}[inlet]
    upstream = round(saturation - RANDOM.uniform(2, 8), 1)
    downstream = {
        "working": 100.0,
        "leaking": 108.0,
        "blow_through": 118.0,
        "rapid_cycling": 104.0,
        "plugged": 45.0,
        "flooded": 70.0,
    }.get(condition)
    action = {
        "leaking": "repair",
        "blow_through": "replace",
        "rapid_cycling": "repair",
        "plugged": "repair",
        "flooded": "retest",
        "not_accessible": "retest",
    }.get(condition, "none")
    notes = {
        "not_accessible": "Behind stored reels; no safe access.",
        "out_of_service": "Line valved off for the season.",
        "blow_through": "Continuous discharge, live steam at the vent.",
    }.get(condition, "")
    return {
        "tag": trap["tag"],
        "tested_at": when,
        "tested_by": RANDOM.choice(TECHNICIANS),
        "method": LOSS_METHOD.get(str(trap["trap_type"]), "ultrasonic_temperature"),
        "condition": condition,
        "loss_factor_override": "",
        "recommended_action": action,
        "notes": notes,
        "upstream_temperature_c": upstream
        if condition not in {"not_accessible", "out_of_service"}
        else "",
        "downstream_temperature_c": round(downstream + RANDOM.uniform(-4, 4), 1)
        if downstream
        else "",
    }


def _write(name: str, rows: list[dict[str, object]]) -> None:
    with (HERE / name).open("w", newline="", encoding="utf-8") as out:
        writer = csv.DictWriter(out, fieldnames=list(rows[0]))
        writer.writeheader()
        writer.writerows(rows)


# Invented yearly failure rates by trap type, scaled by application: for the demo only.
HISTORY_RATES = {
    "thermodynamic": 0.12,
    "inverted_bucket": 0.06,
    "float_thermostatic": 0.05,
    "thermostatic_balanced_pressure": 0.15,
    "thermostatic_bimetallic": 0.10,
    "thermostatic_liquid_expansion": 0.10,
    "fixed_orifice": 0.02,
}
HISTORY_APPLICATION = {"tracer": 1.3, "drip": 1.0, "process": 0.9, "space_heating": 1.1}
HISTORY_ROUNDS = [dt.date(2022, 3, 7), dt.date(2023, 3, 6), dt.date(2024, 3, 4)]
HISTORY = random.Random(20220307)


def _failed_on(trap: dict[str, object], before: dt.date) -> dt.date:
    """When a trap found failed on `before` failed: drawn from its rate, truncated to
    the span between its installation and that day (inverse of the truncated CDF)."""
    installed = dt.date.fromisoformat(str(trap["installed_on"]))
    rate = HISTORY_RATES[str(trap["trap_type"])] * HISTORY_APPLICATION[str(trap["application"])]
    span = (before - installed).days / 365.25
    share = HISTORY.random() * (1 - math.exp(-rate * span))
    years = -math.log(1 - share) / rate
    return installed + dt.timedelta(days=int(years * 365.25))


def _history(traps: list[dict[str, object]], first: list[object]) -> list[list[dict[str, object]]]:
    """The 2022 to 2024 rounds before the 2025 conditions `first`."""
    failed_on = {
        str(trap["tag"]): _failed_on(trap, dt.date(2025, 3, 3))
        for trap, condition in zip(traps, first, strict=True)
        if condition in FAILED
    }
    rounds = []
    for start in HISTORY_ROUNDS:
        findings = []
        for index, (trap, condition) in enumerate(zip(traps, first, strict=True)):
            tag = str(trap["tag"])
            if tag in failed_on:
                found = str(condition) if failed_on[tag] <= start else "working"
            elif condition == "not_accessible" and HISTORY.random() < 0.5:
                found = "not_accessible"
            else:
                found = "working"
            findings.append(_finding(trap, found, _moment(start, index)))
        rounds.append(findings)
    return rounds


def main() -> None:
    traps = _register()
    first = [_pick(YEAR_ONE) for _ in traps]
    findings_one = [
        _finding(trap, str(condition), _moment(dt.date(2025, 3, 3), index))
        for index, (trap, condition) in enumerate(zip(traps, first, strict=True))
    ]
    repairs, second = [], []
    for trap, condition in zip(traps, first, strict=True):
        repaired = condition in FAILED and RANDOM.random() < 0.85
        if repaired:
            kind = "replaced" if condition == "blow_through" else "repaired"
            repairs.append(
                {
                    "tag": trap["tag"],
                    "repaired_on": (
                        dt.date(2025, 4, 7) + dt.timedelta(days=RANDOM.randrange(180))
                    ).isoformat(),
                    "kind": kind,
                    "cost": {"replaced": 520.0, "repaired": 180.0}[kind],
                    "notes": "Wrenfield maintenance crew",
                }
            )
            second.append("working" if RANDOM.random() < 0.95 else "leaking")
        elif condition in FAILED:
            second.append(condition)
        else:
            second.append(str(_pick(YEAR_TWO_NEW)))
    findings_two = [
        _finding(trap, condition, _moment(dt.date(2026, 3, 2), index))
        for index, (trap, condition) in enumerate(zip(traps, second, strict=True))
    ]
    _write("register.csv", traps)
    _write("findings-2025.csv", findings_one)
    _write("findings-2026.csv", findings_two)
    _write("repairs.csv", repairs)
    for start, findings in zip(HISTORY_ROUNDS, _history(traps, first), strict=True):
        _write(f"findings-{start.year}.csv", findings)


if __name__ == "__main__":
    main()
