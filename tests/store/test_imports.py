"""CSV import and export: dialects, units in headers, a preview that writes nothing,
re-imports that update, and exports that import back to the same data."""

from typing import Any
from urllib.parse import parse_qsl

import pytest
from fastapi.testclient import TestClient

from service.physics.units import convert
from service.store.csv_format import MAX_CSV_BYTES
from tests.factories import make_site, make_survey

REGISTER = (
    "tag,area,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
    "return_pressure_kpa_g,condensate_destination,condensate_load_kg_h,in_service\n"
    "HP-01,Boiler house,drip,thermodynamic,3.2,1000,0,vented_receiver,20,yes\n"
    "HP-02,Boiler house,drip,inverted_bucket,4,1000,0,vented_receiver,25,yes\n"
    "MP-01,Dryers,process,float_thermostatic,6.4,400,50,closed_return,300,no\n"
)


def _import(api: TestClient, path: str, content: str | bytes, commit: bool) -> dict[str, Any]:
    path, _, query = path.partition("?")  # the client's params replace a path's own query
    answer = api.post(
        path,
        params={"commit": str(commit).lower(), **dict(parse_qsl(query))},
        content=content.encode() if isinstance(content, str) else content,
        headers={"content-type": "text/csv"},
    )
    assert answer.status_code in {200, 422}, answer.text
    body: dict[str, Any] = answer.json()
    body["status"] = answer.status_code
    return body


def _register_path(site: dict[str, Any]) -> str:
    """The register import, creating the areas a file names (tests of that ask are below)."""
    return f"/api/v1/sites/{site['id']}/imports/register?create_areas=true"


def _traps(api: TestClient, site: dict[str, Any]) -> list[dict[str, Any]]:
    items: list[dict[str, Any]] = api.get(f"/api/v1/sites/{site['id']}/traps").json()["items"]
    return items


def test_a_preview_lists_what_would_happen_and_writes_nothing(api: TestClient) -> None:
    site = make_site(api)
    preview = _import(api, _register_path(site), REGISTER, commit=False)
    assert (preview["rows"], preview["creates"], preview["updates"]) == (3, 3, 0)
    assert preview["problems"] == []
    assert preview["committed"] is False
    assert _traps(api, site) == []


def test_commit_writes_every_row_and_the_areas(api: TestClient) -> None:
    site = make_site(api)
    result = _import(api, _register_path(site), REGISTER, commit=True)
    assert result["committed"] is True
    traps = {trap["tag"]: trap for trap in _traps(api, site)}
    assert set(traps) == {"HP-01", "HP-02", "MP-01"}
    assert traps["MP-01"]["in_service"] is False
    areas = api.get(f"/api/v1/sites/{site['id']}/areas").json()["items"]
    assert sorted(area["name"] for area in areas) == ["Boiler house", "Dryers"]


def test_importing_the_same_register_again_updates_and_never_duplicates(api: TestClient) -> None:
    site = make_site(api)
    _import(api, _register_path(site), REGISTER, commit=True)
    changed = REGISTER.replace(
        "HP-02,Boiler house,drip,inverted_bucket,4,", "HP-02,Boiler house,drip,inverted_bucket,5,"
    )
    again = _import(api, _register_path(site), changed, commit=True)
    assert (again["creates"], again["updates"]) == (0, 3)
    traps = {trap["tag"]: trap for trap in _traps(api, site)}
    assert len(traps) == 3
    assert traps["HP-02"]["orifice_diameter_mm"] == 5.0
    assert len(api.get(f"/api/v1/sites/{site['id']}/areas").json()["items"]) == 2


