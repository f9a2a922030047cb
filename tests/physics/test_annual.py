"""A year of lost steam in energy, fuel, money and CO2."""

import pytest

from service.physics import steam_tables
from service.physics.annual import Economics, YearlyLoss, no_yearly_loss, yearly_loss
from service.physics.orifice import POUND_KG
from service.physics.units import convert

STEAM_150_PSIG = steam_tables.saturation_at_pressure(convert(150.0, "psig", "kPa(abs)")).hg_kj_kg


def test_doe_tip_sheet_yearly_cost_of_a_leaking_trap() -> None:
    # US DOE Steam Tip Sheet "Inspect and Repair Steam Traps": 75.8 lb/h for 8760 h at
    # $10.00 per 1000 lb of steam is $6,640 a year.
    loss = yearly_loss(
        mass_kg_h=75.8 * POUND_KG,
        lost_enthalpy_kj_kg=STEAM_150_PSIG,
        steam_enthalpy_kj_kg=STEAM_150_PSIG,
        hours_per_year=8760.0,
        economics=Economics(steam_cost_per_tonne=convert(10.0, "per 1000 lb", "per t")),
    )
    assert loss.cost == pytest.approx(6640.0, abs=0.5)
    assert loss.mass_t == pytest.approx(75.8 * POUND_KG * 8.760)


def test_energy_fuel_and_co2_follow_from_the_mass() -> None:
    economics = Economics(fuel_price_per_gj=10.0, water_and_treatment_cost_per_tonne=2.0)
    loss = yearly_loss(
        mass_kg_h=100.0,
        lost_enthalpy_kj_kg=STEAM_150_PSIG,
        steam_enthalpy_kj_kg=STEAM_150_PSIG,
        hours_per_year=1000.0,
        economics=economics,
    )
    heat_kj_kg = STEAM_150_PSIG - economics.makeup_water_enthalpy_kj_kg
    assert loss.mass_t == 100.0
    assert loss.energy_gj == pytest.approx(100.0 * heat_kj_kg / 1000.0)
    assert loss.fuel_gj == pytest.approx(loss.energy_gj / 0.80)
    assert loss.cost == pytest.approx(loss.fuel_gj * 10.0 + 100.0 * 2.0)
    # IPCC 2006 Guidelines, vol. 2 table 2.2: natural gas 56.1 t CO2/TJ.
    assert loss.co2_t == pytest.approx(loss.fuel_gj * 56.1 / 1000.0)


def test_makeup_water_enthalpy_is_compressed_liquid_at_one_atmosphere() -> None:
    # IAPWS R7-97(2012) region 1; 15 degC water is about 63 kJ/kg (any steam table).
    assert Economics().makeup_water_enthalpy_kj_kg == pytest.approx(63.0, abs=0.2)


def test_condensate_heat_is_priced_as_its_share_of_steam_heat() -> None:
    economics = Economics(steam_cost_per_tonne=30.0)
    hf = steam_tables.saturation_at_pressure(convert(150.0, "psig", "kPa(abs)")).hf_kj_kg
    water = yearly_loss(
        mass_kg_h=10.0,
        lost_enthalpy_kj_kg=hf,
        steam_enthalpy_kj_kg=STEAM_150_PSIG,
        hours_per_year=1000.0,
        economics=economics,
    )
    makeup = economics.makeup_water_enthalpy_kj_kg
    assert water.cost == pytest.approx(10.0 * 30.0 * (hf - makeup) / (STEAM_150_PSIG - makeup))


def test_without_a_cost_basis_there_is_no_cost() -> None:
    loss = yearly_loss(
        mass_kg_h=1.0,
        lost_enthalpy_kj_kg=STEAM_150_PSIG,
        steam_enthalpy_kj_kg=STEAM_150_PSIG,
        hours_per_year=1.0,
        economics=Economics(),
    )
    assert loss.cost is None
    assert no_yearly_loss(Economics()).cost is None
    assert no_yearly_loss(Economics(fuel_price_per_gj=1.0)).cost == 0.0


def test_yearly_losses_add_up() -> None:
    one = YearlyLoss(1.0, 2.0, 3.0, 4.0, 5.0)
    assert one + one == YearlyLoss(2.0, 4.0, 6.0, 8.0, 10.0)
    assert (one + YearlyLoss(1.0, 1.0, 1.0, None, 1.0)).cost is None


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        ({"steam_cost_per_tonne": 1.0, "fuel_price_per_gj": 1.0}, "not both"),
        ({"boiler_efficiency": 0.0}, "boiler efficiency"),
        ({"boiler_efficiency": 1.2}, "boiler efficiency"),
    ],
)
def test_inconsistent_economics_are_refused(arguments: dict[str, float], message: str) -> None:
    with pytest.raises(ValueError, match=message):
        Economics(**arguments)  # type: ignore[arg-type]


@pytest.mark.parametrize(("hours", "message"), [(-1.0, "negative"), (8785.0, "leap year")])
def test_hours_outside_a_year_are_refused(hours: float, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        yearly_loss(
            mass_kg_h=1.0,
            lost_enthalpy_kj_kg=STEAM_150_PSIG,
            steam_enthalpy_kj_kg=STEAM_150_PSIG,
            hours_per_year=hours,
            economics=Economics(),
        )


def test_co2_factor_on_the_other_heating_value_basis_is_converted() -> None:
    # IPCC 2006 Guidelines vol. 2 table 2.2: natural gas 56.1 kg CO2/GJ on a net (LHV)
    # basis. Fuel counted on a gross (HHV) basis holds about 10 % more GJ (IPCC 2006
    # vol. 2 ch. 1, 1.4.1.2, from memory), so per gross GJ the factor is 56.1 * 0.9.
    from service.physics.annual import HeatingValue

    gross = Economics(fuel_heating_value=HeatingValue.HHV)
    assert gross.co2_kg_per_gj_counted == pytest.approx(56.1 * 0.9)
    # US EPA 40 CFR 98 table C-1: natural gas 53.06 kg CO2/MMBtu on a gross (HHV) basis,
    # i.e. 50.29 kg/GJ; counted against net GJ it becomes 50.29 / 0.9 = 55.9, within 1 %
    # of IPCC's 56.1: the two published factors agree once their bases do.
    epa_per_gj = 53.06 / 1.055056
    net = Economics(co2_kg_per_gj_fuel=epa_per_gj, co2_factor_heating_value=HeatingValue.HHV)
    assert net.co2_kg_per_gj_counted == pytest.approx(56.1, rel=0.01)
    assert Economics().co2_kg_per_gj_counted == 56.1
