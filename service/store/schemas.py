"""What a form, an import or the API sends (`...Create`, `...Update`) and gets (`...Out`).

Every input refuses unknown fields, NaN, infinity and NUL characters, and bounds each
number to what a steam system can hold. Rules that need the site (its atmospheric
pressure) are checked by the store functions, which name the field just the same.
"""

import datetime as dt
import functools
import inspect
import operator
from collections.abc import Callable
from types import UnionType
from typing import Annotated, Any, Self, Union, get_args, get_origin

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    ValidationInfo,
    field_validator,
    model_validator,
)
from pydantic.fields import FieldInfo

from service.physics.annual import (
    DEFAULT_BOILER_EFFICIENCY,
    DEFAULT_CO2_KG_PER_GJ_FUEL,
    DEFAULT_MAKEUP_WATER_TEMPERATURE_C,
    DEFAULT_NET_TO_GROSS_RATIO,
    HOURS_IN_LEAP_YEAR,
    MIN_BOILER_EFFICIENCY,
    ClosedReturnPricing,
    HeatingValue,
)
from service.physics.conditions import DEFAULT_LOSS_FACTORS, TrapCondition
from service.physics.orifice import MAXIMUM_ORIFICE_MM
from service.physics.pressure import STANDARD_ATMOSPHERE_KPA
from service.physics.steam_tables import CRITICAL_PRESSURE_KPA
from service.physics.trap_loss import (
    DEFAULT_DISCHARGE_COEFFICIENT,
    CondensateDestination,
    require_destination_fits_return,
    require_loss_factor_applies,
    require_return_below_inlet,
)
from service.physics.units import UnitSystem
from service.store.vocabulary import (
    Application,
    CostBasis,
    RecommendedAction,
    RepairKind,
    SurveyStatus,
    TestMethod,
    TrapType,
)


