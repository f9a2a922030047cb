"""The roll-ups as the API, the pages and the exports all present them (SI units).

One shape, built once from a summary, serves every rendering, so a page and the
API can never disagree about a number.
"""

import datetime as dt
import math
from typing import Any

from pydantic import BaseModel, ConfigDict, Field

from service.physics.annual import YearlyLoss
from service.physics.conditions import FindingCategory, TrapCondition
from service.physics.spread import Spread
from service.physics.trap_loss import CondensateDestination
from service.reliability.estimates import Rate
from service.reports.compare import Change, SurveyComparison, TrapChange
from service.reports.reliability import GroupReliability, NextRound, SiteReliability
from service.reports.summary import PricedTrap, SiteSummary, Tally
from service.reports.trends import RoundTrend
from service.store.models import Survey
from service.store.vocabulary import (
    Application,
    RecommendedAction,
    RepairKind,
    SurveyStatus,
    TrapType,
    label,
)


class TallyOut(BaseModel):
    """Yearly figures of a group of traps, in the two kinds a manager signs apart.

    `annual_*` without a kind are failure losses (live steam of failed traps: what
    repairs remove), unsuffixed typical, `_low` and `_high` their range. `annual_flash_*`,
    `annual_drain_*` and `annual_installation_*` are installation losses (flash vented,
    condensate drained: what projects remove). Never add the two without showing both.
    """

    traps: int
    failed: int = Field(description="Needing repair: failures and risks")
    failures: int = Field(description="Wasting live steam: leaking, blowing through, cycling")
    risks: int = Field(description="Plugged or flooded")
    unknown: int = Field(description="Not accessible")
    annual_steam_loss_t: float
    annual_steam_loss_t_low: float
    annual_steam_loss_t_high: float
    annual_energy_loss_gj: float
    annual_energy_loss_gj_low: float
    annual_energy_loss_gj_high: float
    annual_fuel_gj: float
    annual_cost: float | None
    annual_cost_low: float | None
    annual_cost_high: float | None
    annual_co2_t: float
    annual_co2_t_low: float
    annual_co2_t_high: float
    annual_flash_vented_t: float
    annual_flash_cost: float | None
    annual_condensate_to_drain_t: float
    annual_drain_cost: float | None
    annual_installation_energy_gj: float
    annual_installation_cost: float | None
    annual_installation_co2_t: float

    @classmethod
    def of(cls, tally: Tally) -> "TallyOut":
        installation = tally.installation
        return cls(
            traps=tally.traps,
            failed=tally.failed,
            failures=tally.failures,
            risks=tally.risks,
            unknown=tally.unknown,
            **ranged_fields(tally.failure, tally.failure_low, tally.failure_high),
            annual_fuel_gj=tally.failure.fuel_gj,
            annual_flash_vented_t=tally.flash_vented.mass_t,
            annual_flash_cost=tally.flash_vented.cost,
            annual_condensate_to_drain_t=tally.condensate_to_drain.mass_t,
            annual_drain_cost=tally.condensate_to_drain.cost,
            annual_installation_energy_gj=installation.energy_gj,
            annual_installation_cost=installation.cost,
            annual_installation_co2_t=installation.co2_t,
        )


RANGED_FIGURES = {
    "annual_steam_loss_t": "mass_t",
    "annual_energy_loss_gj": "energy_gj",
    "annual_cost": "cost",
    "annual_co2_t": "co2_t",
}


def spread_fields(name: str, spread: Spread) -> dict[str, float]:
    """A figure and its range as `name`, `name_low` and `name_high` fields.

    >>> spread_fields("loss_factor", Spread(0.25, 0.1, 0.4))
    {'loss_factor': 0.25, 'loss_factor_low': 0.1, 'loss_factor_high': 0.4}
    """
    return {name: spread.typical, f"{name}_low": spread.low, f"{name}_high": spread.high}


