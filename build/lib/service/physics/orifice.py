"""Live steam passed by a failed-open trap's orifice.

Two ideal methods, one answer:

- Napier's equation (1866) for choked flow of dry saturated steam: W [lb/s] = A [in2] *
  p1 [psia] / 70, in SI W [kg/s] = 1.45674e-3 * A [m2] * p1 [Pa]. It is the basis of
  API 520 Part I (2014), section 5.7, steam relief sizing, and of the US DOE Steam Tip
  Sheet "Inspect and Repair Steam Traps" discharge table.
- An isentropic homogeneous-equilibrium nozzle computed with IF97: the mass flux at
  the throat is G = sqrt(2 (h1 - ht)) / vt along the isentrope s = s1, maximised over
  the throat pressure (the maximum is the choked flux). It covers every pressure ratio
  and superheated or wet inlet steam.

Napier stays the anchor wherever it holds (choked, dry saturated, up to 1500 psia),
because the trade's discharge coefficients are fitted to it. Everywhere else the
nozzle supplies a ratio to that anchor, never a second absolute figure:

    W = Cd * W_Napier(p1) * G(p1, T1, p2) / G*(p1, saturated) * K_high(p1)

- back pressure: G(p2) / G* is 1 while the flow is choked and falls smoothly past the
  nozzle's own critical pressure, so the flow is continuous and never falls as p1
  rises or p2 falls (a fixed switch at p2/p1 = 0.58 between Napier and the nozzle made
  a step of up to 4 %);
- superheat: G*(p1, T1) / G*(p1, saturated) < 1, the part API 520's superheat factor
  KSH tabulates;
- above 1500 psia (10 342 kPa abs), where API 520 applies its correction KN, the ratio
  (G*(p1)/p1) / (G*(1500 psia)/1500 psia) continues Napier without a step; a test
  checks it against KN.

A real orifice passes less than the ideal: both are multiplied by a discharge
coefficient Cd (sharp-edged orifices 0.6-0.7; the US DOE table implies 0.73).
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
# Napier's equation holds up to 1500 psia (API 520 Part I, 5.7).
NAPIER_LIMIT_KPA_ABS = 1500.0 * PSI_PA / 1000.0
# Below this ratio steam from any inlet the program takes is choked: the critical
# ratio of the equilibrium nozzle lies near 0.55 (superheated) to 0.58 (saturated), so
# the nozzle need not be searched (a speed path; its answer is the same).
SURELY_CHOKED_PRESSURE_RATIO = 0.5
SATURATION_READING_K = 0.01  # a steam temperature this close to saturation is saturated
MAXIMUM_ORIFICE_MM = 50.0
SECONDS_PER_HOUR = 3600.0


class FlowRegime(StrEnum):
    CHOKED = "choked"
    SUBCRITICAL = "subcritical"


class FlowMethod(StrEnum):
    NAPIER = "napier"  # choked dry saturated steam up to 1500 psia: Napier alone
    # Napier times the IF97 nozzle's ratio for back pressure, superheat or high pressure
    NAPIER_NOZZLE_CORRECTED = "napier_nozzle_corrected"


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


def steam_discharge(
    orifice_diameter_mm: float,
    inlet_pressure_kpa_abs: float,
    return_pressure_kpa_abs: float,
    discharge_coefficient: float,
    steam_temperature_c: float | None = None,
) -> SteamDischarge:
    """Live steam through a trap's orifice [kg/h], with the regime and method.

    Dry saturated steam unless `steam_temperature_c` [degC] gives a superheated line.
    Napier's equation, corrected by the isentropic nozzle's ratio where Napier alone
    does not hold (module docstring). Valid 0 < D <= 50 mm, p2 < p1 <= 22 064 kPa abs.

    >>> discharge = steam_discharge(5.0, 501.325, 401.325, 0.7)
    >>> discharge.regime.value, discharge.method.value, round(discharge.flow_kg_h, 1)
    ('subcritical', 'napier_nozzle_corrected', 30.9)
    """
    if return_pressure_kpa_abs >= inlet_pressure_kpa_abs:
        raise ValueError("the return pressure must be below the inlet pressure for steam to flow")
    napier = napier_steam_flow_kg_h(
        orifice_diameter_mm, inlet_pressure_kpa_abs, discharge_coefficient
    )
    if (
        steam_temperature_c is None
        and inlet_pressure_kpa_abs <= NAPIER_LIMIT_KPA_ABS
        and return_pressure_kpa_abs <= SURELY_CHOKED_PRESSURE_RATIO * inlet_pressure_kpa_abs
    ):
        return SteamDischarge(napier, FlowRegime.CHOKED, FlowMethod.NAPIER)
    ratio, regime = nozzle_correction(
        inlet_pressure_kpa_abs, return_pressure_kpa_abs, steam_temperature_c
    )
    exact = ratio == 1.0 and steam_temperature_c is None
    method = FlowMethod.NAPIER if exact else FlowMethod.NAPIER_NOZZLE_CORRECTED
    return SteamDischarge(napier * ratio, regime, method)


def live_steam(
    inlet_pressure_kpa_abs: float, steam_temperature_c: float | None
) -> tuple[float, float]:
    """Enthalpy [kJ/kg] and entropy [kJ/(kg K)] of the live steam at a trap [kPa abs].

    Dry saturated steam where no temperature is given or it is within 0.01 K of
    saturation; superheated steam from IF97 region 2 above it; below it, ValueError.

    >>> [round(value, 1) for value in live_steam(1000.0, 250.0)]
    [2943.2, 6.9]
    """
    saturation = steam_tables.saturation_at_pressure(inlet_pressure_kpa_abs)
    if steam_temperature_c is None or (
        0.0 <= steam_temperature_c - saturation.temperature_c <= SATURATION_READING_K
    ):
        return saturation.hg_kj_kg, saturation.sg_kj_kg_k
    if steam_temperature_c < saturation.temperature_c:
        raise ValueError(
            f"steam at {steam_temperature_c:.6g} °C is below the saturation temperature "
            f"{saturation.temperature_c:.2f} °C at the inlet pressure: live steam is at or "
            "above saturation"
        )
    steam = steam_tables.properties_at_pressure_temperature(
        inlet_pressure_kpa_abs, steam_temperature_c
    )
    return steam.enthalpy_kj_kg, steam.entropy_kj_kg_k


def _saturated_choked_flux(inlet_pressure_kpa_abs: float) -> float:
    return _choked_throat(inlet_pressure_kpa_abs, *live_steam(inlet_pressure_kpa_abs, None))[1]


@lru_cache(maxsize=4096)
def nozzle_correction(
    inlet_pressure_kpa_abs: float,
    return_pressure_kpa_abs: float,
    steam_temperature_c: float | None = None,
) -> tuple[float, FlowRegime]:
    """The factor [-] by which the isentropic nozzle corrects Napier, and the regime.

    G(p1, T1, p2) / G*(p1, saturated), times (G*(p1)/p1) / (G*(1500 psia)/1500 psia)
    above 1500 psia. 1.0 for choked dry saturated steam up to 1500 psia.

    >>> factor, regime = nozzle_correction(1000.0, 900.0)
    >>> round(factor, 3), regime.value
    (0.655, 'subcritical')
    """
    enthalpy, entropy = live_steam(inlet_pressure_kpa_abs, steam_temperature_c)
    throat_pressure, choked_flux = _choked_throat(inlet_pressure_kpa_abs, enthalpy, entropy)
    regime = FlowRegime.CHOKED
    flux = choked_flux
    if return_pressure_kpa_abs > throat_pressure:
        regime = FlowRegime.SUBCRITICAL
        flux = _throat_mass_flux(enthalpy, entropy, return_pressure_kpa_abs)
    saturated_flux = (
        choked_flux
        if steam_temperature_c is None
        else _saturated_choked_flux(inlet_pressure_kpa_abs)
    )
    factor = flux / saturated_flux
    if inlet_pressure_kpa_abs > NAPIER_LIMIT_KPA_ABS:
        factor *= (_saturated_choked_flux(inlet_pressure_kpa_abs) / inlet_pressure_kpa_abs) / (
            _saturated_choked_flux(NAPIER_LIMIT_KPA_ABS) / NAPIER_LIMIT_KPA_ABS
        )
    return factor, regime
