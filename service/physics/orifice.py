"""Live steam passed by a failed-open trap's orifice.

Two methods:

- Napier's equation (1866) for choked flow of saturated steam: W [lb/s] = A [in2] *
  p1 [psia] / 70, in SI W [kg/s] = 1.45674e-3 * A [m2] * p1 [Pa]. It is the basis of
  API 520 Part I steam relief sizing (which adds a correction above 1500 psia).
- An isentropic homogeneous-equilibrium nozzle computed with IF97: the mass flux at
  the throat is G = sqrt(2 (h1 - ht)) / vt along the isentrope s = s1, maximised over
  the throat pressure (the maximum is the choked flux). It covers every pressure ratio
  and superheated or wet inlet steam.

A real orifice passes less than either ideal: both are multiplied by a discharge
coefficient Cd (sharp-edged orifices 0.6-0.7; the US DOE Steam Tip Sheet "Inspect
and Repair Steam Traps" table implies 0.73).

A trap's live-steam inlet is dry saturated steam. Its flow is choked while p2/p1 is
at or below the critical ratio of saturated steam, about 0.58 (shared/DOMAIN.md;
the ideal-gas ratio (2/(k+1))^(k/(k-1)) with k = 1.135 gives 0.577): there Napier
applies; above it the nozzle is evaluated at the back pressure.
"""

import math
from dataclasses import dataclass
from enum import StrEnum
from functools import lru_cache

from scipy.optimize import minimize_scalar

from service.physics import steam_tables
from service.physics.states import WaterState

POUND_KG = 0.45359237  # exact, NIST SP 811 appendix B.8
INCH_M = 0.0254  # exact, NIST SP 811 appendix B.8
PSI_PA = POUND_KG * 9.80665 / INCH_M**2  # lbf/in2 with standard gravity, exact
# Napier's 1/70 lb/(s in2 psia), converted exactly to kg/(s m2 Pa).
NAPIER_KG_PER_S_M2_PA = POUND_KG / (INCH_M**2 * PSI_PA) / 70.0
CRITICAL_PRESSURE_RATIO_SATURATED = 0.58
MAXIMUM_ORIFICE_MM = 50.0
SECONDS_PER_HOUR = 3600.0


class FlowRegime(StrEnum):
    CHOKED = "choked"
    SUBCRITICAL = "subcritical"


class FlowMethod(StrEnum):
    NAPIER = "napier"
    ISENTROPIC_NOZZLE = "isentropic_nozzle"


@dataclass(frozen=True, slots=True)
class NozzleFlux:
    """Mass flux through an ideal isentropic nozzle and where it is reached."""

    mass_flux_kg_s_m2: float
    throat_pressure_kpa_abs: float
    regime: FlowRegime


@dataclass(frozen=True, slots=True)
class SteamDischarge:
    """Live steam through one orifice at one discharge coefficient."""

    flow_kg_h: float
    regime: FlowRegime
    method: FlowMethod


def orifice_area_m2(orifice_diameter_mm: float) -> float:
    """Flow area [m2] of a round orifice of diameter [mm], 0 < D <= 50 mm.

    >>> round(orifice_area_m2(10.0) * 1e6, 4)
    78.5398
    """
    if not (math.isfinite(orifice_diameter_mm) and orifice_diameter_mm > 0.0):
        raise ValueError(f"orifice diameter {orifice_diameter_mm} mm must be above zero")
    if orifice_diameter_mm > MAXIMUM_ORIFICE_MM:
        raise ValueError(
            f"orifice diameter {orifice_diameter_mm:.6g} mm is larger than a steam trap's "
            f"({MAXIMUM_ORIFICE_MM:.0f} mm at most)"
        )
    return math.pi / 4.0 * (orifice_diameter_mm / 1000.0) ** 2


def napier_steam_flow_kg_h(
    orifice_diameter_mm: float, inlet_pressure_kpa_abs: float, discharge_coefficient: float
) -> float:
    """Choked flow of saturated steam by Napier's equation [kg/h].

    W = Cd * 1.45674e-3 * A [m2] * p1 [Pa] kg/s; valid for choked flow (p2/p1 below
    about 0.58) of dry saturated steam up to 1500 psia (10 342 kPa abs), beyond
    which API 520 Part I adds its correction factor KN.

    Example, US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": a 1/8 in orifice
    at 150 psig passes 75.8 lb/h, which is Napier at Cd 0.729:

    >>> pressure = 150 * PSI_PA / 1000 + 101.325
    >>> round(napier_steam_flow_kg_h(3.175, pressure, 0.729) / POUND_KG, 1)
    75.8
    """
    area = orifice_area_m2(orifice_diameter_mm)
    flow_kg_s = NAPIER_KG_PER_S_M2_PA * area * inlet_pressure_kpa_abs * 1000.0
    return discharge_coefficient * flow_kg_s * SECONDS_PER_HOUR


