"""The trade's words for traps, their uses, tests and repairs.

Trap conditions and condensate destinations belong to the calculation core
(`service.physics`); these are the words only the register and surveys need.
"""

from enum import StrEnum

from service.store.csv_format import UNITS_BY_SUFFIX


class TrapType(StrEnum):
    THERMODYNAMIC = "thermodynamic"
    INVERTED_BUCKET = "inverted_bucket"
    FLOAT_THERMOSTATIC = "float_thermostatic"
    THERMOSTATIC_BALANCED_PRESSURE = "thermostatic_balanced_pressure"
    THERMOSTATIC_BIMETALLIC = "thermostatic_bimetallic"
    THERMOSTATIC_LIQUID_EXPANSION = "thermostatic_liquid_expansion"
    FIXED_ORIFICE = "fixed_orifice"


# How far below saturation a thermostatic trap discharges condensate [K] where no
# temperature before the trap was measured. Common practice, no single source:
# balanced-pressure elements open some 10-30 K below saturation (20 K taken), bimetallic
# and liquid-expansion elements further (30 K taken). Other types discharge at saturation.
DISCHARGE_SUBCOOLING_K: dict[TrapType, float] = {
    TrapType.THERMOSTATIC_BALANCED_PRESSURE: 20.0,
    TrapType.THERMOSTATIC_BIMETALLIC: 30.0,
    TrapType.THERMOSTATIC_LIQUID_EXPANSION: 30.0,
}


class Application(StrEnum):
    DRIP = "drip"
    TRACER = "tracer"
    PROCESS = "process"
    SPACE_HEATING = "space_heating"
    OTHER = "other"


class TestMethod(StrEnum):
    __test__ = False  # not a pytest test class, despite the name

    ULTRASONIC = "ultrasonic"
    TEMPERATURE = "temperature"
    VISUAL = "visual"
    ULTRASONIC_TEMPERATURE = "ultrasonic_temperature"
    ULTRASONIC_VISUAL = "ultrasonic_visual"
    TEMPERATURE_VISUAL = "temperature_visual"
    ULTRASONIC_TEMPERATURE_VISUAL = "ultrasonic_temperature_visual"


class RecommendedAction(StrEnum):
    NONE = "none"
    RETEST = "retest"
    REPAIR = "repair"
    REPLACE = "replace"


class RepairKind(StrEnum):
    REPAIRED = "repaired"
    REPLACED = "replaced"


class SurveyStatus(StrEnum):
    """A survey round's life: planned -> in progress -> closed. Findings are recorded only
    while it is in progress; once closed, only by a manager's correction."""

    PLANNED = "planned"
    IN_PROGRESS = "in_progress"
    CLOSED = "closed"


class CostBasis(StrEnum):
    STEAM_COST = "steam_cost"
    FUEL_PRICE = "fuel_price"


LABELS: dict[str, str] = {
    "thermodynamic": "Thermodynamic (disc)",
    "inverted_bucket": "Inverted bucket",
    "float_thermostatic": "Float and thermostatic",
    "thermostatic_balanced_pressure": "Thermostatic, balanced pressure",
    "thermostatic_bimetallic": "Thermostatic, bimetallic",
    "thermostatic_liquid_expansion": "Thermostatic, liquid expansion",
    "fixed_orifice": "Fixed orifice (venturi)",
    "drip": "Drip (main drainage)",
    "tracer": "Tracer",
    "process": "Process",
    "space_heating": "Space heating",
    "other": "Other",
    "ultrasonic": "Ultrasonic",
    "temperature": "Temperature",
    "visual": "Visual",
    "ultrasonic_temperature": "Ultrasonic and temperature",
    "ultrasonic_visual": "Ultrasonic and visual",
    "temperature_visual": "Temperature and visual",
    "ultrasonic_temperature_visual": "Ultrasonic, temperature and visual",
    "none": "No action",
    "retest": "Test again",
    "repair": "Repair",
    "replace": "Replace",
    "repaired": "Repaired",
    "replaced": "Replaced",
    "working": "Working",
    "leaking": "Leaking",
    "blow_through": "Blowing through",
    "plugged": "Plugged",
    "flooded": "Flooded",
    "rapid_cycling": "Rapid cycling",
    "out_of_service": "Out of service",
    "not_accessible": "Not accessible",
    "closed_return": "Closed return",
    "vented_receiver": "Vented receiver",
    "drain": "Drain",
    "napier": "Napier's equation",
    "napier_nozzle_corrected": "Napier's equation, corrected by the IF97 nozzle",
    "planned": "Planned",
    "in_progress": "In progress",
    "closed": "Closed",
    "steam_cost": "Steam cost per tonne",
    "fuel_price": "Fuel price per GJ",
    "lhv": "Net (lower) heating value, LHV",
    "hhv": "Gross (higher) heating value, HHV",
    "heat_not_recovered": "Heat the return does not bring back",
    "as_steam_lost": "As steam lost, made again from make-up",
    "failure": "Failure losses",
    "risk": "Risks",
    "unknown": "Unknown",
}


def label(word: str) -> str:
    """The words a person reads for a stored value or a field's name.

    >>> label("blow_through"), label("inlet_pressure_kpa_g")
    ('Blowing through', 'Inlet pressure (kPa(g))')
    """
    if word in LABELS:
        return LABELS[word]
    for suffix, units in UNITS_BY_SUFFIX.items():  # a field's name ends in its unit
        if word.endswith(f"_{suffix}"):
            return f"{label(word.removesuffix(f'_{suffix}'))} ({units[suffix]})"
    return word.replace("_", " ").capitalize()
