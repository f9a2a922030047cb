"""A technician and an energy manager, in a real browser on a tablet-sized screen."""

import io
import re
from typing import Any

import httpx
import pytest
from playwright.sync_api import Browser, Page, Route, ViewportSize, expect
from pypdf import PdfReader

from service.store.database import Database
from tests.browser.conftest import sign_in

TABLET_PORTRAIT: ViewportSize = {"width": 768, "height": 1024}


@pytest.fixture
def tablet(live_server: tuple[str, Database], browser: Browser) -> Any:
    """A tablet, signed in as the site's manager."""
    context = browser.new_context(viewport=TABLET_PORTRAIT, has_touch=True)
    page = context.new_page()
    sign_in(page, live_server[0])
    yield page
    context.close()


def _record(page: Page, condition: str, upstream: str, downstream: str) -> None:
    page.locator("label.condition-choice").filter(has_text=condition).click()
    page.get_by_label("Ultrasonic and temperature").check()
    page.get_by_label("Temperature before the trap").fill(upstream)
    page.get_by_label("Temperature after the trap").fill(downstream)


def test_a_technician_walks_five_traps_and_one_save_survives_a_dropped_connection(
    live_server: tuple[str, Database], tablet: Page, api_headers: dict[str, str]
) -> None:
    base, _ = live_server
    tablet.goto(f"{base}/sites/1")
    tablet.get_by_label("Name").fill("Autumn walk 2026")
    tablet.get_by_role("button", name="Add the survey round").click()
    expect(tablet.get_by_role("heading", name="Autumn walk 2026")).to_be_visible()
    tablet.get_by_role("link", name=re.compile("Next trap to test")).click()

    found = ["Working", "Leaking", "Blowing through", "Working", "Plugged"]
    dropped: list[str] = []

    def lose_the_answer(route: Route) -> None:
        # The save reaches the server, but its answer never reaches the tablet.
        if route.request.method != "POST":
            route.continue_()
            return
        route.fetch()
        dropped.append(route.request.url)
        route.abort("connectionreset")

    tags = []
    for number, condition in enumerate(found):
        tags.append(tablet.locator("h1 .tag").inner_text())
        _record(tablet, condition, "176", "101")
        if number == 2:
            tablet.route(re.compile(r".*/walk/traps/\d+$"), lose_the_answer)
            # Kept on the tablet with its key, the walk goes on; sent again from the next
            # page, the server answers with the finding it stored, so it is stored once.
            with tablet.expect_navigation():
                tablet.get_by_role("button", name=re.compile("Save and go")).click()
            tablet.unroute(re.compile(r".*/walk/traps/\d+$"))
            expect(tablet.locator("#outbox")).to_be_hidden()
            continue
        with tablet.expect_navigation():
            tablet.get_by_role("button", name=re.compile("Save and go")).click()
        expect(tablet.get_by_role("status").first).to_contain_text("Saved on the server")
        expect(tablet.get_by_role("status").first).to_contain_text(tags[-1])

    assert len(dropped) == 1
    survey_id = int(re.search(r"/surveys/(\d+)/", tablet.url).group(1))  # type: ignore[union-attr]
    findings = httpx.get(f"{base}/api/v1/surveys/{survey_id}/findings", headers=api_headers).json()
    assert findings["total"] == 5
    assert [item["condition"] for item in findings["items"]] == [
        "working",
        "leaking",
        "blow_through",
        "working",
        "plugged",
    ]

    summary = httpx.get(f"{base}/api/v1/sites/1/summary", headers=api_headers).json()
    assert summary["survey"]["id"] == survey_id
    assert summary["failed_count"] == 3
    tablet.goto(f"{base}/sites/1/summary")
    expect(
        tablet.get_by_text(f"{summary['failed_count']} of {summary['traps_tested']} tested")
    ).to_be_visible()
    expect(tablet.locator("main")).to_contain_text(tags[2])


def test_the_printed_report_has_every_section(
    live_server: tuple[str, Database], browser: Browser
) -> None:
    base, _ = live_server
    page = browser.new_page()
    sign_in(page, base, then="/sites/1/report")
    document = PdfReader(io.BytesIO(page.pdf(format="A4")))
    text = " ".join(sheet.extract_text() for sheet in document.pages)
    for section in (
        "Steam trap survey report",
        "Before anyone acts on these figures",
        "Failure losses",
        "Repair list",
        "Risks",
        "Where the failure losses are",
        "Installation losses",
        "Assumptions and methods",
        "Page 1 of",
    ):
        assert section.replace("fi", "ﬁ") in text or section in text, section
    assert "Survey walk" not in text  # no navigation on paper
    letter = PdfReader(io.BytesIO(page.pdf(format="Letter")))
    assert len(letter.pages) >= 2
    page.close()


DEMO_PAGES = [
    "/",
    "/sites/1",
    "/sites/1/summary",
    "/sites/1/report",
    "/sites/1/register",
    "/traps/1",
    "/sites/1/settings",
    "/sites/1/import",
    "/sites/1/audit",
    "/account/password",
    "/surveys/1/walk",
    "/surveys/1/walk/traps/1",
    "/surveys/1/walk/new-trap",
    "/calculator",
    "/calculator?calc=trap&inlet=1000&return=0&orifice=4&hours=8000&price=30",
]