def ranged_fields(
    typical: YearlyLoss,
    low: YearlyLoss,
    high: YearlyLoss,
    figures: dict[str, str] = RANGED_FIGURES,
) -> dict[str, Any]:
    """A yearly loss and its range as `name`, `name_low` and `name_high` fields, for each
    output name -> figure of `YearlyLoss` in `figures`."""
    fields: dict[str, Any] = {}
    for name, figure in figures.items():
        fields[name] = getattr(typical, figure)
        fields[f"{name}_low"] = getattr(low, figure)
        fields[f"{name}_high"] = getattr(high, figure)
    return fields


class GroupOut(TallyOut):
    key: str
    label: str


def _groups(tallies: dict[str, Tally], named: bool = False) -> list[GroupOut]:
    """Groups of a breakdown; `named` ones (areas) keep their own names as labels, the
    rest are the program's words, labelled for reading."""
    return [
        GroupOut(key=key, label=key if named else label(key), **TallyOut.of(tally).model_dump())
        for key, tally in tallies.items()
    ]


class PricedTrapOut(BaseModel):
    """One tested trap as found, and what it costs a year."""

    trap_id: int
    tag: str
    location: str
    area_id: int | None
    area_name: str
    application: Application
    trap_type: TrapType
    finding_id: int
    tested_at: dt.datetime
    condition: TrapCondition
    category: FindingCategory
    recommended_action: RecommendedAction
    inlet_pressure_kpa_abs: float
    return_pressure_kpa_abs: float
    orifice_diameter_mm: float
    hours_per_year: float
    condensate_load_kg_h: float
    condensate_destination: CondensateDestination
    discharge_coefficient: float
    discharge_coefficient_low: float
    discharge_coefficient_high: float
    loss_factor: float
    loss_factor_low: float
    loss_factor_high: float
    steam_loss_kg_h: float
    steam_loss_kg_h_low: float
    steam_loss_kg_h_high: float
    steam_temperature_c: float | None = Field(description="A superheated line's; else null")
    condensate_temperature_c: float | None = Field(
        description="Condensate leaving the trap below saturation; null: saturated"
    )
    annual_steam_loss_t: float = Field(description="Failure loss: what a repair removes")
    annual_steam_loss_t_low: float
    annual_steam_loss_t_high: float
    annual_energy_loss_gj: float
    annual_energy_loss_gj_low: float
    annual_energy_loss_gj_high: float
    annual_cost: float | None
    annual_cost_low: float | None
    annual_cost_high: float | None
    annual_co2_t: float
    annual_co2_t_low: float
    annual_co2_t_high: float
    annual_installation_cost: float | None = Field(
        description="Flash vented and condensate drained: not removed by a repair"
    )
    annual_installation_co2_t: float
    repair_kind: RepairKind
    repair_cost: float | None
    payback_years: float | None = Field(
        description="Repair cost over the typical yearly failure loss"
    )
    payback_years_low: float | None = Field(description="Over the high yearly failure loss")
    payback_years_high: float | None = Field(description="Over the low yearly failure loss")
    repaired_on: dt.date | None = Field(
        description="A repair since this finding, awaiting the test that confirms it"
    )
    risk: str | None

    @classmethod
    def of(cls, priced: PricedTrap) -> "PricedTrapOut":
        loss, service = priced.loss, priced.service
        return cls(
            trap_id=priced.trap_id,
            tag=priced.tag,
            location=priced.location,
            area_id=priced.area_id,
            area_name=priced.area_name,
            application=priced.application,
            trap_type=priced.trap_type,
            finding_id=priced.finding_id,
            tested_at=priced.tested_at,
            condition=priced.condition,
            category=priced.category,
            recommended_action=priced.recommended_action,
            inlet_pressure_kpa_abs=service.inlet_pressure_kpa_abs,
            return_pressure_kpa_abs=service.return_pressure_kpa_abs,
            orifice_diameter_mm=service.orifice_diameter_mm,
            hours_per_year=service.hours_per_year,
            condensate_load_kg_h=service.condensate_load_kg_h,
            condensate_destination=service.destination,
            **spread_fields("discharge_coefficient", service.discharge_coefficient),
            **spread_fields("loss_factor", loss.loss_factor),
            **spread_fields("steam_loss_kg_h", loss.steam_loss_kg_h),
            steam_temperature_c=service.steam_temperature_c,
            condensate_temperature_c=service.condensate_temperature_c,
            **ranged_fields(loss.live_steam, loss.live_steam_low, loss.live_steam_high),
            annual_installation_cost=loss.installation.cost,
            annual_installation_co2_t=loss.installation.co2_t,
            repair_kind=priced.repair_kind,
            repair_cost=priced.repair_cost,
            payback_years=priced.payback,
            payback_years_low=priced.payback_years(loss.live_steam_high.cost),
            payback_years_high=priced.payback_years(loss.live_steam_low.cost),
            repaired_on=priced.repaired_on,
            risk=loss.risk,
        )


