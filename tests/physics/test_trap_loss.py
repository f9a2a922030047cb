"""One trap's yearly losses, by condition and by where its condensate goes."""

import pytest

from service.physics.annual import Economics
from service.physics.conditions import (
    DEFAULT_LOSS_FACTORS,
    TrapCondition,
    discharges_condensate,
    is_failed,
    is_flooding_risk,
    wastes_live_steam,
)
from service.physics.flash import flash_of_condensate
from service.physics.orifice import FlowMethod, FlowRegime, napier_steam_flow_kg_h
from service.physics.spread import Spread
from service.physics.trap_loss import (
    CondensateDestination,
    TrapService,
    loss_factor_for,
    trap_loss,
)

PRICES = Economics(steam_cost_per_tonne=30.0)
INLET, RETURN = 1101.325, 101.325


def _trap(**overrides: object) -> TrapService:
    fields: dict[str, object] = {
        "inlet_pressure_kpa_abs": INLET,
        "return_pressure_kpa_abs": RETURN,
        "orifice_diameter_mm": 4.0,
        "condition": TrapCondition.BLOW_THROUGH,
        "hours_per_year": 8000.0,
    }
    fields.update(overrides)
    return TrapService(**fields)  # type: ignore[arg-type]


def test_blow_through_loses_the_orifice_capacity_with_its_range() -> None:
    loss = trap_loss(_trap(), PRICES)
    napier = napier_steam_flow_kg_h(4.0, INLET, 1.0)
    assert loss.method is FlowMethod.NAPIER
    assert loss.flow_regime is FlowRegime.CHOKED
    assert loss.steam_loss_kg_h == Spread(0.7 * napier * 1.0, 0.6 * napier * 0.7, 0.8 * napier)
    assert loss.live_steam.mass_t == pytest.approx(loss.steam_loss_kg_h.typical * 8.0)
    assert loss.live_steam_low.cost < loss.live_steam.cost < loss.live_steam_high.cost  # type: ignore[operator]
    assert loss.risk is None


@pytest.mark.parametrize("condition", list(TrapCondition))
def test_each_condition_loses_its_share_of_the_orifice(condition: TrapCondition) -> None:
    loss = trap_loss(_trap(condition=condition), PRICES)
    expected = loss.orifice_capacity_kg_h * DEFAULT_LOSS_FACTORS[condition].typical
    assert loss.steam_loss_kg_h.typical == pytest.approx(expected)
    assert (loss.steam_loss_kg_h.typical > 0.0) == wastes_live_steam(condition)


@pytest.mark.parametrize("condition", [TrapCondition.PLUGGED, TrapCondition.FLOODED])
def test_plugged_and_flooded_lose_no_steam_but_are_risks(condition: TrapCondition) -> None:
    loss = trap_loss(_trap(condition=condition), PRICES)
    assert loss.live_steam.mass_t == 0.0
    assert loss.risk is not None
    assert "water hammer" in loss.risk
    assert is_flooding_risk(condition)
    assert is_failed(condition)


def test_working_trap_to_a_closed_return_loses_nothing() -> None:
    loss = trap_loss(_trap(condition=TrapCondition.WORKING, condensate_load_kg_h=100.0), PRICES)
    assert loss.total.mass_t == 0.0
    assert loss.total.cost == 0.0
    assert loss.condensate.flash_fraction > 0.0


def test_working_trap_to_a_vented_receiver_loses_its_flash() -> None:
    loss = trap_loss(
        _trap(
            condition=TrapCondition.WORKING,
            condensate_load_kg_h=100.0,
            destination=CondensateDestination.VENTED_RECEIVER,
        ),
        PRICES,
    )
    flash = flash_of_condensate(INLET, RETURN)
    assert loss.condensate.flash_vented_kg_h == pytest.approx(100.0 * flash.flash_fraction)
    assert loss.condensate.condensate_to_drain_kg_h == 0.0
    assert loss.condensate.flash_vented.mass_t == pytest.approx(
        loss.condensate.flash_vented_kg_h * 8.0
    )
    assert loss.total.cost == loss.condensate.flash_vented.cost


def test_working_trap_to_drain_loses_all_its_water_and_heat() -> None:
    loss = trap_loss(
        _trap(
            condition=TrapCondition.WORKING,
            condensate_load_kg_h=100.0,
            destination=CondensateDestination.DRAIN,
        ),
        PRICES,
    )
    assert loss.condensate.condensate_to_drain_kg_h == 100.0
    assert loss.condensate.condensate_to_drain.mass_t == pytest.approx(800.0)
    assert loss.condensate.flash_vented.mass_t == 0.0
    # Hot water carries less heat than steam: a tonne drained costs less than a tonne blown.
    assert loss.condensate.condensate_to_drain.cost < 800.0 * 30.0  # type: ignore[operator]


def test_a_plugged_trap_passes_no_condensate() -> None:
    loss = trap_loss(
        _trap(
            condition=TrapCondition.PLUGGED,
            condensate_load_kg_h=100.0,
            destination=CondensateDestination.DRAIN,
        ),
        PRICES,
    )
    assert not discharges_condensate(TrapCondition.PLUGGED)
    assert loss.total.mass_t == 0.0


