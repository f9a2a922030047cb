"""Every setting is documented in README.md's Settings table, with its default."""

import dataclasses
import re
from pathlib import Path

import pytest

from service.settings import DATABASE_URL_VARIABLE, Settings
from service.store.schemas import SiteCreate
from service.web.api.calc import TrapLossIn

README = (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
SETTINGS_SECTION = README.split("## Settings", 1)[1].split("\n## ", 1)[0]


def _row(name: str) -> str:
    match = re.search(rf"^\| `{re.escape(name)}` \|.*$", SETTINGS_SECTION, re.MULTILINE)
    assert match, f"README.md's Settings table has no row for `{name}`"
    return match.group(0)


def test_the_process_settings_are_documented() -> None:
    assert [field.name for field in dataclasses.fields(Settings)] == ["database_url"]
    assert Settings().database_url in _row(DATABASE_URL_VARIABLE)


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
