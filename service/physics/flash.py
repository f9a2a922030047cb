"""Flash steam: the part of the condensate that boils off where a trap discharges.

Condensate leaves the trap at its inlet pressure p1 (saturated, or subcooled at a
measured temperature) and drops to the return pressure p2 through the valve with no
work and no heat, so its enthalpy is conserved: h1 = x2*hg(p2) + (1 - x2)*hf(p2).
Solved for the quality, the flash fraction is x2 = (h1 - hf(p2)) / hfg(p2), and zero
where h1 <= hf(p2) (the condensate is too cool to boil at p2).

Source: shared/DOMAIN.md "Flash steam"; US DOE Steam Tip Sheet "Flash High-Pressure
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