def test_every_problem_is_listed_with_its_row_and_column_and_nothing_is_written(
    api: TestClient,
) -> None:
    site = make_site(api)
    bad = (
        "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,return_pressure_kpa_g\n"
        "A-1,drip,thermodynamic,3,1000,0\n"
        "A-2,kettle,thermodynamic,3,1000,0\n"
        "A-3,drip,thermodynamic,three,1000,0\n"
        "A-4,drip,thermodynamic,3,400,500\n"
        "A-1,drip,thermodynamic,3,1000,0\n"
        "A-6,drip,thermodynamic,3,30000,0\n"
    )
    result = _import(api, _register_path(site), bad, commit=True)
    assert result["status"] == 422
    assert result["committed"] is False
    found = {(problem["row"], problem["column"]) for problem in result["problems"]}
    assert found >= {
        (3, "application"),
        (4, "orifice_diameter_mm"),
        (5, "return_pressure_kpa_g"),
        (6, "tag"),
        (7, "inlet_pressure_kpa_g"),
    }
    assert (2, "tag") not in found
    assert _traps(api, site) == []


@pytest.mark.parametrize(
    "content",
    [
        "tag;application;trap_type;orifice_diameter_in;inlet_pressure_psig;return_pressure_bar_g;"
        "condensate_load_lb_h\nUS-1;drip;thermodynamic;0,125;150;0,5;100\n",
        "\ufefftag\tapplication\ttrap_type\torifice_diameter_in\tinlet_pressure_psig\t"
        "return_pressure_bar_g\tcondensate_load_lb_h\nUS-1\tdrip\tthermodynamic\t0.125\t150\t0.5\t100\n",
        "tag,application,trap_type,orifice_diameter_in,inlet_pressure_psig,return_pressure_bar_g,"
        "condensate_load_lb_h\r\nUS-1,Drip,Thermodynamic,0.125,150,0.5,100\r\n",
    ],
    ids=["semicolon-decimal-comma", "tab-with-bom", "comma-crlf-capitalised"],
)
def test_dialects_and_units_in_the_header(api: TestClient, content: str) -> None:
    site = make_site(api)
    result = _import(api, _register_path(site), content.encode("utf-8"), commit=True)
    assert result["problems"] == []
    (trap,) = _traps(api, site)
    # NIST SP 811: 1 in = 25.4 mm, 1 lb = 0.45359237 kg, 1 psi = 6.894757 kPa; 1 bar = 100 kPa.
    assert trap["orifice_diameter_mm"] == pytest.approx(3.175)
    assert trap["inlet_pressure_kpa_g"] == pytest.approx(convert(150.0, "psig", "kPa(g)"))
    assert trap["return_pressure_kpa_g"] == pytest.approx(50.0)
    assert trap["condensate_load_kg_h"] == pytest.approx(45.359237)


@pytest.mark.parametrize(
    ("content", "message"),
    [
        (b"", "empty"),
        (b"tag,application\n", "required"),
        (
            "tag,application,trap_type,orifice_diameter_mm,orifice_diameter_in,inlet_pressure_kpa_g,"
            "return_pressure_kpa_g\n",
            "one unit only",
        ),
        (
            b"tag,colour,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
            b"return_pressure_kpa_g\nA,red,drip,thermodynamic,3,100,0\n",
            "unknown column",
        ),
        ("tag,application\nÅ,drip\n".encode("latin-1"), "UTF-8"),
        (b"tag,appl\x00ication\n", "NUL"),
        # Judged by content, whatever the name: a workbook's ZIP signature and a PDF's.
        (b"PK\x03\x04\x14\x00\x06\x00tag,application", "spreadsheet (XLSX)"),
        (b"%PDF-1.7\ntag,application\n", "a PDF, not CSV"),
        (
            b"tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
            b"return_pressure_kpa_g\n",
            "no rows",
        ),
        (b'tag,application\n"unterminated,drip\n', "not valid CSV"),
    ],
)
def test_files_that_cannot_be_read_say_why(
    api: TestClient, content: str | bytes, message: str
) -> None:
    site = make_site(api)
    result = _import(api, _register_path(site), content, commit=True)
    assert result["status"] == 422
    assert any(message in problem["message"] for problem in result["problems"]), result["problems"]
    assert _traps(api, site) == []


def test_an_oversized_file_answers_413(api: TestClient) -> None:
    site = make_site(api)
    answer = api.post(
        _register_path(site),
        content=b"x" * (MAX_CSV_BYTES + 1),
        headers={"content-type": "text/csv"},
    )
    assert answer.status_code == 413
    assert "MB" in answer.json()["detail"]