class StrictInput(BaseModel):
    """Input: unknown fields, NaN, infinity and NUL characters are refused."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, str_strip_whitespace=True)

    @field_validator("*")
    @classmethod
    def _no_nul_characters(cls, value: Any) -> Any:
        if isinstance(value, str) and "\x00" in value:
            raise ValueError("text may not contain NUL characters")
        return value


def _take_fields(
    model: type[BaseModel],
    into: type[BaseModel],
    without: tuple[str, ...],
    derive: Callable[[FieldInfo], tuple[Any, FieldInfo]],
) -> None:
    """Give the class being made (`into`) each field of `model`, derived by `derive`.

    Runs from `__init_subclass__`, before pydantic collects the new class's fields, so
    they are validated and documented as if written out. Fields the class declares itself
    win; they come first, then the model's in its order.
    """
    own: dict[str, Any] = inspect.get_annotations(into)
    annotations = {name: kind for name, kind in own.items() if name not in model.model_fields}
    for name, info in model.model_fields.items():
        if name in without:
            continue
        if name in own:
            annotations[name] = own[name]
            continue
        annotations[name], field = derive(info)
        setattr(into, name, field)
    into.__annotations__ = annotations


def unconstrained(annotation: Any) -> Any:
    """`Annotated[float, Field(ge=0)] | None` -> `float | None`: a stored value is shown as
    it is, even one stored before a limit was tightened."""
    if get_origin(annotation) is Annotated:
        return unconstrained(get_args(annotation)[0])
    if get_origin(annotation) in (Union, UnionType):
        return functools.reduce(operator.or_, map(unconstrained, get_args(annotation)))
    return annotation


def _optional_field(info: FieldInfo) -> tuple[Any, FieldInfo]:
    """The same field with the same limits, optional, unset unless sent."""
    annotation: Any = info.annotation
    return annotation | None, FieldInfo.merge_field_infos(
        info, default=None, default_factory=None, validate_default=False
    )


def _output_field(info: FieldInfo) -> tuple[Any, FieldInfo]:
    """The same field, required and without limits, with its description."""
    annotation = unconstrained(info.annotation)
    return annotation, FieldInfo(annotation=annotation, description=info.description)


class ChangesTo(StrictInput):
    """A change (a PATCH body): `class TrapUpdate(ChangesTo, of=TrapCreate)` has every field
    of TrapCreate, each optional, with the same limits; the fields sent are the changes."""

    def __init_subclass__(
        cls, of: type[BaseModel] | None = None, without: tuple[str, ...] = (), **kwargs: Any
    ) -> None:
        super().__init_subclass__(**kwargs)
        if of is not None:
            _take_fields(of, cls, without, _optional_field)


class StoredOut(BaseModel):
    """Output read straight off a stored record: `class TrapOut(StoredOut, of=TrapCreate)`
    has every field of TrapCreate, required and unconstrained, after its own (ids)."""

    model_config = ConfigDict(from_attributes=True)

    def __init_subclass__(cls, of: type[BaseModel] | None = None, **kwargs: Any) -> None:
        super().__init_subclass__(**kwargs)
        if of is not None:
            _take_fields(of, cls, (), _output_field)


Name = Annotated[str, StringConstraints(min_length=1, max_length=120)]
ShortText = Annotated[str, StringConstraints(max_length=200)]
Notes = Annotated[str, StringConstraints(max_length=4000)]
Tag = Annotated[
    str, StringConstraints(min_length=1, max_length=40, pattern=r"^[^\s\x00-\x1f][^\x00-\x1f]*$")
]
Money = Annotated[float, Field(ge=0.0, le=1e7)]
Fraction = Annotated[float, Field(ge=0.0, le=1.0)]
DischargeCoefficient = Annotated[float, Field(gt=0.0, le=1.0)]
Efficiency = Annotated[float, Field(ge=MIN_BOILER_EFFICIENCY, le=1.0)]
HoursPerYear = Annotated[float, Field(ge=0.0, le=HOURS_IN_LEAP_YEAR)]
GaugePressure = Annotated[
    float,
    Field(
        ge=-STANDARD_ATMOSPHERE_KPA, le=CRITICAL_PRESSURE_KPA, description="Gauge pressure [kPa(g)]"
    ),
]
OrificeDiameter = Annotated[float, Field(gt=0.0, le=MAXIMUM_ORIFICE_MM)]
CondensateLoad = Annotated[float, Field(ge=0.0, le=100_000.0)]
MakeupTemperature = Annotated[float, Field(ge=0.01, le=95.0)]
Co2Factor = Annotated[float, Field(ge=0.0, le=200.0)]
Elevation = Annotated[float, Field(ge=-500.0, le=5500.0)]
# 50 kPa is the standard atmosphere near 5 500 m; 110 kPa is above any sea-level high.
Atmosphere = Annotated[
    float, Field(gt=50.0, le=110.0, description="Local atmospheric pressure [kPa]")
]
Currency = Annotated[str, StringConstraints(pattern=r"^[A-Z]{3}$")]
SurfaceTemperature = Annotated[float, Field(ge=-60.0, le=450.0)]
SteamTemperature = Annotated[float, Field(ge=0.01, le=800.0)]  # IF97 region 2's range
DrainTemperatureLimit = Annotated[float, Field(ge=20.0, le=99.0)]  # a sewer's discharge limit
NetToGrossRatio = Annotated[float, Field(ge=0.8, le=1.0)]  # every common fuel lies within
RoutePosition = Annotated[int, Field(ge=0, le=10_000_000)]
RecordId = Annotated[int, Field(ge=1, le=2_147_483_647)]  # 32-bit ids on every database

# Illustrative defaults in the site's currency, no published source: every site should
# set its own from its purchase prices and labour rates.
DEFAULT_REPAIR_COSTS: dict[TrapType, tuple[float, float]] = {
    TrapType.THERMODYNAMIC: (120.0, 300.0),
    TrapType.INVERTED_BUCKET: (250.0, 700.0),
    TrapType.FLOAT_THERMOSTATIC: (300.0, 900.0),
    TrapType.THERMOSTATIC_BALANCED_PRESSURE: (120.0, 350.0),
    TrapType.THERMOSTATIC_BIMETALLIC: (120.0, 350.0),
    TrapType.THERMOSTATIC_LIQUID_EXPANSION: (150.0, 400.0),
    TrapType.FIXED_ORIFICE: (80.0, 250.0),
}
DEFAULT_HOURS_PER_YEAR = 8760.0  # a plant running all year; common practice


class SpreadIn(StrictInput):
    """A factor with its low-high range; low <= typical <= high, each from 0 to 1."""

    typical: Fraction
    low: Fraction
    high: Fraction

    @model_validator(mode="after")
    def _ordered(self) -> Self:
        if not self.low <= self.typical <= self.high:
            raise ValueError("the range must satisfy low <= typical <= high")
        return self


def _spread_default(condition: TrapCondition) -> Any:
    spread = DEFAULT_LOSS_FACTORS[condition]
    return Field(
        default_factory=lambda: SpreadIn(typical=spread.typical, low=spread.low, high=spread.high)
    )


class LossFactorsIn(StrictInput):
    """Share of the orifice's steam capacity passed, for each condition that wastes steam."""

    leaking: SpreadIn = _spread_default(TrapCondition.LEAKING)
    blow_through: SpreadIn = _spread_default(TrapCondition.BLOW_THROUGH)
    rapid_cycling: SpreadIn = _spread_default(TrapCondition.RAPID_CYCLING)