def _throat_mass_flux(
    inlet_enthalpy_kj_kg: float, inlet_entropy_kj_kg_k: float, throat_pressure_kpa_abs: float
) -> float:
    throat = steam_tables.properties_at_pressure_entropy(
        throat_pressure_kpa_abs, inlet_entropy_kj_kg_k
    )
    enthalpy_drop_j_kg = max(0.0, (inlet_enthalpy_kj_kg - throat.enthalpy_kj_kg) * 1000.0)
    return math.sqrt(2.0 * enthalpy_drop_j_kg) / throat.specific_volume_m3_kg


@lru_cache(maxsize=4096)
def _choked_throat(
    inlet_pressure_kpa_abs: float, inlet_enthalpy_kj_kg: float, inlet_entropy_kj_kg_k: float
) -> tuple[float, float]:
    """Throat pressure [kPa abs] and mass flux [kg/(s m2)] at which the flux is greatest."""
    lowest = max(0.05 * inlet_pressure_kpa_abs, 1.01 * steam_tables.TRIPLE_POINT_PRESSURE_KPA)
    search = minimize_scalar(
        lambda pressure: -_throat_mass_flux(inlet_enthalpy_kj_kg, inlet_entropy_kj_kg_k, pressure),
        bounds=(lowest, inlet_pressure_kpa_abs * (1.0 - 1e-6)),
        method="bounded",
        options={"xatol": 1e-7 * inlet_pressure_kpa_abs},
    )
    return float(search.x), -float(search.fun)


def isentropic_nozzle_flux(inlet: WaterState, back_pressure_kpa_abs: float) -> NozzleFlux:
    """Ideal mass flux [kg/(s m2)] of an isentropic equilibrium nozzle from inlet to back pressure.

    The throat pressure that maximises G = sqrt(2 (h1 - ht)) / vt along s = s1 is the
    critical pressure; a back pressure below it leaves the flow choked at that flux,
    a back pressure above it sets the throat pressure itself (subcritical flow).
    Valid for any inlet state in IF97's range with the back pressure below the inlet.

    >>> from service.physics.states import state_from_quality
    >>> flux = isentropic_nozzle_flux(state_from_quality(1000.0, 1.0), 101.325)
    >>> flux.regime.value, round(flux.throat_pressure_kpa_abs / 1000.0, 3)
    ('choked', 0.577)
    """
    if back_pressure_kpa_abs >= inlet.pressure_kpa_abs:
        raise ValueError("the back pressure must be below the inlet pressure for steam to flow")
    throat_pressure, choked_flux = _choked_throat(
        inlet.pressure_kpa_abs, inlet.enthalpy_kj_kg, inlet.entropy_kj_kg_k
    )
    if back_pressure_kpa_abs <= throat_pressure:
        return NozzleFlux(choked_flux, throat_pressure, FlowRegime.CHOKED)
    return NozzleFlux(
        _throat_mass_flux(inlet.enthalpy_kj_kg, inlet.entropy_kj_kg_k, back_pressure_kpa_abs),
        back_pressure_kpa_abs,
        FlowRegime.SUBCRITICAL,
    )


def saturated_steam_discharge(
    orifice_diameter_mm: float,
    inlet_pressure_kpa_abs: float,
    return_pressure_kpa_abs: float,
    discharge_coefficient: float,
) -> SteamDischarge:
    """Dry saturated steam through a trap's orifice [kg/h], with the regime and method.

    Choked (p2/p1 <= 0.58): Napier's equation. Subcritical: the isentropic nozzle
    evaluated at the return pressure.

    >>> discharge = saturated_steam_discharge(5.0, 501.325, 401.325, 0.7)
    >>> discharge.regime.value, discharge.method.value, round(discharge.flow_kg_h, 1)
    ('subcritical', 'isentropic_nozzle', 31.2)
    """
    if return_pressure_kpa_abs >= inlet_pressure_kpa_abs:
        raise ValueError("the return pressure must be below the inlet pressure for steam to flow")
    if return_pressure_kpa_abs / inlet_pressure_kpa_abs <= CRITICAL_PRESSURE_RATIO_SATURATED:
        flow = napier_steam_flow_kg_h(
            orifice_diameter_mm, inlet_pressure_kpa_abs, discharge_coefficient
        )
        return SteamDischarge(flow, FlowRegime.CHOKED, FlowMethod.NAPIER)
    flux = _subcritical_saturated_flux(inlet_pressure_kpa_abs, return_pressure_kpa_abs)
    flow = discharge_coefficient * flux * orifice_area_m2(orifice_diameter_mm) * SECONDS_PER_HOUR
    return SteamDischarge(flow, FlowRegime.SUBCRITICAL, FlowMethod.ISENTROPIC_NOZZLE)


@lru_cache(maxsize=4096)
def _subcritical_saturated_flux(
    inlet_pressure_kpa_abs: float, return_pressure_kpa_abs: float
) -> float:
    saturation = steam_tables.saturation_at_pressure(inlet_pressure_kpa_abs)
    return _throat_mass_flux(saturation.hg_kj_kg, saturation.sg_kj_kg_k, return_pressure_kpa_abs)
