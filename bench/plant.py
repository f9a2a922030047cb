"""Generated registers for the benchmarks, in three shapes of pressure data.

- `levels`: every trap at one of nine header pressures, five kinds of trap (the shape the
  first benchmarks used; flatters every cache);
- `realistic`: headers at six nominal pressures, but each trap's recorded inlet within -10
  to +5 % of its header to 1 kPa, its return to 1 kPa, twelve orifice sizes, seven trap
  types, six applications, loads to 0.1 kg/h and one line in twenty superheated: hundreds of
  distinct pressure pairs, as a surveyed register has them;
- `continuous`: every trap its own inlet and return pressure to 0.01 kPa (the worst case
  for any cache keyed by pressure).

Invented data: no plant's register, only shapes a register could have.
"""

import random
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Literal

Shape = Literal["levels", "realistic", "continuous"]
SHAPES: tuple[Shape, ...] = ("levels", "realistic", "continuous")

LEVELS_KPA_G = [1000.0, 850.0, 700.0, 550.0, 400.0, 300.0, 200.0, 100.0, 50.0]
HEADERS_KPA_G = [1750.0, 1000.0, 700.0, 400.0, 200.0, 100.0]
ORIFICES_MM = [2.4, 3.0, 3.2, 3.6, 4.0, 4.8, 5.0, 6.0, 6.4, 7.9, 9.5, 12.7]
TRAP_TYPES = [
    "thermodynamic",
    "float_thermostatic",
    "inverted_bucket",
    "thermostatic_balanced_pressure",
    "thermostatic_bimetallic",
    "thermostatic_liquid_expansion",
    "fixed_orifice",
]
APPLICATIONS = ["drip", "process", "tracer", "space_heating", "process", "drip"]
LEVEL_KINDS = [
    ("drip", "thermodynamic", 3.2, "vented_receiver"),
    ("process", "float_thermostatic", 6.4, "closed_return"),
    ("process", "inverted_bucket", 4.8, "closed_return"),
    ("tracer", "thermostatic_balanced_pressure", 2.4, "drain"),
    ("space_heating", "thermostatic_bimetallic", 3.2, "vented_receiver"),
]
DESTINATIONS = ["closed_return", "closed_return", "vented_receiver", "vented_receiver", "drain"]


@dataclass(frozen=True, slots=True)
class GeneratedTrap:
    tag: str
    area: str
    route_position: int
    application: str
    trap_type: str
    orifice_diameter_mm: float
    inlet_pressure_kpa_g: float
    return_pressure_kpa_g: float
    condensate_destination: str
    condensate_load_kg_h: float
    steam_temperature_c: float | None


def generated_traps(count: int, shape: Shape, seed: int = 11) -> Iterator[GeneratedTrap]:
    """`count` traps of the given shape; the same seed gives the same register."""
    chooser = random.Random(seed)
    for number in range(count):
        steam_temperature_c = None
        if shape == "levels":
            application, trap_type, orifice_mm, destination = chooser.choice(LEVEL_KINDS)
            inlet = chooser.choice(LEVELS_KPA_G)
            load = chooser.choice([10.0, 40.0, 150.0])
            closed_return = chooser.choice([0.0, inlet * 0.1])
        else:
            application = chooser.choice(APPLICATIONS)
            trap_type = chooser.choice(TRAP_TYPES)
            orifice_mm = chooser.choice(ORIFICES_MM)
            destination = chooser.choice(DESTINATIONS)
            header = chooser.choice(HEADERS_KPA_G)
            digits = 0 if shape == "realistic" else 2
            inlet = round(header * chooser.uniform(0.90, 1.05), digits)
            closed_return = round(inlet * chooser.uniform(0.0, 0.3), digits)
            load = round(chooser.lognormvariate(3.5, 1.0), 1)
            if header >= 1000.0 and chooser.random() < 0.05:
                steam_temperature_c = float(chooser.randint(230, 320))
        yield GeneratedTrap(
            tag=f"T{number:06d}",
            area=f"Area {number % 12:02d}",
            route_position=number,
            application=application,
            trap_type=trap_type,
            orifice_diameter_mm=orifice_mm,
            inlet_pressure_kpa_g=inlet,
            # A vented receiver is open to atmosphere; a return may be pressurised.
            return_pressure_kpa_g=0.0 if destination != "closed_return" else closed_return,
            condensate_destination=destination,
            condensate_load_kg_h=load,
            steam_temperature_c=steam_temperature_c,
        )