@pytest.mark.parametrize("path", DEMO_PAGES)
def test_no_page_scrolls_sideways_on_a_tablet_or_breaks_its_policy(
    live_server: tuple[str, Database], tablet: Page, path: str
) -> None:
    base, _ = live_server
    complaints: list[str] = []
    tablet.on(
        "console",
        lambda message: complaints.append(message.text) if message.type == "error" else None,
    )
    tablet.goto(f"{base}{path}")
    width = tablet.evaluate("document.documentElement.scrollWidth")
    assert width <= TABLET_PORTRAIT["width"], f"{path} is {width} px wide"
    assert complaints == [], complaints  # e.g. a Content-Security-Policy violation


def test_touch_targets_are_at_least_44_px(live_server: tuple[str, Database], tablet: Page) -> None:
    base, _ = live_server
    tablet.goto(f"{base}/surveys/1/walk/traps/1")
    small = tablet.evaluate(
        """() => [...document.querySelectorAll(
                 'main button, main .button, main .condition-choice span, main .choice')]
           .map(e => e.getBoundingClientRect())
           .filter(r => r.width > 0 && (r.height < 44 || r.width < 44)).length"""
    )
    assert small == 0


def test_a_finding_can_be_recorded_with_the_keyboard_alone(
    live_server: tuple[str, Database], browser: Browser, api_headers: dict[str, str]
) -> None:
    base, _ = live_server
    round_in_progress = httpx.post(
        f"{base}/api/v1/sites/1/surveys",
        json={"name": "Keyboard round", "started_on": "2026-11-02"},
        headers=api_headers,
    ).json()
    page = browser.new_page(viewport=TABLET_PORTRAIT)
    sign_in(page, base, name="fieldtech", then=f"/surveys/{round_in_progress['id']}/walk/traps/2")
    page.locator("input[name=condition]").first.focus()
    page.keyboard.press("ArrowRight")  # from Working to Leaking, as radio groups move
    page.keyboard.press("Space")
    assert page.locator("input[name=condition]:checked").get_attribute("value") == "leaking"
    page.locator("input[name=method]").first.focus()
    page.keyboard.press("Space")
    page.locator("#f-upstream_temperature").focus()
    page.keyboard.type("178")  # near saturation at the trap's inlet: a reading that agrees
    with page.expect_navigation():
        page.keyboard.press("Enter")
    expect(page.get_by_role("status").first).to_contain_text("Saved on the server")
    page.close()


PHONE_PORTRAIT: ViewportSize = {"width": 390, "height": 844}


def _round_in_progress(base: str, api_headers: dict[str, str], name: str) -> int:
    answer = httpx.post(
        f"{base}/api/v1/sites/1/surveys",
        json={"name": name, "started_on": "2026-11-02"},
        headers=api_headers,
    )
    assert answer.status_code == 201, answer.text
    return int(answer.json()["id"])


@pytest.mark.parametrize("viewport", [TABLET_PORTRAIT, PHONE_PORTRAIT], ids=["tablet", "phone"])
def test_save_is_in_view_without_scrolling(
    live_server: tuple[str, Database],
    browser: Browser,
    api_headers: dict[str, str],
    viewport: ViewportSize,
) -> None:
    base, _ = live_server
    survey_id = _round_in_progress(base, api_headers, f"In view {viewport['width']}")
    context = browser.new_context(viewport=viewport, has_touch=True)
    page = context.new_page()
    sign_in(page, base, name="fieldtech", then=f"/surveys/{survey_id}/walk/traps/3")
    save = page.get_by_role("button", name="Save and go to the next trap")
    box = save.bounding_box()
    assert box is not None
    assert page.evaluate("window.scrollY") == 0
    assert box["y"] >= 0
    assert box["y"] + box["height"] <= viewport["height"]
    context.close()


def test_a_working_trap_takes_two_taps_once_the_method_is_pinned(
    live_server: tuple[str, Database], browser: Browser, api_headers: dict[str, str]
) -> None:
    base, _ = live_server
    survey_id = _round_in_progress(base, api_headers, "Two taps")
    context = browser.new_context(viewport=TABLET_PORTRAIT, has_touch=True)
    page = context.new_page()
    sign_in(page, base, name="fieldtech", then=f"/surveys/{survey_id}/walk/traps/1")
    page.locator("label.condition-choice").filter(has_text="Working").tap()
    page.get_by_label("Ultrasonic", exact=True).tap()
    page.get_by_label("Keep this method for the next traps").tap()
    with page.expect_navigation():
        page.get_by_role("button", name="Save and go to the next trap").tap()
    # The next trap: two taps, Working and Save, with no scrolling between them.
    next_url = page.url
    page.locator("label.condition-choice").filter(has_text="Working").tap()
    assert page.evaluate("window.scrollY") == 0
    with page.expect_navigation():
        page.get_by_role("button", name="Save and go to the next trap").tap()
    assert page.url != next_url
    expect(page.get_by_role("status").first).to_contain_text("Saved on the server")
    findings = httpx.get(f"{base}/api/v1/surveys/{survey_id}/findings", headers=api_headers).json()[
        "items"
    ]
    assert [(f["condition"], f["method"]) for f in findings] == [("working", "ultrasonic")] * 2
    assert {f["tested_by"] for f in findings} == {"fieldtech"}
    context.close()