FINDINGS = (
    "tag,tested_at,tested_by,method,condition,upstream_temperature_f,downstream_temperature_c\n"
    "HP-01,2026-03-02T08:00:00Z,A. Okafor,ultrasonic,leaking,350,110\n"
    "HP-02,2026-03-02 08:15,A. Okafor,ultrasonic_temperature,working,,\n"
)


def test_findings_import_by_tag_converts_units_and_updates_on_reimport(api: TestClient) -> None:
    site = make_site(api)
    _import(api, _register_path(site), REGISTER, commit=True)
    survey = make_survey(api, site)
    path = f"/api/v1/surveys/{survey['id']}/imports/findings"
    first = _import(api, path, FINDINGS, commit=True)
    assert (first["creates"], first["problems"]) == (2, [])
    again = _import(api, path, FINDINGS.replace("leaking", "blow_through"), commit=True)
    assert (again["creates"], again["updates"]) == (0, 2)
    findings = api.get(f"/api/v1/surveys/{survey['id']}/findings").json()["items"]
    assert len(findings) == 2
    leaky = next(f for f in findings if f["condition"] == "blow_through")
    assert leaky["upstream_temperature_c"] == pytest.approx((350 - 32) / 1.8)
    unknown = _import(
        api,
        path,
        "tag,tested_at,method,condition\nZZ-9,2026-03-02,ultrasonic,working\n",
        commit=False,
    )
    assert unknown["problems"][0]["column"] == "tag"


def test_exports_import_back_to_the_same_data(api: TestClient) -> None:
    site = make_site(api)
    _import(api, _register_path(site), REGISTER, commit=True)
    survey = make_survey(api, site)
    _import(api, f"/api/v1/surveys/{survey['id']}/imports/findings", FINDINGS, commit=True)
    traps = {trap["tag"]: trap for trap in _traps(api, site)}
    api.post(
        f"/api/v1/traps/{traps['HP-01']['id']}/repairs",
        json={"repaired_on": "2026-04-01", "kind": "replaced", "cost": 480},
    )
    register = api.get(f"/api/v1/sites/{site['id']}/exports/register.csv")
    findings = api.get(f"/api/v1/surveys/{survey['id']}/exports/findings.csv")
    repairs = api.get(f"/api/v1/sites/{site['id']}/exports/repairs.csv")
    assert register.headers["content-type"].startswith("text/csv")
    copy = make_site(api, name="Copy Mill")
    copy_survey = make_survey(api, copy)
    for path, export in (
        (_register_path(copy), register),
        (f"/api/v1/surveys/{copy_survey['id']}/imports/findings", findings),
        (f"/api/v1/sites/{copy['id']}/imports/repairs", repairs),
    ):
        assert _import(api, path, export.content, commit=True)["problems"] == []
    assert api.get(f"/api/v1/sites/{copy['id']}/exports/register.csv").text == register.text
    assert (
        api.get(f"/api/v1/surveys/{copy_survey['id']}/exports/findings.csv").text == findings.text
    )
    assert api.get(f"/api/v1/sites/{copy['id']}/exports/repairs.csv").text == repairs.text


def test_a_us_file_hears_its_problems_in_its_own_units(api: TestClient) -> None:
    site = make_site(api)
    content = (
        "tag,application,trap_type,orifice_diameter_in,inlet_pressure_psig,return_pressure_psig\n"
        "US-1,drip,thermodynamic,0.125,15,30\n"
    )
    result = _import(api, _register_path(site), content, commit=False)
    (problem,) = result["problems"]
    assert problem["column"] == "return_pressure_psig"
    assert "30 psig" in problem["message"]
    assert "15 psig" in problem["message"]
    assert "kPa" not in problem["message"]