class RepairCostIn(StrictInput):
    repaired: Money
    replaced: Money


def _default_repair_costs() -> dict[TrapType, RepairCostIn]:
    return {
        trap_type: RepairCostIn(repaired=repaired, replaced=replaced)
        for trap_type, (repaired, replaced) in DEFAULT_REPAIR_COSTS.items()
    }


# Testing one trap: a technician tests some 10 to 15 traps an hour with walking between
# them; at 100 to 150 an hour with overheads, about 10 a trap (common practice, an estimate).
DEFAULT_TEST_COST_PER_TRAP = 10.0


class SiteCreate(StrictInput):
    """A site and every figure its losses are priced with."""

    name: Name
    location: ShortText = ""
    elevation_m: Elevation | None = None
    atmospheric_pressure_kpa: Atmosphere | None = None
    currency: Currency = "EUR"
    unit_system: UnitSystem = UnitSystem.SI
    cost_basis: CostBasis = CostBasis.STEAM_COST
    steam_cost_per_tonne: Money | None = Field(default=None, validate_default=True)
    fuel_price_per_gj: Money | None = Field(default=None, validate_default=True)
    boiler_efficiency: Efficiency = DEFAULT_BOILER_EFFICIENCY
    water_and_treatment_cost_per_tonne: Money = 0.0
    makeup_water_temperature_c: MakeupTemperature = DEFAULT_MAKEUP_WATER_TEMPERATURE_C
    co2_kg_per_gj_fuel: Co2Factor = DEFAULT_CO2_KG_PER_GJ_FUEL
    fuel_heating_value: HeatingValue = HeatingValue.LHV
    co2_factor_heating_value: HeatingValue = HeatingValue.LHV
    net_to_gross_ratio: NetToGrossRatio = DEFAULT_NET_TO_GROSS_RATIO
    sewer_cost_per_tonne: Money = 0.0
    test_cost_per_trap: Money = Field(
        default=DEFAULT_TEST_COST_PER_TRAP,
        description="What testing one trap costs (labour and its overheads), for the "
        "test-interval advice",
    )
    drain_temperature_limit_c: DrainTemperatureLimit | None = None
    closed_return_pricing: ClosedReturnPricing = ClosedReturnPricing.HEAT_NOT_RECOVERED
    hours_per_year: HoursPerYear = DEFAULT_HOURS_PER_YEAR
    discharge_coefficient: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.typical
    discharge_coefficient_low: DischargeCoefficient = DEFAULT_DISCHARGE_COEFFICIENT.low
    discharge_coefficient_high: DischargeCoefficient = Field(
        default=DEFAULT_DISCHARGE_COEFFICIENT.high, validate_default=True
    )
    loss_factors: LossFactorsIn = Field(default_factory=LossFactorsIn)
    repair_costs: dict[TrapType, RepairCostIn] = Field(default_factory=_default_repair_costs)

    @field_validator("steam_cost_per_tonne", "fuel_price_per_gj")
    @classmethod
    def _price_of_the_chosen_basis(cls, value: float | None, info: ValidationInfo) -> Any:
        needed = {
            "steam_cost_per_tonne": CostBasis.STEAM_COST,
            "fuel_price_per_gj": CostBasis.FUEL_PRICE,
        }[info.field_name or ""]
        if value is None and info.data.get("cost_basis") is needed:
            raise ValueError(f"the cost basis '{needed}' needs this price")
        return value

    @field_validator("discharge_coefficient_high")
    @classmethod
    def _discharge_coefficient_range(cls, value: float, info: ValidationInfo) -> float:
        typical = info.data.get("discharge_coefficient")
        low = info.data.get("discharge_coefficient_low")
        if typical is not None and low is not None and not low <= typical <= value:
            raise ValueError("the discharge coefficient must satisfy low <= typical <= high")
        return value

    @field_validator("repair_costs")
    @classmethod
    def _every_trap_type_priced(
        cls, value: dict[TrapType, RepairCostIn]
    ) -> dict[TrapType, RepairCostIn]:
        return {**_default_repair_costs(), **value}


class SiteUpdate(ChangesTo, of=SiteCreate):
    """Any of a site's fields; the merged site is checked as a whole, as on creation."""


class SiteOut(StoredOut, of=SiteCreate):
    id: int
    atmospheric_pressure_kpa: float  # the stored site's, from its elevation when not given
    loss_factors: dict[str, list[float]]  # condition -> [typical, low, high]
    repair_costs: dict[str, dict[str, float]]


class AreaCreate(StrictInput):
    name: Name
    route_order: RoutePosition = 0


class AreaUpdate(ChangesTo, of=AreaCreate):
    """Any of an area's fields."""


