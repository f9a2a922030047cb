"""The roll-ups as the API, the pages and the exports all present them (SI units).

One shape, built once from a summary, serves every rendering, so a page and the
API can never disagree about a number.
"""

import datetime as dt

from pydantic import BaseModel, Field

from service.physics.conditions import TrapCondition
from service.physics.trap_loss import CondensateDestination
from service.reports.compare import Change, SurveyComparison, TrapChange
from service.reports.summary import PricedTrap, SiteSummary, Tally
from service.store.models import Survey
from service.store.vocabulary import Application, RecommendedAction, RepairKind, TrapType, label


class TallyOut(BaseModel):
    """Yearly figures of a group of traps; unsuffixed typical, `_low` and `_high` its range."""

    traps: int
    failed: int
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
    annual_total_cost: float | None
    annual_total_cost_low: float | None
    annual_total_cost_high: float | None
    annual_total_co2_t: float
    annual_total_co2_t_low: float
    annual_total_co2_t_high: float

    @classmethod
    def of(cls, tally: Tally) -> "TallyOut":
        return cls(
            traps=tally.traps,
            failed=tally.failed,
            annual_steam_loss_t=tally.live_steam.mass_t,
            annual_steam_loss_t_low=tally.live_steam_low.mass_t,
            annual_steam_loss_t_high=tally.live_steam_high.mass_t,
            annual_energy_loss_gj=tally.live_steam.energy_gj,
            annual_energy_loss_gj_low=tally.live_steam_low.energy_gj,
            annual_energy_loss_gj_high=tally.live_steam_high.energy_gj,
            annual_fuel_gj=tally.live_steam.fuel_gj,
            annual_cost=tally.live_steam.cost,
            annual_cost_low=tally.live_steam_low.cost,
            annual_cost_high=tally.live_steam_high.cost,
            annual_co2_t=tally.live_steam.co2_t,
            annual_co2_t_low=tally.live_steam_low.co2_t,
            annual_co2_t_high=tally.live_steam_high.co2_t,
            annual_flash_vented_t=tally.flash_vented.mass_t,
            annual_flash_cost=tally.flash_vented.cost,
            annual_condensate_to_drain_t=tally.condensate_to_drain.mass_t,
            annual_drain_cost=tally.condensate_to_drain.cost,
            annual_total_cost=tally.total.cost,
            annual_total_cost_low=tally.total_low.cost,
            annual_total_cost_high=tally.total_high.cost,
            annual_total_co2_t=tally.total.co2_t,
            annual_total_co2_t_low=tally.total_low.co2_t,
            annual_total_co2_t_high=tally.total_high.co2_t,
        )


class GroupOut(TallyOut):
    key: str
    label: str


def _groups(tallies: dict[str, Tally]) -> list[GroupOut]:
    return [
        GroupOut(key=key, label=label(key), **TallyOut.of(tally).model_dump())
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
    annual_steam_loss_t: float
    annual_cost: float | None
    annual_co2_t: float
    annual_total_cost: float | None
    annual_total_cost_low: float | None
    annual_total_cost_high: float | None
    annual_total_co2_t: float
    repair_kind: RepairKind
    repair_cost: float | None
    payback_years: float | None = Field(description="Repair cost over the typical yearly cost")
    payback_years_low: float | None = Field(description="Over the high yearly cost")
    payback_years_high: float | None = Field(description="Over the low yearly cost")
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
            recommended_action=priced.recommended_action,
            inlet_pressure_kpa_abs=service.inlet_pressure_kpa_abs,
            return_pressure_kpa_abs=service.return_pressure_kpa_abs,
            orifice_diameter_mm=service.orifice_diameter_mm,
            hours_per_year=service.hours_per_year,
            condensate_load_kg_h=service.condensate_load_kg_h,
            condensate_destination=service.destination,
            discharge_coefficient=service.discharge_coefficient.typical,
            discharge_coefficient_low=service.discharge_coefficient.low,
            discharge_coefficient_high=service.discharge_coefficient.high,
            loss_factor=loss.loss_factor.typical,
            loss_factor_low=loss.loss_factor.low,
            loss_factor_high=loss.loss_factor.high,
            steam_loss_kg_h=loss.steam_loss_kg_h.typical,
            steam_loss_kg_h_low=loss.steam_loss_kg_h.low,
            steam_loss_kg_h_high=loss.steam_loss_kg_h.high,
            annual_steam_loss_t=loss.live_steam.mass_t,
            annual_cost=loss.live_steam.cost,
            annual_co2_t=loss.live_steam.co2_t,
            annual_total_cost=loss.total.cost,
            annual_total_cost_low=loss.total_low.cost,
            annual_total_cost_high=loss.total_high.cost,
            annual_total_co2_t=loss.total.co2_t,
            repair_kind=priced.repair_kind,
            repair_cost=priced.repair_cost,
            payback_years=priced.payback_years(loss.total.cost),
            payback_years_low=priced.payback_years(loss.total_high.cost),
            payback_years_high=priced.payback_years(loss.total_low.cost),
            repaired_on=priced.repaired_on,
            risk=loss.risk,
        )


