"""IAPWS-IF97 through the adapter, against the release's own verification tables.

Source of every number here: IAPWS R7-97(2012), "Revised Release on the IAPWS
Industrial Formulation 1997 for the Thermodynamic Properties of Water and Steam",
Tables 5, 15, 35 and 36. The release prints nine significant digits; the tolerance
is half a unit in the last printed digit.
"""

import pytest
from iapws import IAPWS97

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


# The adapter's fast backend (CoolProp's IF97) against iapws' IAPWS97 at the same inputs,
# both implementations of IAPWS R7-97(2012): 200 pressures spread logarithmically from the
# triple point to 16.5 MPa, the region 3 limit, a wet entropy at each, and single-phase
# states over regions 1 and 2. The bound asked is 1e-6 relative; they agree within 1e-8
# (the largest part, 7.8e-9, is hf at the triple point, itself -6e-8 kJ/kg).
_WET_PRESSURES_KPA = [
    steam_tables.TRIPLE_POINT_PRESSURE_KPA
    * (steam_tables.REGION_3_SATURATION_PRESSURE_KPA / steam_tables.TRIPLE_POINT_PRESSURE_KPA)
    ** (index / 199)
    for index in range(200)
]


def _relative(ours: float, theirs: float) -> float:
    return abs(ours - theirs) / abs(theirs)


def test_saturation_equals_iapws97_at_every_pressure_below_region_3() -> None:
    worst = 0.0
    for pressure_kpa in _WET_PRESSURES_KPA:
        steam_tables.saturation_at_pressure.cache_clear()
        ours = steam_tables.saturation_at_pressure(pressure_kpa)
        liquid = IAPWS97(P=pressure_kpa / 1000, x=0.0)
        vapour = IAPWS97(P=pressure_kpa / 1000, x=1.0)
        pairs = [
            (ours.temperature_c + 273.15, liquid.T),
            (ours.hf_kj_kg, liquid.h),
            (ours.hg_kj_kg, vapour.h),
            (ours.sf_kj_kg_k, liquid.s),
            (ours.sg_kj_kg_k, vapour.s),
            (ours.vf_m3_kg, liquid.v),
            (ours.vg_m3_kg, vapour.v),
        ]
        worst = max(worst, *(_relative(a, b) for a, b in pairs))
    assert worst < 1e-8


def test_wet_expansion_equals_iapws97_at_every_pressure_below_region_3() -> None:
    worst = 0.0
    for index, pressure_kpa in enumerate(_WET_PRESSURES_KPA):
        saturation = steam_tables.saturation_at_pressure(pressure_kpa)
        quality = 0.05 + 0.9 * index / 199
        entropy = saturation.sf_kj_kg_k + quality * (saturation.sg_kj_kg_k - saturation.sf_kj_kg_k)
        ours = steam_tables.properties_at_pressure_entropy(pressure_kpa, entropy)
        theirs = IAPWS97(P=pressure_kpa / 1000, s=entropy)
        assert ours.quality is not None
        pairs = [
            (ours.temperature_c + 273.15, theirs.T),
            (ours.enthalpy_kj_kg, theirs.h),
            (ours.specific_volume_m3_kg, theirs.v),
            (ours.quality, theirs.x),
        ]
        worst = max(worst, *(_relative(a, b) for a, b in pairs))
    assert worst < 1e-8


def test_single_phase_states_equal_iapws97_over_regions_1_and_2() -> None:
    worst = 0.0
    for index in range(40):
        pressure_kpa = _WET_PRESSURES_KPA[index * 5]
        for temperature_c in (1.0, 60.0, 150.0, 260.0, 340.0, 480.0, 790.0):
            if (
                abs(temperature_c - steam_tables.saturation_at_pressure(pressure_kpa).temperature_c)
                < 0.5
            ):
                continue
            ours = steam_tables.properties_at_pressure_temperature(pressure_kpa, temperature_c)
            theirs = IAPWS97(P=pressure_kpa / 1000, T=temperature_c + 273.15)
            pairs = [
                (ours.enthalpy_kj_kg, theirs.h),
                (ours.entropy_kj_kg_k, theirs.s),
                (ours.specific_volume_m3_kg, theirs.v),
            ]
            worst = max(worst, *(_relative(a, b) for a, b in pairs if b != 0.0))
    assert worst < 1e-8


def test_steam_by_enthalpy_or_entropy_equals_iapws97_without_calling_it(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # Reference states from IAPWS97 at (p, T) over region 2 and the two-phase dome; the
    # adapter must reach each from (p, h) and (p, s) alone, never asking IAPWS97.
    references = []
    for index in range(0, 200, 8):
        pressure_kpa = _WET_PRESSURES_KPA[index]
        saturation_c = steam_tables.saturation_at_pressure(pressure_kpa).temperature_c
        for temperature_c in (saturation_c + 0.5, saturation_c + 40.0, 600.0, 790.0):
            if temperature_c <= 800.0:
                references.append(
                    (pressure_kpa, IAPWS97(P=pressure_kpa / 1000, T=temperature_c + 273.15))
                )
        for quality in (0.1, 0.9):
            references.append((pressure_kpa, IAPWS97(P=pressure_kpa / 1000, x=quality)))

    def refused(**inputs: float) -> None:
        raise AssertionError(f"IAPWS97 asked for {inputs}")

    monkeypatch.setattr(steam_tables, "_evaluate", refused)
    steam_tables.properties_at_pressure_enthalpy.cache_clear()
    steam_tables.properties_at_pressure_entropy.cache_clear()
    worst = 0.0
    for pressure_kpa, theirs in references:
        for ours in (
            steam_tables.properties_at_pressure_enthalpy(pressure_kpa, theirs.h),
            steam_tables.properties_at_pressure_entropy(pressure_kpa, theirs.s),
        ):
            pairs = [
                (ours.temperature_c + 273.15, theirs.T),
                (ours.enthalpy_kj_kg, theirs.h),
                (ours.entropy_kj_kg_k, theirs.s),
                (ours.specific_volume_m3_kg, theirs.v),
            ]
            worst = max(worst, *(_relative(a, b) for a, b in pairs))
    assert len(references) == 25 * 6
    assert worst < 1e-8


def test_above_region_3_saturation_still_comes_from_iapws97() -> None:
    # IAPWS R7-97(2012), Table 36 gives no point here; the adapter's answer is IAPWS97's.
    ours = steam_tables.saturation_at_pressure(20_000.0)
    assert ours.hf_kj_kg == IAPWS97(P=20.0, x=0.0).h
    assert ours.hg_kj_kg == IAPWS97(P=20.0, x=1.0).h


def test_lookups_from_many_threads_agree_with_one_thread() -> None:
    # The server answers requests on a pool of threads; each keeps its own CoolProp state.
    # A switch between threads every microsecond makes a shared state's race show.
    import sys
    from concurrent.futures import ThreadPoolExecutor

    uncached = steam_tables.saturation_at_pressure.__wrapped__
    pressures = [_WET_PRESSURES_KPA[index] for index in range(0, 200, 2)]
    alone = [uncached(pressure) for pressure in pressures]
    interval = sys.getswitchinterval()
    sys.setswitchinterval(1e-6)
    try:
        with ThreadPoolExecutor(max_workers=8) as pool:
            together = list(pool.map(lambda _: [uncached(p) for p in pressures], range(16)))
    finally:
        sys.setswitchinterval(interval)
    assert all(answers == alone for answers in together)