def test_a_vented_receiver_above_atmosphere_is_refused_on_import(api: TestClient) -> None:
    site = make_site(api)
    content = (
        "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_kpa_g,"
        "return_pressure_kpa_g,condensate_destination,steam_temperature_c\n"
        "V-1,drip,thermodynamic,3,1000,60,vented_receiver,\n"
        "S-1,drip,thermodynamic,3,1000,0,vented_receiver,250\n"
    )
    result = _import(api, _register_path(site), content, commit=False)
    assert [(p["row"], p["column"]) for p in result["problems"]] == [(2, "condensate_destination")]
    assert "open to atmosphere" in result["problems"][0]["message"]


def test_exports_write_figures_without_float_noise(api: TestClient) -> None:
    site = make_site(api)
    content = (
        "tag,application,trap_type,orifice_diameter_mm,inlet_pressure_bar_g,return_pressure_kpa_g\n"
        "N-1,drip,thermodynamic,3,1.1,0\n"
    )
    assert _import(api, _register_path(site), content, commit=True)["problems"] == []
    exported = api.get(f"/api/v1/sites/{site['id']}/exports/register.csv").text
    # 1.1 bar is 110 kPa; as floats it multiplies to 110.00000000000001.
    assert ",110.0," in exported
    assert "110.00000000000001" not in exported


def test_a_register_naming_new_areas_asks_before_creating_them(api: TestClient) -> None:
    site = make_site(api)
    api.post(f"/api/v1/sites/{site['id']}/areas", json={"name": "Boiler house"})
    path = f"/api/v1/sites/{site['id']}/imports/register"
    content = REGISTER.replace("HP-02,Boiler house", "HP-02,boiler HOUSE")  # a known area
    preview = _import(api, path, content, commit=False)
    assert preview["problems"] == []
    assert preview["new_areas"] == ["Dryers"]
    refused = _import(api, path, content, commit=True)
    assert refused["status"] == 422
    assert [(p["row"], p["column"]) for p in refused["problems"]] == [(4, "area")]
    assert "'Dryers' is not an area of this site yet" in refused["problems"][0]["message"]
    assert _traps(api, site) == []
    confirmed = _import(api, path + "?create_areas=true", content, commit=True)
    assert confirmed["committed"] is True
    areas = api.get(f"/api/v1/sites/{site['id']}/areas").json()["items"]
    assert sorted(area["name"] for area in areas) == ["Boiler house", "Dryers"]


@pytest.mark.parametrize(
    ("unit_system", "expected"),
    [
        (
            "si",
            "tag,location,route_position,application,trap_type,connection_size,"
            "condensate_destination,hours_per_year,in_service,installed_on,notes,"
            "orifice_diameter_mm,inlet_pressure_kpa_g,steam_temperature_c,"
            "return_pressure_kpa_g,condensate_load_kg_h,area",
        ),
        (
            "us",
            "tag,location,route_position,application,trap_type,connection_size,"
            "condensate_destination,hours_per_year,in_service,installed_on,notes,"
            "orifice_diameter_in,inlet_pressure_psig,steam_temperature_f,"
            "return_pressure_psig,condensate_load_lb_h,area",
        ),
    ],
)
def test_a_template_names_the_columns_in_the_sites_units_and_imports_once_filled(
    api: TestClient, unit_system: str, expected: str
) -> None:
    site = make_site(api, unit_system=unit_system)
    template = api.get(f"/sites/{site['id']}/import/template/register.csv")
    assert template.headers["content-disposition"] == 'attachment; filename="register-template.csv"'
    assert template.text.splitlines() == [expected]
    row = dict.fromkeys(expected.split(","), "")
    row |= {"tag": "T-1", "application": "drip", "trap_type": "thermodynamic"}
    unit = "in" if unit_system == "us" else "mm"
    row |= {f"orifice_diameter_{unit}": "0.125" if unit == "in" else "3.2"}
    pressure = "psig" if unit_system == "us" else "kpa_g"
    row |= {f"inlet_pressure_{pressure}": "150", f"return_pressure_{pressure}": "0"}
    filled = template.text + ",".join(row.values()) + "\r\n"
    answer = _import(api, _register_path(site), filled, commit=True)
    assert answer["committed"] is True, answer["problems"]