def test_totals_add_live_steam_and_condensate_and_keep_the_range() -> None:
    loss = trap_loss(
        _trap(condensate_load_kg_h=50.0, destination=CondensateDestination.VENTED_RECEIVER),
        PRICES,
    )
    assert loss.total.cost == pytest.approx(
        loss.live_steam.cost + loss.condensate.flash_vented.cost  # type: ignore[operator]
    )
    assert loss.total_low.cost < loss.total.cost < loss.total_high.cost  # type: ignore[operator]


def test_a_technicians_loss_factor_widens_the_range() -> None:
    assert loss_factor_for(TrapCondition.LEAKING, 0.6) == Spread(0.6, 0.1, 0.6)
    loss = trap_loss(
        _trap(condition=TrapCondition.LEAKING, loss_factor=Spread(0.6, 0.1, 0.6)), PRICES
    )
    assert loss.steam_loss_kg_h.typical == pytest.approx(0.6 * loss.orifice_capacity_kg_h)


@pytest.mark.parametrize(
    ("condition", "factor", "message"),
    [
        (TrapCondition.WORKING, 0.2, "applies only"),
        (TrapCondition.LEAKING, 1.5, "from 0 to 1"),
        (TrapCondition.LEAKING, -0.1, "from 0 to 1"),
    ],
)
def test_a_loss_factor_that_does_not_fit_is_refused(
    condition: TrapCondition, factor: float, message: str
) -> None:
    with pytest.raises(ValueError, match=message):
        loss_factor_for(condition, factor)


def test_a_discharging_trap_needs_a_lower_return_pressure() -> None:
    with pytest.raises(ValueError, match="below the inlet"):
        trap_loss(_trap(return_pressure_kpa_abs=INLET), PRICES)


def test_a_plugged_trap_against_a_high_return_is_still_reported() -> None:
    loss = trap_loss(
        _trap(condition=TrapCondition.PLUGGED, return_pressure_kpa_abs=INLET + 100.0), PRICES
    )
    assert loss.flow_regime is None
    assert loss.method is None
    assert loss.total.mass_t == 0.0


def test_a_spread_must_hold_its_typical_value() -> None:
    with pytest.raises(ValueError, match="must contain"):
        Spread(0.9, 0.6, 0.8)


def test_a_repair_removes_the_failure_loss_and_leaves_the_installation_loss() -> None:
    # The accounting: live steam is the failure loss, flash vented the installation loss.
    failed = trap_loss(
        _trap(condensate_load_kg_h=100.0, destination=CondensateDestination.VENTED_RECEIVER),
        PRICES,
    )
    repaired = trap_loss(
        _trap(
            condition=TrapCondition.WORKING,
            condensate_load_kg_h=100.0,
            destination=CondensateDestination.VENTED_RECEIVER,
        ),
        PRICES,
    )
    assert failed.failure.cost > 0.0  # type: ignore[operator]
    assert repaired.failure.cost == 0.0
    assert repaired.installation == failed.installation
    assert failed.total.cost == pytest.approx(failed.failure.cost + failed.installation.cost)  # type: ignore[operator]


def test_live_steam_into_a_closed_return_is_priced_on_the_heat_not_recovered() -> None:
    # IAPWS R7-97(2012) properties: the return brings back hf at its own pressure, so the
    # heat lost is hg(p1) - hf(p_return); no water or treatment is charged.
    from service.physics import steam_tables
    from service.physics.annual import ClosedReturnPricing

    fuel = Economics(fuel_price_per_gj=10.0, water_and_treatment_cost_per_tonne=3.0)
    closed = trap_loss(_trap(return_pressure_kpa_abs=301.325), fuel)
    vented_pricing = Economics(
        fuel_price_per_gj=10.0,
        water_and_treatment_cost_per_tonne=3.0,
        closed_return_pricing=ClosedReturnPricing.AS_STEAM_LOST,
    )
    as_lost = trap_loss(_trap(return_pressure_kpa_abs=301.325), vented_pricing)
    inlet = steam_tables.saturation_at_pressure(INLET)
    returned = steam_tables.saturation_at_pressure(301.325)
    mass_t = closed.live_steam.mass_t
    assert closed.live_steam.energy_gj == pytest.approx(
        mass_t * (inlet.hg_kj_kg - returned.hf_kj_kg) / 1000.0
    )
    assert closed.live_steam.cost == pytest.approx(closed.live_steam.fuel_gj * 10.0)
    assert as_lost.live_steam.cost == pytest.approx(
        as_lost.live_steam.fuel_gj * 10.0 + mass_t * 3.0
    )
    assert closed.live_steam.cost < as_lost.live_steam.cost  # type: ignore[operator]


