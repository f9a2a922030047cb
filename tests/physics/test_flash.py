"""Flash steam from condensate discharged to a lower pressure."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from service.physics import steam_tables
from service.physics.flash import condensate_enthalpy_kj_kg, flash_of_condensate
from service.physics.pressure import absolute_from_gauge
from service.physics.units import convert


def test_doe_tip_sheet_150_psig_condensate_flashed_to_30_psig() -> None:
    # US DOE Steam Tip Sheet "Flash High-Pressure Condensate to Regenerate Low-Pressure
    # Steam": 150 psig condensate flashed to 30 psig, 10.3 % vaporizes.
    inlet = convert(150.0, "psig", "kPa(abs)")
    outlet = convert(30.0, "psig", "kPa(abs)")
    assert flash_of_condensate(inlet, outlet).flash_fraction == pytest.approx(0.103, abs=5e-4)


def test_condensate_too_cool_to_boil_gives_no_flash() -> None:
    inlet = absolute_from_gauge(1000.0)
    flash = flash_of_condensate(inlet, absolute_from_gauge(0.0), condensate_temperature_c=90.0)
    assert flash.flash_fraction == 0.0


def test_subcooled_condensate_flashes_less_than_saturated() -> None:
    inlet, outlet = absolute_from_gauge(1000.0), absolute_from_gauge(0.0)
    saturated = flash_of_condensate(inlet, outlet).flash_fraction
    subcooled = flash_of_condensate(inlet, outlet, condensate_temperature_c=160.0).flash_fraction
    assert 0.0 < subcooled < saturated


def test_condensate_above_saturation_is_refused() -> None:
    with pytest.raises(ValueError, match="above the saturation temperature"):
        condensate_enthalpy_kj_kg(absolute_from_gauge(0.0), 120.0)


def test_return_at_or_above_inlet_is_refused() -> None:
    with pytest.raises(ValueError, match="below the inlet pressure"):
        flash_of_condensate(500.0, 500.0)


inlet_pressures = st.floats(min_value=2.0, max_value=20_000.0)
return_shares = st.floats(min_value=0.001, max_value=0.999)


@given(inlet=inlet_pressures, share=return_shares)
def test_flash_fraction_lies_in_zero_to_one_and_closes_the_energy_balance(
    inlet: float, share: float
) -> None:
    outlet = max(inlet * share, steam_tables.TRIPLE_POINT_PRESSURE_KPA)
    flash = flash_of_condensate(inlet, outlet)
    assert 0.0 <= flash.flash_fraction < 1.0
    mixed = (
        flash.flash_fraction * flash.return_hg_kj_kg
        + (1.0 - flash.flash_fraction) * flash.return_hf_kj_kg
    )
    assert mixed == pytest.approx(flash.inlet_enthalpy_kj_kg, rel=1e-9)


@given(low=inlet_pressures, rise=st.floats(min_value=1.001, max_value=10.0))
def test_flash_rises_with_inlet_pressure(low: float, rise: float) -> None:
    high = min(low * rise, 20_000.0)
    outlet = low / 2.0
    higher = flash_of_condensate(high, outlet).flash_fraction
    lower = flash_of_condensate(low, outlet).flash_fraction
    assert higher > lower if high > low * 1.0001 else higher >= lower
