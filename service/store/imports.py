"""Bulk import of a trap register, a survey's findings and a site's repairs from CSV.

Two steps. `plan_...` reads the whole file and lists every problem with its row and
column; it writes nothing. `apply_...` writes a clean plan, all of it, inside the
caller's one transaction. A row whose key (a trap's tag; a finding's trap and
moment; a repair's trap, date and kind) is already stored updates that record, so
importing the same file twice changes nothing the second time.

The columns are listed in README.md, "Importing and exporting".
"""

import datetime as dt
from collections.abc import Callable
from dataclasses import dataclass, field
from enum import StrEnum
from types import NoneType
from typing import Any, Generic, TypeVar, get_args

from pydantic import BaseModel, ValidationError
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.store import bulk, register, surveys
from service.store.collection import fewer_collections
from service.store.csv_format import (
    Problem,
    Table,
    UnitColumn,
    UnreadableFile,
    as_typed,
    could_run_as_formula,
    in_file_units,
    number,
    number_in_program_unit,
    read_table,
    unit_column,
    unit_header,
    word,
    yes_or_no,
)
from service.store.errors import ConflictError, FieldError
from service.store.models import Area, Finding, Repair, Site, Survey, Trap
from service.store.schemas import FindingCreate, RepairCreate, TrapCreate, unconstrained

Data = TypeVar("Data", bound=BaseModel)

TEXT, WORD, NUMBER, INTEGER, YES_NO, DATE, MOMENT = (
    "text",
    "word",
    "number",
    "integer",
    "yes_no",
    "date",
    "moment",
)


@dataclass(frozen=True, slots=True)
class Column:
    """A plain column: its header is the field's name."""

    name: str
    kind: str
    required: bool = False


def _kind_of(annotation: Any) -> str:
    """How a cell is read for a field of this type (an optional field's, its type's)."""
    plain = unconstrained(annotation)
    kind = next((kind for kind in get_args(plain) if kind is not NoneType), plain)
    if issubclass(kind, StrEnum):
        return WORD
    for python_type, cell_kind in (
        (bool, YES_NO),  # before int: a bool is an int
        (int, INTEGER),
        (float, NUMBER),
        (dt.datetime, MOMENT),  # before date: a datetime is a date
        (dt.date, DATE),
        (str, TEXT),
    ):
        if issubclass(kind, python_type):
            return cell_kind
    raise TypeError(f"no column kind for {annotation!r}")


@dataclass(frozen=True, slots=True)
class ImportFormat:
    """The columns of a kind of file: the model's fields, each a column named for it (a
    quantity's in any of its units), after the columns that name its trap or area."""

    model: type[BaseModel]
    naming_columns: tuple[Column, ...] = ()  # read into the row, not the model's (a tag)
    extra_columns: tuple[str, ...] = ()  # known, read by the caller (a register's area)
    without: tuple[str, ...] = ()  # fields those columns stand for (trap_id, area_id)
    columns: tuple[Column, ...] = field(init=False)
    unit_columns: tuple[tuple[UnitColumn, bool], ...] = field(init=False)  # (column, required)

    def __post_init__(self) -> None:
        columns = list(self.naming_columns)
        unit_columns = []
        for name, info in self.model.model_fields.items():
            if name in self.without:
                continue
            quantity = unit_column(name)
            if quantity is not None:
                unit_columns.append((quantity, info.is_required()))
            else:
                columns.append(Column(name, _kind_of(info.annotation), info.is_required()))
        object.__setattr__(self, "columns", tuple(columns))
        object.__setattr__(self, "unit_columns", tuple(unit_columns))

    def known_headers(self) -> set[str]:
        headers = {column.name for column in self.columns} | set(self.extra_columns)
        for quantity, _ in self.unit_columns:
            headers |= set(quantity.headers)
        return headers


TAG = Column("tag", TEXT, required=True)
REGISTER = ImportFormat(TrapCreate, extra_columns=("area",), without=("area_id",))
FINDINGS = ImportFormat(FindingCreate, naming_columns=(TAG,), without=("trap_id",))
REPAIRS = ImportFormat(RepairCreate, naming_columns=(TAG,))


@dataclass(frozen=True, slots=True)
class PlannedRow(Generic[Data]):
    """One clean row: what to store, the fields its file gave, and what it updates."""

    row: int
    data: Data
    existing_id: int | None  # the stored record this row updates
    trap_id: int | None  # the trap the row is about
    cells: dict[str, str]