def test_condensate_below_saturation_flashes_less() -> None:
    # The mixing rule from h(p1, T1) in IF97 region 1 (IAPWS R7-97(2012)); a thermostatic
    # trap holding condensate 20 K below saturation vents less flash.
    vented = {
        "condition": TrapCondition.WORKING,
        "condensate_load_kg_h": 100.0,
        "destination": CondensateDestination.VENTED_RECEIVER,
    }
    saturated = trap_loss(_trap(**vented), PRICES)
    subcooled = trap_loss(_trap(condensate_temperature_c=164.0, **vented), PRICES)
    expected = flash_of_condensate(INLET, RETURN, 164.0).flash_fraction
    assert subcooled.condensate.flash_fraction == pytest.approx(expected)
    assert subcooled.condensate.flash_vented_kg_h < saturated.condensate.flash_vented_kg_h


def test_a_superheated_line_loses_less_mass_but_more_heat_per_kilogram() -> None:
    # IF97 region 2 for h(p1, T1); the nozzle correction for the mass (checked against
    # CoolProp in test_orifice.py).
    saturated = trap_loss(_trap(), PRICES)
    superheated = trap_loss(_trap(steam_temperature_c=250.0), PRICES)
    assert superheated.steam_loss_kg_h.typical < saturated.steam_loss_kg_h.typical
    assert superheated.method is FlowMethod.NAPIER_NOZZLE_CORRECTED
    heat = superheated.live_steam.energy_gj / superheated.live_steam.mass_t
    assert heat > saturated.live_steam.energy_gj / saturated.live_steam.mass_t


def test_a_sewer_charge_adds_to_condensate_run_to_drain_only() -> None:
    sewer = Economics(fuel_price_per_gj=10.0, sewer_cost_per_tonne=1.5)
    plain = Economics(fuel_price_per_gj=10.0)
    drained = {
        "condition": TrapCondition.WORKING,
        "condensate_load_kg_h": 50.0,
        "destination": CondensateDestination.DRAIN,
    }
    with_charge = trap_loss(_trap(**drained), sewer).condensate.condensate_to_drain
    without = trap_loss(_trap(**drained), plain).condensate.condensate_to_drain
    # The flash leaves by the drain's vent: the sewer takes the liquid, (1 - x) of it.
    liquid_t = without.mass_t * (1.0 - flash_of_condensate(INLET, RETURN).flash_fraction)
    assert with_charge.cost == pytest.approx(without.cost + 1.5 * liquid_t)  # type: ignore[operator]
    assert with_charge.co2_t == without.co2_t


@pytest.mark.parametrize(
    ("destination", "return_kpa_g"),
    [(CondensateDestination.VENTED_RECEIVER, 60.0)],
)
def test_a_vented_receiver_above_atmosphere_is_refused(
    destination: CondensateDestination, return_kpa_g: float
) -> None:
    from service.physics.trap_loss import require_destination_fits_return

    with pytest.raises(ValueError, match="open to atmosphere"):
        require_destination_fits_return(destination, return_kpa_g)
    require_destination_fits_return(destination, 2.0)
    require_destination_fits_return(CondensateDestination.CLOSED_RETURN, return_kpa_g)


def test_a_hot_drain_is_cooled_with_make_up_water_before_the_sewer() -> None:
    # Energy balance by hand (IAPWS R7-97(2012) enthalpies): 50 kg/h of condensate from
    # 1000 kPa(g) flashes at the drain (x = 16.06 %); the rest, at hf(101.325 kPa) =
    # 419.1 kJ/kg, is mixed with 15 degC make-up water (63.0 kJ/kg) down to 60 degC
    # (251.2 kJ/kg): (419.1 - 251.2) / (251.2 - 63.0) = 0.892 kg of cooling water per kg.
    from service.physics import steam_tables
    from service.physics.pressure import STANDARD_ATMOSPHERE_KPA

    drained = {
        "condition": TrapCondition.WORKING,
        "condensate_load_kg_h": 50.0,
        "destination": CondensateDestination.DRAIN,
    }
    plain = trap_loss(
        _trap(**drained), Economics(fuel_price_per_gj=10.0, water_and_treatment_cost_per_tonne=2.0)
    ).condensate.condensate_to_drain
    cooled = trap_loss(
        _trap(**drained),
        Economics(
            fuel_price_per_gj=10.0,
            water_and_treatment_cost_per_tonne=2.0,
            drain_temperature_limit_c=60.0,
        ),
    ).condensate.condensate_to_drain
    flash = flash_of_condensate(INLET, RETURN).flash_fraction
    hot = steam_tables.saturation_at_pressure(RETURN).hf_kj_kg
    limit = steam_tables.properties_at_pressure_temperature(STANDARD_ATMOSPHERE_KPA, 60.0)
    makeup = Economics().makeup_water_enthalpy_kj_kg
    per_kg = (hot - limit.enthalpy_kj_kg) / (limit.enthalpy_kj_kg - makeup)
    assert per_kg == pytest.approx(0.892, abs=0.002)
    cooling_t = plain.mass_t * (1.0 - flash) * per_kg
    assert cooled.cost == pytest.approx(plain.cost + cooling_t * 2.0)  # type: ignore[operator]
    assert cooled.energy_gj == plain.energy_gj