class FlashRecoveryWhatIfOut(BaseModel):
    """A flash vessel for the survey's traps that vent their flash, in one area or all."""

    model_config = ConfigDict(from_attributes=True)

    vessel_pressure_kpa_g: float
    area_name: str | None = Field(description="Null: every area")
    traps: int = Field(description="Venting flash, in the group, above the vessel's pressure")
    traps_below_vessel: int = Field(description="Venting flash, but not above its pressure")
    condensate_load_kg_h: float
    recovered_steam_kg_h: float
    annual_recovered_steam_t: float
    annual_energy_gj: float = Field(description="Heat of the live steam it displaces")
    annual_fuel_gj: float
    annual_value: float | None
    annual_co2_t: float
    caution: str


class SurveyRef(BaseModel):
    id: int
    name: str
    started_on: dt.date
    ended_on: dt.date | None
    status: SurveyStatus = Field(description="In progress: its figures are so far")

    @classmethod
    def of(cls, survey: Survey) -> "SurveyRef":
        return cls(
            id=survey.id,
            name=survey.name,
            started_on=survey.started_on,
            ended_on=survey.ended_on,
            status=survey.status,
        )


class SummaryOut(BaseModel):
    """A site's survey priced and rolled up in the accounting a manager signs.

    The headline `annual_*` figures are failure losses (what repairs remove), with
    their range. `totals` holds them beside the installation losses (flash vented and
    condensate drained: what projects remove), by destination in `by_destination`.
    Risks (plugged, flooded) and unknowns (not accessible, untested) are counted and
    listed, not priced.
    """

    site_id: int
    site_name: str
    currency: str
    survey: SurveyRef | None
    traps_in_service: int
    traps_recorded: int = Field(
        description="Traps in service with a finding in this survey: 'so far, N of M tested'"
    )
    traps_tested: int = Field(description="Tested in operation (not 'not accessible' or out)")
    traps_untested: int
    traps_not_accessible: int
    traps_out_of_service: int
    failed_count: int = Field(description="Needing repair: failures and risks")
    failure_count: int = Field(description="Wasting live steam")
    failure_rate: float | None
    annual_steam_loss_t: float
    annual_steam_loss_t_low: float
    annual_steam_loss_t_high: float
    annual_energy_loss_gj: float
    annual_energy_loss_gj_low: float
    annual_energy_loss_gj_high: float
    annual_cost: float | None
    annual_cost_low: float | None
    annual_cost_high: float | None
    annual_co2_t: float
    annual_co2_t_low: float
    annual_co2_t_high: float
    totals: TallyOut = Field(description="Failure and installation losses of every trap tested")
    by_condition: list[GroupOut]
    by_area: list[GroupOut]
    by_application: list[GroupOut]
    by_destination: list[GroupOut]
    risk_count: int
    unknown_count: int = Field(description="Not accessible, and not tested in this survey")
    risks: list[PricedTrapOut]
    repair_list: list[PricedTrapOut] = Field(
        description="By payback on failure losses, quickest first; the CSV's rank"
    )

    @classmethod
    def of(cls, summary: SiteSummary) -> "SummaryOut":
        totals = TallyOut.of(summary.totals)
        survey = summary.survey
        return cls(
            site_id=summary.site.id,
            site_name=summary.site.name,
            currency=summary.site.currency,
            survey=None if survey is None else SurveyRef.of(survey),
            traps_in_service=summary.traps_in_service,
            traps_recorded=summary.traps_in_service - summary.traps_untested,
            traps_tested=summary.traps_tested,
            traps_untested=summary.traps_untested,
            traps_not_accessible=summary.traps_not_accessible,
            traps_out_of_service=summary.traps_out_of_service,
            failed_count=summary.failed_count,
            failure_count=summary.totals.failures,
            failure_rate=summary.failure_rate,
            **ranged_fields(
                summary.totals.failure, summary.totals.failure_low, summary.totals.failure_high
            ),
            totals=totals,
            by_condition=_groups({str(key): tally for key, tally in summary.by_condition.items()}),
            by_area=_groups(summary.by_area, named=True),
            by_application=_groups(
                {str(key): tally for key, tally in summary.by_application.items()}
            ),
            by_destination=_groups(
                {str(key): tally for key, tally in summary.by_destination.items()}
            ),
            risk_count=len(summary.risks),
            unknown_count=summary.traps_not_accessible + summary.traps_untested,
            risks=[PricedTrapOut.of(priced) for priced in summary.risks],
            repair_list=[PricedTrapOut.of(priced) for priced in summary.repair_list],
        )


