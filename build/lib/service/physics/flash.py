"""Flash steam: the part of the condensate that boils off where a trap discharges.

Condensate leaves the trap at its inlet pressure p1 (saturated, or subcooled at a
measured temperature) and drops to the return pressure p2 through the valve with no
work and no heat, so its enthalpy is conserved: h1 = x2*hg(p2) + (1 - x2)*hf(p2).
Solved for the quality, the flash fraction is x2 = (h1 - hf(p2)) / hfg(p2), and zero
where h1 <= hf(p2) (the condensate is too cool to boil at p2).

Source: IAPWS R7-97(2012) for hf, hg; US DOE Steam Tip Sheet #12 "Flash High-Pressure
Condensate to Regenerate Low-Pressure Steam" (150 psig to 30 psig: 10.3 %).
"""

from dataclasses import dataclass

from service.physics import steam_tables
from service.physics.states import quality_from_enthalpy


@dataclass(frozen=True, slots=True)
class Flash:
    """The flash of condensate from a trap's inlet pressure to its return pressure."""

    flash_fraction: float  # kg of flash steam per kg of condensate, 0 to below 1
    inlet_enthalpy_kj_kg: float
    return_hf_kj_kg: float
    return_hfg_kj_kg: float
    return_hg_kj_kg: float
    inlet_saturation_temperature_c: float
    return_saturation_temperature_c: float


def condensate_enthalpy_kj_kg(
    inlet_pressure_kpa_abs: float, condensate_temperature_c: float | None = None
) -> float:
    """Enthalpy of condensate at a trap's inlet [kJ/kg].

    Saturated liquid hf(p1) when no temperature is given; otherwise compressed liquid
    at the measured temperature from IF97 region 1. A temperature above saturation at
    p1 is not condensate and raises ValueError.

    >>> round(condensate_enthalpy_kj_kg(1101.325), 2)
    781.43
    """
    saturation = steam_tables.saturation_at_pressure(inlet_pressure_kpa_abs)
    if condensate_temperature_c is None:
        return saturation.hf_kj_kg
    if condensate_temperature_c > saturation.temperature_c:
        raise ValueError(
            f"condensate at {condensate_temperature_c:.6g} °C is above the saturation "
            f"temperature {saturation.temperature_c:.2f} °C at the inlet pressure: "
            "that would be steam, not condensate"
        )
    if condensate_temperature_c == saturation.temperature_c:
        return saturation.hf_kj_kg
    return steam_tables.properties_at_pressure_temperature(
        inlet_pressure_kpa_abs, condensate_temperature_c
    ).enthalpy_kj_kg


def flash_of_condensate(
    inlet_pressure_kpa_abs: float,
    return_pressure_kpa_abs: float,
    condensate_temperature_c: float | None = None,
) -> Flash:
    """Flash fraction of condensate discharged from p1 to p2 [kPa abs], with its terms.

    Valid where both pressures lie on the saturation line (0.611657 to 22064 kPa abs)
    and p2 < p1.

    >>> psig = 6.894757293168361
    >>> flash = flash_of_condensate(150 * psig + 101.325, 30 * psig + 101.325)
    >>> round(flash.flash_fraction, 4)
    0.1028
    """
    if return_pressure_kpa_abs >= inlet_pressure_kpa_abs:
        raise ValueError(
            "the return pressure must be below the inlet pressure for condensate to discharge"
        )
    inlet = steam_tables.saturation_at_pressure(inlet_pressure_kpa_abs)
    outlet = steam_tables.saturation_at_pressure(return_pressure_kpa_abs)
    inlet_enthalpy = condensate_enthalpy_kj_kg(inlet_pressure_kpa_abs, condensate_temperature_c)
    return Flash(
        flash_fraction=max(0.0, quality_from_enthalpy(outlet, inlet_enthalpy)),
        inlet_enthalpy_kj_kg=inlet_enthalpy,
        return_hf_kj_kg=outlet.hf_kj_kg,
        return_hfg_kj_kg=outlet.hfg_kj_kg,
        return_hg_kj_kg=outlet.hg_kj_kg,
        inlet_saturation_temperature_c=inlet.temperature_c,
        return_saturation_temperature_c=outlet.temperature_c,
    )


@dataclass(frozen=True, slots=True)
class FlashRecovery:
    """Low-pressure steam a flash vessel recovers from condensate, and its heat a year."""

    flash_fraction: float
    recovered_steam_kg_h: float
    annual_recovered_steam_t: float
    annual_energy_gj: float  # live steam it displaces: hg(vessel) above make-up water


def flash_recovery(
    *,
    condensate_load_kg_h: float,
    inlet_pressure_kpa_abs: float,
    vessel_pressure_kpa_abs: float,
    hours_per_year: float,
    makeup_water_enthalpy_kj_kg: float,
    condensate_temperature_c: float | None = None,
) -> FlashRecovery:
    """Flash steam recovered at a vessel [kPa abs] from condensate at the trap inlet.

    The yield is the mixing rule, x = (h1 - hf(pv)) / hfg(pv); each kilogram displaces
    live steam made from make-up water, so its heat is hg(pv) - h_makeup [kJ/kg].
    Valid where both pressures lie on the saturation line and pv < p1. The traps must
    be able to discharge against the vessel's pressure, and a steady low-pressure load
    must take the steam: neither is checked here.

    Worked example, US DOE Steam Tip Sheet #12 "Flash High-Pressure Condensate to
    Regenerate Low-Pressure Steam" (2006): 5,000 lb/h of 150 psig condensate flashed at
    30 psig, make-up water at 70 degF, 8,760 h: 10.3 % flashes, 515 lb/h.

    >>> pound, psig = 0.45359237, 6.894757293168361
    >>> recovery = flash_recovery(condensate_load_kg_h=5000 * pound,
    ...     inlet_pressure_kpa_abs=150 * psig + 101.325,
    ...     vessel_pressure_kpa_abs=30 * psig + 101.325,
    ...     hours_per_year=8760, makeup_water_enthalpy_kj_kg=88.6)
    >>> round(recovery.recovered_steam_kg_h / pound)
    514
    """
    flash = flash_of_condensate(
        inlet_pressure_kpa_abs, vessel_pressure_kpa_abs, condensate_temperature_c
    )
    recovered_kg_h = condensate_load_kg_h * flash.flash_fraction
    annual_t = recovered_kg_h * hours_per_year / 1000.0
    heat_kj_kg = max(0.0, flash.return_hg_kj_kg - makeup_water_enthalpy_kj_kg)
    return FlashRecovery(
        flash_fraction=flash.flash_fraction,
        recovered_steam_kg_h=recovered_kg_h,
        annual_recovered_steam_t=annual_t,
        annual_energy_gj=annual_t * heat_kj_kg / 1000.0,
    )