@dataclass(slots=True)
class ImportPlan(Generic[Data]):
    """What a file would write, or why it cannot be written."""

    kind: str
    columns: list[str] = field(default_factory=list)
    rows: list[PlannedRow[Data]] = field(default_factory=list)
    problems: list[Problem] = field(default_factory=list)
    # Written all the same, but worth a look: text a spreadsheet would run as a formula.
    warnings: list[Problem] = field(default_factory=list)
    # Areas the file names that the site does not have: created only once confirmed.
    new_areas: dict[str, int] = field(default_factory=dict)  # name -> first row naming it
    areas_confirmed: bool = False

    @property
    def creates(self) -> int:
        return sum(row.existing_id is None for row in self.rows)

    @property
    def updates(self) -> int:
        return len(self.rows) - self.creates

    @property
    def clean(self) -> bool:
        return not self.problems

    @property
    def ready(self) -> bool:
        """Clean, and any new area confirmed: what may be written."""
        return self.clean and (self.areas_confirmed or not self.new_areas)

    def unconfirmed_areas(self) -> list[Problem]:
        """A problem for each new area not confirmed, at the first row naming it."""
        if self.areas_confirmed:
            return []
        return [
            Problem(row, "area", f"'{name}' is not an area of this site yet: confirm to create it")
            for name, row in self.new_areas.items()
        ]


FORMULA_WARNING = (
    "'{text}' begins like a spreadsheet formula: it is stored as text, and exports write it "
    "led by an apostrophe so a spreadsheet shows it rather than runs it"
)


def _cell_value(table: Table, kind: str, text: str) -> Any:
    if kind == TEXT:
        return as_typed(text)
    if kind == WORD:
        return word(text)
    if kind == NUMBER:
        return number(table, text)
    if kind == INTEGER:
        value = number(table, text)
        if value != int(value):
            raise ValueError(f"'{text}' is not a whole number")
        return int(value)
    if kind == YES_NO:
        return yes_or_no(text)
    if kind == DATE:
        return dt.date.fromisoformat(text)
    return _moment(text)


def _moment(text: str) -> dt.datetime:
    try:
        moment = dt.datetime.fromisoformat(text.replace(" ", "T", 1))
    except ValueError:
        raise ValueError(f"'{text}' is not a date and time like 2026-03-14T09:30") from None
    return moment if moment.tzinfo else moment.replace(tzinfo=dt.UTC)


def _header_problems(table: Table, spec: ImportFormat) -> tuple[list[Problem], dict[str, str]]:
    """Missing and unknown columns, and the header each unit column is read from."""
    problems = [
        Problem(1, column.name, "this column is required")
        for column in spec.columns
        if column.required and column.name not in table.header
    ]
    chosen: dict[str, str] = {}
    for quantity, required in spec.unit_columns:
        try:
            header = unit_header(table, quantity)
        except UnreadableFile as error:
            problems.append(Problem(1, quantity.field, str(error)))
            continue
        if header is not None:
            chosen[quantity.field] = header
        elif required:
            choices = " or ".join(quantity.headers)
            problems.append(Problem(1, quantity.field, f"this column is required ({choices})"))
    known = spec.known_headers()
    problems += [
        Problem(1, name, "unknown column") for name in table.header if name and name not in known
    ]
    return problems, chosen


def _read_row(
    table: Table,
    spec: ImportFormat,
    units: dict[str, UnitColumn],
    chosen: dict[str, str],
    row: int,
    cells: dict[str, str],
    problems: list[Problem],
    warnings: list[Problem],
) -> dict[str, Any]:
    fields: dict[str, Any] = {}
    for column in spec.columns:
        text = cells.get(column.name, "")
        if not text:
            continue
        if column.kind == TEXT and could_run_as_formula(text):
            warnings.append(Problem(row, column.name, FORMULA_WARNING.format(text=text[:40])))
        try:
            fields[column.name] = _cell_value(table, column.kind, text)
        except ValueError as error:
            problems.append(Problem(row, column.name, str(error)))
    for name, header in chosen.items():
        text = cells.get(header, "")
        if not text:
            continue
        try:
            fields[name] = number_in_program_unit(table, text, units[name], header)
        except ValueError as error:
            problems.append(Problem(row, header, str(error)))
    return fields


def _validated(
    spec: ImportFormat,
    chosen: dict[str, str],
    row: int,
    fields: dict[str, Any],
    problems: list[Problem],
) -> BaseModel | None:
    try:
        return spec.model.model_validate(fields)
    except ValidationError as error:
        for entry in error.errors():
            name = str(entry["loc"][0]) if entry["loc"] else ""
            message = entry["msg"].removeprefix("Value error, ")
            problems.append(Problem(row, chosen.get(name, name), message))
        return None