class TrapChangeOut(BaseModel):
    trap_id: int
    tag: str
    area_name: str
    condition_before: TrapCondition | None
    condition_after: TrapCondition | None
    repaired_on: dt.date | None
    annual_cost_before: float = Field(description="Failure loss")
    annual_cost_after: float

    @classmethod
    def of(cls, change: TrapChange) -> "TrapChangeOut":
        # Built from the program's own typed record: nothing to validate, thousands a page.
        return cls.model_construct(
            trap_id=change.trap_id,
            tag=change.tag,
            area_name=change.area_name,
            condition_before=change.condition_before,
            condition_after=change.condition_after,
            repaired_on=change.repaired_on,
            annual_cost_before=change.yearly_cost_before,
            annual_cost_after=change.yearly_cost_after,
        )


class ComparisonOut(BaseModel):
    """From one survey to a later one, over the traps tested in operation in both.

    Costs are failure losses; a negative change is money saved. The change's range
    holds the site's assumptions fixed on both sides (low with low, high with high).
    """

    from_survey: SurveyRef
    to_survey: SurveyRef
    failed_before: int
    failed_after: int
    traps_compared: int = Field(description="Tested in operation in both rounds")
    traps_left_out: int = Field(description="Tested in operation in one round only")
    traps_only_before: int
    traps_only_after: int
    annual_cost_before: float = Field(description="Failure loss, over the traps compared")
    annual_cost_after: float
    annual_cost_change: float
    annual_cost_change_low: float
    annual_cost_change_high: float
    annual_installation_cost_before: float = Field(description="Over the traps compared")
    annual_installation_cost_after: float
    newly_failed: list[TrapChangeOut]
    repaired_and_confirmed: list[TrapChangeOut]
    recovered_without_repair: list[TrapChangeOut]
    still_failed: list[TrapChangeOut]
    not_retested: list[TrapChangeOut]
    new_risk: list[TrapChangeOut]
    risk_removed: list[TrapChangeOut]
    still_a_risk: list[TrapChangeOut]
    change_counts: dict[Change, int] = Field(description="Traps in each list, in all")

    @classmethod
    def of(cls, comparison: SurveyComparison, at_most: int | None = None) -> "ComparisonOut":
        """The comparison; with `at_most`, each list cut to its first items (a page shows
        a few tags and the counts)."""

        def listed(change: Change) -> list[TrapChangeOut]:
            items = comparison.changes.get(change, [])[:at_most]
            return [TrapChangeOut.of(item) for item in items]

        before, after = comparison.before, comparison.after
        assert before.survey is not None
        assert after.survey is not None
        change_low, change_high = comparison.cost_change_range
        return cls(
            from_survey=SurveyRef.of(before.survey),
            to_survey=SurveyRef.of(after.survey),
            failed_before=before.failed_count,
            failed_after=after.failed_count,
            traps_compared=comparison.traps_compared,
            traps_left_out=comparison.traps_left_out,
            traps_only_before=comparison.traps_only_before,
            traps_only_after=comparison.traps_only_after,
            annual_cost_before=comparison.failure_cost_before.typical,
            annual_cost_after=comparison.failure_cost_after.typical,
            annual_cost_change=comparison.cost_change,
            annual_cost_change_low=change_low,
            annual_cost_change_high=change_high,
            annual_installation_cost_before=comparison.installation_cost_before,
            annual_installation_cost_after=comparison.installation_cost_after,
            **{change.value: listed(change) for change in Change},
            change_counts={change: len(comparison.changes.get(change, [])) for change in Change},
        )