class AreaOut(StoredOut, of=AreaCreate):
    id: int
    site_id: int


class TrapCreate(StrictInput):
    """One trap of the register. Pressures are gauge, against the site's atmosphere."""

    tag: Tag
    area_id: RecordId | None = None
    location: ShortText = ""
    route_position: RoutePosition | None = None
    application: Application
    trap_type: TrapType
    connection_size: Annotated[str, StringConstraints(max_length=20)] = ""
    orifice_diameter_mm: OrificeDiameter
    inlet_pressure_kpa_g: GaugePressure
    steam_temperature_c: SteamTemperature | None = None
    return_pressure_kpa_g: GaugePressure
    condensate_destination: CondensateDestination = CondensateDestination.CLOSED_RETURN
    condensate_load_kg_h: CondensateLoad | None = None
    hours_per_year: HoursPerYear | None = None
    in_service: bool = True
    installed_on: dt.date | None = None
    notes: Notes = ""

    @field_validator("return_pressure_kpa_g")
    @classmethod
    def _return_below_inlet(cls, value: float, info: ValidationInfo) -> float:
        inlet = info.data.get("inlet_pressure_kpa_g")
        if inlet is not None:
            require_return_below_inlet(value, inlet)
        return value

    @field_validator("condensate_destination")
    @classmethod
    def _vented_receiver_at_atmosphere(
        cls, value: CondensateDestination, info: ValidationInfo
    ) -> CondensateDestination:
        return_pressure = info.data.get("return_pressure_kpa_g")
        if return_pressure is not None:
            require_destination_fits_return(value, return_pressure)
        return value


class TrapUpdate(ChangesTo, of=TrapCreate):
    """Any of a trap's fields; the merged trap is checked as a whole, as on creation."""


class TrapOut(StoredOut, of=TrapCreate):
    id: int
    site_id: int


class SurveyCreate(StrictInput):
    name: Name
    started_on: dt.date
    ended_on: dt.date | None = None
    notes: Notes = ""
    status: SurveyStatus = Field(
        default=SurveyStatus.IN_PROGRESS,
        description="planned, in_progress (findings may be recorded) or closed (only a "
        "manager's correction); closing without an end date ends the round today",
    )

    @model_validator(mode="after")
    def _a_closed_round_has_ended(self) -> Self:
        if self.status == SurveyStatus.CLOSED and self.ended_on is None:
            self.ended_on = max(self.started_on, dt.datetime.now(dt.UTC).date())
        return self

    @field_validator("ended_on")
    @classmethod
    def _ends_after_it_starts(cls, value: dt.date | None, info: ValidationInfo) -> Any:
        started = info.data.get("started_on")
        if value is not None and started is not None and value < started:
            raise ValueError("a survey cannot end before it starts")
        return value


class SurveyUpdate(ChangesTo, of=SurveyCreate):
    """Any of a survey's fields; the merged survey is checked as on creation."""


class SurveyOut(StoredOut, of=SurveyCreate):
    id: int
    site_id: int


class FindingCreate(StrictInput):
    """One test of one trap. A moment without a time zone is taken as UTC."""

    trap_id: RecordId
    tested_at: dt.datetime
    tested_by: Annotated[str, StringConstraints(max_length=80)] = ""
    method: TestMethod
    condition: TrapCondition
    loss_factor_override: Fraction | None = None
    upstream_temperature_c: SurfaceTemperature | None = None
    downstream_temperature_c: SurfaceTemperature | None = None
    recommended_action: RecommendedAction = RecommendedAction.NONE
    notes: Notes = ""

    @field_validator("tested_at")
    @classmethod
    def _aware(cls, value: dt.datetime) -> dt.datetime:
        return value if value.tzinfo is not None else value.replace(tzinfo=dt.UTC)

    @field_validator("loss_factor_override")
    @classmethod
    def _override_fits_condition(cls, value: float | None, info: ValidationInfo) -> Any:
        condition = info.data.get("condition")
        if value is not None and condition is not None:
            require_loss_factor_applies(condition)
        return value


class FindingUpdate(ChangesTo, of=FindingCreate, without=("trap_id",)):
    """Any of a finding's fields but its trap; the merged finding is checked as on creation."""


class FindingOut(StoredOut, of=FindingCreate):
    id: int
    survey_id: int


class RepairCreate(StrictInput):
    repaired_on: dt.date
    kind: RepairKind
    cost: Money | None = None
    notes: Notes = ""


class RepairUpdate(ChangesTo, of=RepairCreate):
    """Any of a repair's fields."""


class RepairOut(StoredOut, of=RepairCreate):
    id: int
    trap_id: int