@fewer_collections()
def _plan(
    content: bytes,
    spec: ImportFormat,
    kind: str,
    prepare: Callable[[int, dict[str, Any], list[Problem]], tuple[int | None, int | None]],
) -> ImportPlan[Any]:
    """Read and check every row. `prepare` completes a row's fields in place from the
    stored records and returns the ids of the record it updates and of its trap."""
    plan: ImportPlan[Any] = ImportPlan(kind=kind)
    try:
        table = read_table(content)
    except UnreadableFile as error:
        plan.problems.append(Problem(1, "", str(error)))
        return plan
    plan.columns = table.header
    header_problems, chosen = _header_problems(table, spec)
    if header_problems:
        plan.problems = header_problems
        return plan
    units = {quantity.field: quantity for quantity, _ in spec.unit_columns}
    # Each program unit -> the unit this file wrote it in, so messages speak the file's.
    file_units = {
        units[name].program_unit: units[name].headers[header] for name, header in chosen.items()
    }
    for row, cells in table.rows:
        row_problems: list[Problem] = []
        fields = _read_row(table, spec, units, chosen, row, cells, row_problems, plan.warnings)
        existing_id, trap_id = prepare(row, fields, row_problems)
        data = None if row_problems else _validated(spec, chosen, row, fields, row_problems)
        if data is not None and not row_problems:
            plan.rows.append(PlannedRow(row, data, existing_id, trap_id, cells))
        plan.problems += [
            Problem(
                problem.row,
                chosen.get(problem.column, problem.column),
                in_file_units(problem.message, file_units),
            )
            for problem in row_problems
        ]
    if not table.rows:
        plan.problems.append(Problem(1, "", "the file has a header but no rows"))
    return plan


# The register -------------------------------------------------------------------------


def plan_register(
    *, session: Session, site: Site, content: bytes, create_areas: bool = False
) -> ImportPlan[TrapCreate]:
    """Check a register file against the site: every problem, and the areas it would
    create (only with `create_areas`, once a person has seen them); nothing written."""
    # Tags are one tag whatever their case ("HP-01", "hp-01"), as the register holds them.
    stored = {
        trap.tag.lower(): trap
        for trap in session.scalars(select(Trap).where(Trap.site_id == site.id))
    }
    seen: dict[str, int] = {}

    def prepare(
        row: int, fields: dict[str, Any], problems: list[Problem]
    ) -> tuple[int | None, int | None]:
        tag = fields.get("tag", "")
        if tag.lower() in seen:
            earlier = seen[tag.lower()]
            problems.append(Problem(row, "tag", f"tag '{tag}' is also on row {earlier}"))
        seen[tag.lower()] = row
        for name in ("inlet_pressure_kpa_g", "return_pressure_kpa_g"):
            if name in fields:
                try:
                    register.check_pressure(site, name, fields[name])
                except FieldError as error:
                    problems.append(Problem(row, name, str(error)))
        known = stored.get(tag.lower())
        if known is not None:
            fields["tag"] = known.tag  # the register's spelling of it stays
            # Columns the file leaves out keep their stored values.
            for name in TrapCreate.model_fields:
                fields.setdefault(name, getattr(known, name))
            fields.pop("area_id", None)
        return (known.id, known.id) if known is not None else (None, None)

    plan = _plan(content, REGISTER, "register", prepare)
    known = {area.name.lower() for area in register.areas_of(session=session, site=site)}
    for row in plan.rows:
        name = row.cells.get("area", "")
        if name and name.lower() not in known:
            plan.new_areas.setdefault(name, row.row)
            known.add(name.lower())
    plan.areas_confirmed = create_areas
    return plan


def _area_ids(session: Session, site: Site, names: set[str]) -> dict[str, int]:
    """Each name's area id, whatever its case ("Dryers", "dryers"); new names created."""
    areas = {area.name.lower(): area for area in register.areas_of(session=session, site=site)}
    order = max((area.route_order for area in areas.values()), default=0)
    for name in sorted(names, key=str.lower):
        if name.lower() not in areas:
            order += 1
            areas[name.lower()] = Area(site_id=site.id, name=name, route_order=order)
            session.add(areas[name.lower()])
    session.flush()
    return {name: areas[name.lower()].id for name in names}


