"""Every setting is documented in README.md's Settings table, with its default."""

import dataclasses
import re
from pathlib import Path

import pytest

from service.settings import DATABASE_URL_VARIABLE, PREFIX, Settings
from service.store.schemas import SiteCreate
from service.web.calculations import TrapLossIn

README = (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
SETTINGS_SECTION = README.split("## Settings", 1)[1].split("\n## ", 1)[0]


def _row(name: str) -> str:
    match = re.search(rf"^\| `{re.escape(name)}` \|.*$", SETTINGS_SECTION, re.MULTILINE)
    assert match, f"README.md's Settings table has no row for `{name}`"
    return match.group(0)


@pytest.mark.parametrize("field", dataclasses.fields(Settings), ids=lambda field: field.name)
def test_every_process_setting_is_documented_with_its_default(field: dataclasses.Field) -> None:  # type: ignore[type-arg]
    row = _row(PREFIX + field.name.upper())
    assert f"`{getattr(Settings(), field.name)}`" in row, row


def test_settings_are_read_from_the_environment_and_checked() -> None:
    read = Settings.from_environment(
        environment={
            DATABASE_URL_VARIABLE: "sqlite:///x.db",
            "TRAPTALLY_SESSION_ABSOLUTE_HOURS": "8",
            "TRAPTALLY_SIGN_IN_FAILURES_PER_ACCOUNT": "3/10 minutes",
        }
    )
    assert (read.database_url, read.session_absolute_hours) == ("sqlite:///x.db", 8)
    assert read.sign_in_failures_per_account == "3/10 minutes"
    with pytest.raises(SystemExit, match="TRAPTALLY_SESSION_IDLE_MINUTES"):
        Settings.from_environment(environment={"TRAPTALLY_SESSION_IDLE_MINUTES": "0"})


@pytest.mark.parametrize(
    "name",
    [name for name, field in TrapLossIn.model_fields.items() if not field.is_required()],
)
def test_every_calculation_default_is_documented_with_its_value(name: str) -> None:
    row = _row(name)
    default = TrapLossIn.model_fields[name].default
    if isinstance(default, float):
        assert f"| {default:g} |" in row or f"| {default} |" in row, row
    elif default is None:
        assert "| none |" in row or "| by condition |" in row, row
    else:
        assert f"`{default}`" in row, row


@pytest.mark.parametrize(
    "name", [name for name in SiteCreate.model_fields if name not in {"name", "location"}]
)
def test_every_site_setting_is_documented(name: str) -> None:
    _row(name)
