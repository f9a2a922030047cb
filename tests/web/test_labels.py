"""Trap tags: label sheets whose QR codes decode to the address that opens the trap, and
the walk opening a trap by a typed or scanned tag."""

import re
import xml.etree.ElementTree as ElementTree
from typing import Any

import pytest
import segno
from fastapi.testclient import TestClient

from tests.factories import make_area, make_site, make_survey, make_trap


@pytest.fixture
def tagged(api: TestClient) -> dict[str, Any]:
    site = make_site(api)
    area = make_area(api, site, name="Dryer end")
    traps = [
        make_trap(api, site, tag=tag, area_id=area["id"], route_position=number, location=where)
        for number, (tag, where) in enumerate([("DR-10", "Cylinder 4"), ("DR/11", "Hood")], 1)
    ]
    return {"site": site, "traps": traps}


def test_a_label_sheet_holds_a_code_per_trap_in_route_order(
    api: TestClient, tagged: dict[str, Any]
) -> None:
    sheet = api.get(f"/sites/{tagged['site']['id']}/labels")
    assert sheet.status_code == 200
    assert re.findall(r'class="label-tag tag">([^<]+)<', sheet.text) == ["DR-10", "DR/11"]
    codes = re.findall(r"(<svg[^>]*class=\"qr\".*?</svg>)", sheet.text, flags=re.S)
    assert len(codes) == 2
    for code in codes:
        ElementTree.fromstring(code)  # well-formed SVG, drawn inline
    assert 'aria-label="QR code for trap DR-10"' in sheet.text
    assert "Cylinder 4" in sheet.text


def test_each_code_is_the_qr_of_the_address_that_opens_its_trap(
    api: TestClient, tagged: dict[str, Any]
) -> None:
    # ISO/IEC 18004 by segno: the same text and settings give the same symbol, so the
    # sheet's code is checked against the code of the address it should hold.
    site_id = tagged["site"]["id"]
    sheet = api.get(f"/sites/{site_id}/labels").text
    address = f"http://testserver/sites/{site_id}/tags/DR%2F11"
    expected = segno.make(address, error="m").svg_inline(
        scale=3, border=2, omitsize=True, svgclass="qr"
    )
    assert expected in sheet


def test_a_tag_opens_its_trap_in_the_round_in_progress_else_its_page(
    api: TestClient, tagged: dict[str, Any]
) -> None:
    site_id, trap = tagged["site"]["id"], tagged["traps"][1]
    to_page = api.get(f"/sites/{site_id}/tags/dr%2F11", follow_redirects=False)
    assert to_page.headers["location"] == f"/traps/{trap['id']}"  # no round in progress
    survey = make_survey(api, tagged["site"])
    to_walk = api.get(f"/sites/{site_id}/tags/DR%2F11", follow_redirects=False)
    assert to_walk.headers["location"] == f"/surveys/{survey['id']}/walk/traps/{trap['id']}"
    assert api.get(f"/sites/{site_id}/tags/NOPE", follow_redirects=False).status_code == 404


@pytest.mark.parametrize(
    "typed", ["dr-10", " DR-10 ", "https://plant.example/sites/1/tags/DR-10"], ids=str
)
def test_the_walk_opens_a_trap_by_a_typed_or_scanned_tag(
    api: TestClient, tagged: dict[str, Any], typed: str
) -> None:
    survey = make_survey(api, tagged["site"])
    found = api.get(
        f"/surveys/{survey['id']}/walk/find", params={"tag": typed}, follow_redirects=False
    )
    assert found.status_code == 303
    trap_id = tagged["traps"][0]["id"]
    assert found.headers["location"] == f"/surveys/{survey['id']}/walk/traps/{trap_id}"


def test_an_unknown_tag_says_so_and_keeps_what_was_typed(
    api: TestClient, tagged: dict[str, Any]
) -> None:
    survey = make_survey(api, tagged["site"])
    missing = api.get(f"/surveys/{survey['id']}/walk/find", params={"tag": "DR-99"})
    assert missing.status_code == 404
    assert (
        "No trap tagged &#39;DR-99&#39;" in missing.text or "No trap tagged 'DR-99'" in missing.text
    )
    assert 'value="DR-99"' in missing.text
