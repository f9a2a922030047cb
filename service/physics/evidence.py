"""Temperatures as evidence: readings beside a trap set against the saturation
temperature at the line's pressures, to ask a technician to confirm an unlikely finding.
A prompt, never a verdict: surface thermometers read low on painted or insulated pipe,
and the technician's finding stands once confirmed.

The yardstick is Tsat at the inlet (p1) and at the return (p2), from IAPWS-IF97
(IAPWS R7-97(2012)). The margins are common practice, with no single source:

- an inlet reading more than `BACKED_UP_MARGIN_K` below Tsat(p1) points to condensate
  backing up (a flooded or plugged trap) or a line out of use;
- an outlet reading within `STEAM_PASSING_MARGIN_K` of Tsat(p1), where Tsat(p2) is well
  below it, points to live steam passing the trap;
- a plugged trap backs condensate up, so its inlet reads cooler than Tsat(p1); one within
  `SATURATED_MARGIN_K` of it is unlikely;
- an outlet hotter than the inlet by more than `READING_NOISE_K` is a reading to check.
"""

from dataclasses import dataclass
from enum import StrEnum

from service.physics.conditions import TrapCondition
from service.physics.steam_tables import saturation_at_pressure

BACKED_UP_MARGIN_K = 30.0
STEAM_PASSING_MARGIN_K = 10.0
SATURATED_MARGIN_K = 5.0
READING_NOISE_K = 5.0

PASSING_CONDENSATE = frozenset(
    {
        TrapCondition.WORKING,
        TrapCondition.LEAKING,
        TrapCondition.BLOW_THROUGH,
        TrapCondition.RAPID_CYCLING,
    }
)


class Doubt(StrEnum):
    BACKED_UP = "backed_up"  # inlet far below Tsat(p1), yet the trap is said to pass
    STEAM_PASSING = "steam_passing"  # outlet near Tsat(p1), yet the trap is said to work
    HOT_INLET = "hot_inlet"  # inlet at Tsat(p1), yet the trap is said to be plugged
    OUTLET_HOTTER = "outlet_hotter"  # the outlet reads hotter than the inlet


@dataclass(frozen=True, slots=True)
class TemperatureDoubt:
    """What a reading suggests against the finding: the reading [°C] and the temperature
    it is set against [°C]."""

    doubt: Doubt
    reading_field: str  # "upstream_temperature_c" or "downstream_temperature_c"
    reading_c: float
    against_c: float  # Tsat at the pressure it is set against, or the inlet reading


def temperature_doubts(
    *,
    condition: TrapCondition,
    inlet_pressure_kpa_abs: float,
    return_pressure_kpa_abs: float,
    upstream_c: float | None,
    downstream_c: float | None,
) -> list[TemperatureDoubt]:
    """Doubts the readings raise about `condition`; empty when they agree or are absent.

    Pressures [kPa(abs)] on IF97's saturation line; temperatures [°C] as read.

    >>> [d.doubt for d in temperature_doubts(condition=TrapCondition.WORKING,
    ...     inlet_pressure_kpa_abs=1101.325, return_pressure_kpa_abs=101.325,
    ...     upstream_c=95.0, downstream_c=None)]
    [<Doubt.BACKED_UP: 'backed_up'>]
    >>> temperature_doubts(condition=TrapCondition.WORKING, inlet_pressure_kpa_abs=1101.325,
    ...     return_pressure_kpa_abs=101.325, upstream_c=182.0, downstream_c=101.0)
    []
    """
    inlet_c = saturation_at_pressure(inlet_pressure_kpa_abs).temperature_c
    return_c = saturation_at_pressure(return_pressure_kpa_abs).temperature_c
    doubts = []
    if upstream_c is not None:
        if condition in PASSING_CONDENSATE and upstream_c < inlet_c - BACKED_UP_MARGIN_K:
            doubts.append(
                TemperatureDoubt(Doubt.BACKED_UP, "upstream_temperature_c", upstream_c, inlet_c)
            )
        if condition == TrapCondition.PLUGGED and upstream_c >= inlet_c - SATURATED_MARGIN_K:
            doubts.append(
                TemperatureDoubt(Doubt.HOT_INLET, "upstream_temperature_c", upstream_c, inlet_c)
            )
    if downstream_c is not None:
        steam_is_told_apart = inlet_c - return_c > 2 * STEAM_PASSING_MARGIN_K
        if (
            condition == TrapCondition.WORKING
            and steam_is_told_apart
            and downstream_c >= inlet_c - STEAM_PASSING_MARGIN_K
        ):
            doubts.append(
                TemperatureDoubt(
                    Doubt.STEAM_PASSING, "downstream_temperature_c", downstream_c, inlet_c
                )
            )
        if upstream_c is not None and downstream_c > upstream_c + READING_NOISE_K:
            doubts.append(
                TemperatureDoubt(
                    Doubt.OUTLET_HOTTER, "downstream_temperature_c", downstream_c, upstream_c
                )
            )
    return doubts