@fewer_collections()
def apply_register(*, session: Session, site: Site, plan: ImportPlan[TrapCreate]) -> None:
    """Write a ready register plan: new traps created, known tags updated, areas made."""
    if not plan.ready:
        raise ValueError("a plan with problems or unconfirmed areas cannot be applied")
    names = {row.cells.get("area", "") for row in plan.rows} - {""}
    area_ids = _area_ids(session, site, names)
    updated = {row.existing_id for row in plan.rows if row.existing_id is not None}
    # The site's traps are read only when the file updates some (by site, not by a list
    # of ids: a list of 50,000 would pass SQLite's limit on parameters).
    stored = (
        {trap.id: trap for trap in session.scalars(select(Trap).where(Trap.site_id == site.id))}
        if updated
        else {}
    )
    created = []
    for row in plan.rows:
        values = row.data.model_dump()
        area_name = row.cells.get("area")
        if "area" in plan.columns:
            values["area_id"] = area_ids.get(area_name) if area_name else None
        elif row.existing_id is not None:
            values.pop("area_id")
        if row.existing_id is None:
            created.append({"site_id": site.id, **values})
        else:
            trap = stored[row.existing_id]
            for name, value in values.items():
                setattr(trap, name, value)
    session.flush()
    bulk.insert_audited(session, Trap, created, site.id)


# Findings -----------------------------------------------------------------------------


def _trap_of(
    row: int, fields: dict[str, Any], traps: dict[str, int], problems: list[Problem]
) -> int | None:
    tag = fields.pop("tag", "")
    if tag.lower() not in traps:
        problems.append(Problem(row, "tag", f"no trap tagged '{tag}' in the register"))
        return None
    return traps[tag.lower()]


@fewer_collections()
def _apply(
    session: Session,
    plan: ImportPlan[Any],
    model: type[Finding] | type[Repair],
    owner: Callable[[PlannedRow[Any]], dict[str, Any]],
    site_id: int,
) -> None:
    """Create the plan's new records and update the ones it names, in the session."""
    if not plan.clean:
        raise ValueError("a plan with problems cannot be applied")
    created = []
    for row in plan.rows:
        values = row.data.model_dump()
        if row.existing_id is None:
            created.append({**owner(row), **values})
        else:
            record = session.get_one(model, row.existing_id)
            for name, value in values.items():
                setattr(record, name, value)
    session.flush()
    bulk.insert_audited(session, model, created, site_id)


def _trap_ids(session: Session, site_id: int) -> dict[str, int]:
    """Each trap's id by its tag in lower case: a file may write a tag in any case."""
    rows = session.execute(select(Trap.tag, Trap.id).where(Trap.site_id == site_id))
    return {tag.lower(): trap_id for tag, trap_id in rows}


def plan_findings(*, session: Session, survey: Survey, content: bytes) -> ImportPlan[FindingCreate]:
    """Check a findings file against the survey's register: every problem, nothing written."""
    traps = _trap_ids(session, survey.site_id)
    stored: dict[tuple[Any, ...], int] = {
        (trap_id, tested_at): finding_id
        for finding_id, trap_id, tested_at in session.execute(
            select(Finding.id, Finding.trap_id, Finding.tested_at).where(
                Finding.survey_id == survey.id
            )
        )
    }

    def prepare(
        row: int, fields: dict[str, Any], problems: list[Problem]
    ) -> tuple[int | None, int | None]:
        trap_id = _trap_of(row, fields, traps, problems)
        if trap_id is None:
            return None, None
        fields["trap_id"] = trap_id
        return stored.get((trap_id, fields.get("tested_at"))), trap_id

    plan = _plan(content, FINDINGS, "findings", prepare)
    try:
        surveys.check_open_for_findings(survey)
    except ConflictError as error:
        plan.problems.insert(0, Problem(1, "", str(error)))
    return plan


def apply_findings(*, session: Session, survey: Survey, plan: ImportPlan[FindingCreate]) -> None:
    _apply(session, plan, Finding, lambda row: {"survey_id": survey.id}, survey.site_id)


# Repairs ------------------------------------------------------------------------------


def plan_repairs(*, session: Session, site: Site, content: bytes) -> ImportPlan[RepairCreate]:
    traps = _trap_ids(session, site.id)
    stored: dict[tuple[Any, ...], int] = {
        (trap_id, repaired_on, kind): repair_id
        for repair_id, trap_id, repaired_on, kind in session.execute(
            select(Repair.id, Repair.trap_id, Repair.repaired_on, Repair.kind)
            .join(Trap, Trap.id == Repair.trap_id)
            .where(Trap.site_id == site.id)
        )
    }

    def prepare(
        row: int, fields: dict[str, Any], problems: list[Problem]
    ) -> tuple[int | None, int | None]:
        trap_id = _trap_of(row, fields, traps, problems)
        if trap_id is None:
            return None, None
        return stored.get((trap_id, fields.get("repaired_on"), fields.get("kind"))), trap_id

    return _plan(content, REPAIRS, "repairs", prepare)


def apply_repairs(*, session: Session, site: Site, plan: ImportPlan[RepairCreate]) -> None:
    _apply(session, plan, Repair, lambda row: {"trap_id": row.trap_id}, site.id)