class CurvePointOut(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    years: float
    surviving: float = Field(description="Share of traps still working")
    low: float | None = Field(description="95 % band, where the fit gives one")
    high: float | None


class CostPointOut(BaseModel):
    interval_years: float
    yearly_cost: float = Field(description="A trap's testing cost plus undetected losses")


def rate_fields(rate: Rate) -> dict[str, float | None]:
    """A failure rate and its interval as fields; an infinite bound (no working time seen
    yet) is null, as JSON has no infinity.

    >>> rate_fields(Rate(0.0, 0.0, math.inf))["failures_per_year_high"] is None
    True
    """
    return {
        "failures_per_year": rate.per_year,
        "failures_per_year_low": rate.low,
        "failures_per_year_high": rate.high if math.isfinite(rate.high) else None,
    }


class ReliabilityGroupOut(BaseModel):
    """One group of traps: its lives, failure rate with 95 % interval, Weibull fit,
    survival curves and test-interval advice."""

    breakdown: str = Field(description="trap_type, application or pressure_class")
    key: str
    label: str
    lives: int
    failures: int
    exposure_years: float
    failures_per_year: float = Field(description="Constant-rate (exponential) fit")
    failures_per_year_low: float
    failures_per_year_high: float | None = Field(
        description="Null where no working time has been seen yet: no bound"
    )
    weibull_shape: float | None = Field(description="Above 1: failures grow with age")
    weibull_scale_years: float | None
    mean_failure_loss: float | None = Field(
        description="A failed trap's yearly failure loss in the latest round, in this group "
        "(the site's mean where it had none)"
    )
    best_test_interval_years: float | None = Field(
        description="sqrt(2 C / (rate x loss)): the interval of least yearly cost"
    )
    doe_interval: str | None = Field(description="US DOE's interval for the pressure class")
    turnbull: list[CurvePointOut]
    weibull_curve: list[CurvePointOut]
    cost_curve: list[CostPointOut]

    @classmethod
    def of(cls, group: GroupReliability) -> "ReliabilityGroupOut":
        found = group.estimate
        return cls(
            breakdown=group.breakdown,
            key=group.key,
            label=group.label,
            lives=found.lives,
            failures=found.failures,
            exposure_years=found.exposure_years,
            **rate_fields(found.rate),
            weibull_shape=found.weibull_shape,
            weibull_scale_years=found.weibull_scale_years,
            mean_failure_loss=group.mean_failure_loss,
            best_test_interval_years=group.best_interval_years,
            doe_interval=group.doe_interval,
            turnbull=[CurvePointOut.model_validate(point) for point in found.turnbull],
            weibull_curve=[CurvePointOut.model_validate(point) for point in found.weibull_curve],
            cost_curve=[
                CostPointOut(interval_years=years, yearly_cost=cost)
                for years, cost in group.cost_curve
            ],
        )


class AreaExpectationOut(BaseModel):
    area: str
    expected_failed: float
    expected_failure_loss: float
    expected_failure_loss_low: float
    expected_failure_loss_high: float


class ExpectedTrapOut(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    trap_id: int
    tag: str
    area_name: str
    chance: float = Field(description="Of being found failed on the day")
    expected_loss: float


class NextRoundOut(BaseModel):
    """What a round on `on` can expect: failed traps and their yearly failure loss by
    area (with the range of the failure rate), and a route by expected loss."""

    on: dt.date
    expected_failed: float
    expected_failure_loss: float
    expected_failure_loss_low: float
    expected_failure_loss_high: float
    by_area: list[AreaExpectationOut]
    route: list[ExpectedTrapOut] = Field(description="Largest expected loss first")

    @classmethod
    def of(cls, next_round: NextRound, route_length: int) -> "NextRoundOut":
        areas = [
            AreaExpectationOut(
                area=name,
                expected_failed=failed,
                expected_failure_loss=loss,
                expected_failure_loss_low=low,
                expected_failure_loss_high=high,
            )
            for name, (failed, loss, low, high) in next_round.by_area().items()
        ]
        return cls(
            on=next_round.on,
            expected_failed=sum(area.expected_failed for area in areas),
            expected_failure_loss=sum(area.expected_failure_loss for area in areas),
            expected_failure_loss_low=sum(area.expected_failure_loss_low for area in areas),
            expected_failure_loss_high=sum(area.expected_failure_loss_high for area in areas),
            by_area=areas,
            route=[
                ExpectedTrapOut.model_validate(trap) for trap in next_round.traps[:route_length]
            ],
        )


class ReliabilityOut(BaseModel):
    """How long the site's traps last, how often to test them, and what the next round
    can expect, from every round and repair the site holds."""

    site_id: int
    currency: str
    test_cost_per_trap: float
    traps: int
    lives: int = Field(description="Spans of working life, each ended by a failure or not yet")
    failures: int
    failures_per_year: float
    failures_per_year_low: float
    failures_per_year_high: float | None
    groups: list[ReliabilityGroupOut]
    next_round: NextRoundOut

    @classmethod
    def of(cls, found: SiteReliability, route_length: int = 30) -> "ReliabilityOut":
        rate = found.overall.rate
        return cls(
            site_id=found.site.id,
            currency=found.site.currency,
            test_cost_per_trap=found.site.test_cost_per_trap,
            traps=found.traps,
            lives=found.lives,
            failures=found.failures,
            **rate_fields(rate),
            groups=[ReliabilityGroupOut.of(group) for group in found.groups],
            next_round=NextRoundOut.of(found.next_round, route_length),
        )


class RoundTrendOut(BaseModel):
    """One round in the site's history: its failure figures, its installation losses
    apart, and the repairs made after it (before the next round)."""

    survey: SurveyRef
    label: str = Field(description="The round's name, for charts")
    traps_recorded: int
    traps_tested: int
    failed_count: int
    failure_rate: float | None
    annual_cost: float | None = Field(description="Failure losses a year")
    annual_cost_low: float | None
    annual_cost_high: float | None
    annual_steam_loss_t: float
    annual_installation_cost: float | None = Field(description="Apart: not removed by repairs")
    repairs_after: int

    @classmethod
    def of(cls, trend: RoundTrend) -> "RoundTrendOut":
        found = SummaryOut.of(trend.summary)
        assert found.survey is not None
        return cls(
            survey=found.survey,
            label=found.survey.name,
            traps_recorded=found.traps_recorded,
            traps_tested=found.traps_tested,
            failed_count=found.failed_count,
            failure_rate=found.failure_rate,
            annual_cost=found.annual_cost,
            annual_cost_low=found.annual_cost_low,
            annual_cost_high=found.annual_cost_high,
            annual_steam_loss_t=found.annual_steam_loss_t,
            annual_installation_cost=found.totals.annual_installation_cost,
            repairs_after=trend.repairs_after,
        )