class SurveyRef(BaseModel):
    id: int
    name: str
    started_on: dt.date
    ended_on: dt.date | None

    @classmethod
    def of(cls, survey: Survey) -> "SurveyRef":
        return cls(
            id=survey.id, name=survey.name, started_on=survey.started_on, ended_on=survey.ended_on
        )


class SummaryOut(BaseModel):
    """A site's survey priced and rolled up. Totals are live steam unless named `total`."""

    site_id: int
    site_name: str
    currency: str
    survey: SurveyRef | None
    traps_in_service: int
    traps_tested: int = Field(description="Tested in operation (not 'not accessible' or out)")
    traps_untested: int
    traps_not_accessible: int
    traps_out_of_service: int
    failed_count: int
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
    totals: TallyOut
    by_condition: list[GroupOut]
    by_area: list[GroupOut]
    by_application: list[GroupOut]
    risk_count: int
    risks: list[PricedTrapOut]
    repair_list: list[PricedTrapOut]

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
            traps_tested=summary.traps_tested,
            traps_untested=summary.traps_untested,
            traps_not_accessible=summary.traps_not_accessible,
            traps_out_of_service=summary.traps_out_of_service,
            failed_count=summary.failed_count,
            failure_rate=summary.failure_rate,
            annual_steam_loss_t=totals.annual_steam_loss_t,
            annual_steam_loss_t_low=totals.annual_steam_loss_t_low,
            annual_steam_loss_t_high=totals.annual_steam_loss_t_high,
            annual_energy_loss_gj=totals.annual_energy_loss_gj,
            annual_energy_loss_gj_low=totals.annual_energy_loss_gj_low,
            annual_energy_loss_gj_high=totals.annual_energy_loss_gj_high,
            annual_cost=totals.annual_cost,
            annual_cost_low=totals.annual_cost_low,
            annual_cost_high=totals.annual_cost_high,
            annual_co2_t=totals.annual_co2_t,
            annual_co2_t_low=totals.annual_co2_t_low,
            annual_co2_t_high=totals.annual_co2_t_high,
            totals=totals,
            by_condition=_groups({str(key): tally for key, tally in summary.by_condition.items()}),
            by_area=_groups(summary.by_area),
            by_application=_groups(
                {str(key): tally for key, tally in summary.by_application.items()}
            ),
            risk_count=len(summary.risks),
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
    annual_total_cost_before: float
    annual_total_cost_after: float

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
            annual_total_cost_before=change.yearly_cost_before,
            annual_total_cost_after=change.yearly_cost_after,
        )


class ComparisonOut(BaseModel):
    """From one survey to a later one. A negative cost change is money saved."""

    from_survey: SurveyRef
    to_survey: SurveyRef
    failed_before: int
    failed_after: int
    annual_total_cost_before: float | None
    annual_total_cost_after: float | None
    annual_cost_change: float
    annual_cost_change_low: float
    annual_cost_change_high: float
    newly_failed: list[TrapChangeOut]
    repaired_and_confirmed: list[TrapChangeOut]
    recovered_without_repair: list[TrapChangeOut]
    still_failed: list[TrapChangeOut]
    not_retested: list[TrapChangeOut]
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
        return cls(
            from_survey=SurveyRef.of(before.survey),
            to_survey=SurveyRef.of(after.survey),
            failed_before=before.failed_count,
            failed_after=after.failed_count,
            annual_total_cost_before=before.totals.total.cost,
            annual_total_cost_after=after.totals.total.cost,
            annual_cost_change=comparison.cost_change,
            annual_cost_change_low=comparison.cost_change_low,
            annual_cost_change_high=comparison.cost_change_high,
            newly_failed=listed(Change.NEWLY_FAILED),
            repaired_and_confirmed=listed(Change.REPAIRED_AND_CONFIRMED),
            recovered_without_repair=listed(Change.RECOVERED_WITHOUT_REPAIR),
            still_failed=listed(Change.STILL_FAILED),
            not_retested=listed(Change.NOT_RETESTED),
            change_counts={change: len(comparison.changes.get(change, [])) for change in Change},
        )
