"""IAPWS-IF97 through the adapter, against the release's own verification tables.

Source of every number here: IAPWS R7-97(2012), "Revised Release on the IAPWS
Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam",
Tables 5, 15, 35 and 36. The release prints nine significant digits; the tolerance
is half a unit in the last printed digit.
"""

import pytest

from service.physics import steam_tables


def _ninth_digit(value: float) -> float:
    return abs(value) * 5e-9


# IAPWS R7-97(2012), Table 35: saturation pressure [MPa] at T [K].
@pytest.mark.parametrize(
    ("temperature_k", "pressure_mpa"),
    [(300.0, 0.353658941e-2), (500.0, 0.263889776e1), (600.0, 0.123443146e2)],
)
def test_saturation_pressure_matches_table_35(temperature_k: float, pressure_mpa: float) -> None:
    saturation = steam_tables.saturation_at_temperature(temperature_k - 273.15)
    assert saturation.pressure_kpa_abs / 1000 == pytest.approx(
        pressure_mpa, abs=_ninth_digit(pressure_mpa)
    )


# IAPWS R7-97(2012), Table 36: saturation temperature [K] at p [MPa].
@pytest.mark.parametrize(
    ("pressure_mpa", "temperature_k"),
    [(0.1, 0.372755919e3), (1.0, 0.453035632e3), (10.0, 0.584149488e3)],
)
def test_saturation_temperature_matches_table_36(pressure_mpa: float, temperature_k: float) -> None:
    saturation = steam_tables.saturation_at_pressure(pressure_mpa * 1000)
    assert saturation.temperature_c + 273.15 == pytest.approx(
        temperature_k, abs=_ninth_digit(temperature_k)
    )


# IAPWS R7-97(2012), Table 5 (region 1) and Table 15 (region 2): h [kJ/kg] at T [K], p [MPa].
@pytest.mark.parametrize(
    ("temperature_k", "pressure_mpa", "enthalpy_kj_kg"),
    [
        (300.0, 3.0, 0.115331273e3),
        (300.0, 80.0, 0.184142828e3),
        (500.0, 3.0, 0.975542239e3),
        (300.0, 0.0035, 0.254991145e4),
        (700.0, 0.0035, 0.333568375e4),
        (700.0, 30.0, 0.263149474e4),
    ],
)
def test_single_phase_enthalpy_matches_tables_5_and_15(
    temperature_k: float, pressure_mpa: float, enthalpy_kj_kg: float
) -> None:
    properties = steam_tables.properties_at_pressure_temperature(
        pressure_mpa * 1000, temperature_k - 273.15
    )
    assert properties.enthalpy_kj_kg == pytest.approx(
        enthalpy_kj_kg, abs=_ninth_digit(enthalpy_kj_kg)
    )


@pytest.mark.parametrize("pressure_kpa_abs", [0.5, 0.611, 22064.01, 30000.0, -1.0])
def test_pressure_off_the_saturation_line_raises_a_readable_error(pressure_kpa_abs: float) -> None:
    with pytest.raises(ValueError, match=r"outside the range of boiling water and steam"):
        steam_tables.saturation_at_pressure(pressure_kpa_abs)


@pytest.mark.parametrize("pressure_kpa_abs", [0.611657, 22064.0])
def test_both_ends_of_the_saturation_line_are_accepted(pressure_kpa_abs: float) -> None:
    saturation = steam_tables.saturation_at_pressure(pressure_kpa_abs)
    assert saturation.hg_kj_kg >= saturation.hf_kj_kg


@pytest.mark.parametrize("temperature_c", [0.0, 374.0, -5.0])
def test_temperature_off_the_saturation_line_raises(temperature_c: float) -> None:
    with pytest.raises(ValueError, match="outside the range of boiling water and steam"):
        steam_tables.saturation_at_temperature(temperature_c)


@pytest.mark.parametrize(
    ("pressure_kpa_abs", "temperature_c"), [(200_000.0, 100.0), (100.0, 900.0), (100.0, -1.0)]
)
def test_single_phase_outside_the_formulation_raises(
    pressure_kpa_abs: float, temperature_c: float
) -> None:
    with pytest.raises(ValueError, match="outside"):
        steam_tables.properties_at_pressure_temperature(pressure_kpa_abs, temperature_c)


def test_enthalpy_beyond_the_formulation_names_the_state() -> None:
    with pytest.raises(ValueError, match=r"no IAPWS-IF97 state at 101.325 kPa\(abs\) and 99999"):
        steam_tables.properties_at_pressure_enthalpy(101.325, 99999.0)


def test_saturation_lookups_are_cached() -> None:
    steam_tables.saturation_at_pressure.cache_clear()
    first = steam_tables.saturation_at_pressure(742.0)
    second = steam_tables.saturation_at_pressure(742.0)
    assert first is second
    assert steam_tables.saturation_at_pressure.cache_info().hits == 1


def test_latent_heat_is_hg_minus_hf() -> None:
    saturation = steam_tables.saturation_at_pressure(500.0)
    assert saturation.hfg_kj_kg == saturation.hg_kj_kg - saturation.hf_kj_kg
