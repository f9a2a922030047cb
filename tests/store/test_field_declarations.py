"""Each field is declared once, on its `...Create` model; the change, output and import
shapes are derived from it, and README.md documents every import column."""

import re
from pathlib import Path

import pytest
from pydantic import BaseModel, ValidationError

from service.physics.conditions import LIVE_STEAM_CONDITIONS
from service.store import schemas
from service.store.imports import FINDINGS, REGISTER, REPAIRS, ImportFormat

README = (Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8")
COLUMNS_SECTION = README.split("## Importing and exporting", 1)[1].split("\n## ", 1)[0]

DERIVED = [
    # (create, change, output, fields the change leaves out, the output's own fields)
    (schemas.SiteCreate, schemas.SiteUpdate, schemas.SiteOut, (), ("id",)),
    (schemas.AreaCreate, schemas.AreaUpdate, schemas.AreaOut, (), ("id", "site_id")),
    (schemas.TrapCreate, schemas.TrapUpdate, schemas.TrapOut, (), ("id", "site_id")),
    (schemas.SurveyCreate, schemas.SurveyUpdate, schemas.SurveyOut, (), ("id", "site_id")),
    (
        schemas.FindingCreate,
        schemas.FindingUpdate,
        schemas.FindingOut,
        ("trap_id",),
        ("id", "survey_id"),
    ),
    (schemas.RepairCreate, schemas.RepairUpdate, schemas.RepairOut, (), ("id", "trap_id")),
]


@pytest.mark.parametrize(("create", "change", "output", "left_out", "own"), DERIVED)
def test_change_and_output_carry_every_field_of_the_create_model(
    create: type[BaseModel],
    change: type[BaseModel],
    output: type[BaseModel],
    left_out: tuple[str, ...],
    own: tuple[str, ...],
) -> None:
    fields = [name for name in create.model_fields if name not in left_out]
    assert list(change.model_fields) == fields
    assert not any(info.is_required() for info in change.model_fields.values())
    assert list(output.model_fields) == [*own, *create.model_fields]
    assert all(info.is_required() for info in output.model_fields.values())


def test_a_change_keeps_the_create_models_limits_and_sends_only_what_was_given() -> None:
    with pytest.raises(ValidationError) as refused:
        schemas.TrapUpdate.model_validate({"orifice_diameter_mm": -1, "tag": "x" * 41})
    assert {entry["loc"][0] for entry in refused.value.errors()} == {
        "orifice_diameter_mm",
        "tag",
    }
    with pytest.raises(ValidationError, match="Extra inputs"):
        schemas.TrapUpdate.model_validate({"colour": "red"})
    with pytest.raises(ValidationError, match="NUL"):
        schemas.TrapUpdate.model_validate({"notes": "a\x00b"})
    change = schemas.TrapUpdate.model_validate({"notes": "  lagging missing  "})
    assert change.model_dump(exclude_unset=True) == {"notes": "lagging missing"}


def test_an_output_shows_a_stored_value_outside_todays_limits() -> None:
    # A record stored before a limit was tightened still reads back, rather than a 500.
    fields = {"id": 1, "trap_id": 2, "repaired_on": "2026-01-05", "kind": "replaced"}
    fields |= {"cost": 5e9, "notes": "x" * 5000}
    assert schemas.RepairOut.model_validate(fields).model_dump()["cost"] == 5e9


@pytest.mark.parametrize(
    ("spec", "model", "standing_in"),
    [
        (REGISTER, schemas.TrapCreate, {"area_id"}),
        (FINDINGS, schemas.FindingCreate, {"trap_id"}),
        (REPAIRS, schemas.RepairCreate, set()),
    ],
)
def test_every_field_of_the_model_is_a_column(
    spec: ImportFormat, model: type[BaseModel], standing_in: set[str]
) -> None:
    read = {column.name for column in spec.columns} | {
        quantity.field for quantity, _ in spec.unit_columns
    }
    assert set(model.model_fields) - read == standing_in


def _readme_rows(file: str) -> dict[str, bool]:
    """Each column the README's table gives `file`, with whether it says it is required."""
    rows: dict[str, bool] = {}
    for line in COLUMNS_SECTION.splitlines():
        cells = [cell.strip() for cell in line.strip().strip("|").split("|")]
        if len(cells) == 4 and cells[0] == file:
            for name in re.findall(r"`([a-z_]+)`", cells[1]):
                if not name.startswith("_"):  # `_in`, `_psig`: another unit of the one before
                    rows[name] = cells[3] == "yes"
    return rows


@pytest.mark.parametrize(
    ("file", "spec"), [("register", REGISTER), ("findings", FINDINGS), ("repairs", REPAIRS)]
)
def test_readme_documents_every_column_and_whether_it_is_required(
    file: str, spec: ImportFormat
) -> None:
    documented = _readme_rows(file)
    columns = {column.name: column.required for column in spec.columns}
    columns |= {quantity.field: required for quantity, required in spec.unit_columns}
    columns |= dict.fromkeys(spec.extra_columns, False)
    assert documented == columns


def test_a_site_sets_a_loss_factor_for_each_condition_that_wastes_live_steam() -> None:
    assert list(schemas.LossFactorsIn.model_fields) == [
        condition.value for condition in LIVE_STEAM_CONDITIONS
    ]
