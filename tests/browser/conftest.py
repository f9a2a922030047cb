"""A live server on loopback with the demo plant, and headless Chromium from Debian.

In CI a missing browser fails the run (`.ci/run` installs chromium); elsewhere these
tests skip with the reason.
"""

import os
import shutil
import socket
import threading
import time
from collections.abc import Iterator
from pathlib import Path

import pytest
import uvicorn
from playwright.sync_api import Browser, Page, Playwright, sync_playwright

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role
from service.web.app import create_app
from tests.factories import PASSWORD, bearer, make_user

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


@pytest.fixture(scope="module")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[tuple[str, Database]]:
    path: Path = tmp_path_factory.mktemp("browser") / "demo.db"
    database = Database.at(f"sqlite:///{path}")
    database.upgrade()
    with database.writing() as session:
        load_demo(session=session)
    for name, role in (("walker", Role.MANAGER), ("fieldtech", Role.TECHNICIAN)):
        make_user(database, name, role, site_ids=[1])
    port = _free_port()
    server = uvicorn.Server(
        uvicorn.Config(create_app(database), host="127.0.0.1", port=port, log_level="warning")
    )
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    deadline = time.monotonic() + 30
    while not server.started and time.monotonic() < deadline:
        time.sleep(0.05)
    assert server.started, "the test server did not start"
    yield f"http://127.0.0.1:{port}", database
    server.should_exit = True
    thread.join(timeout=10)


@pytest.fixture(scope="module")
def browser() -> Iterator[Browser]:
    if not shutil.which(CHROMIUM):
        if os.environ.get("CI"):
            pytest.fail(f"{CHROMIUM} is required in CI: .ci/run installs Debian's chromium")
        pytest.skip(f"no browser at {CHROMIUM}: apt-get install chromium")
    playwright: Playwright = sync_playwright().start()
    launched = playwright.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_FLAGS)
    yield launched
    launched.close()
    playwright.stop()


@pytest.fixture(scope="module")
def api_headers(live_server: tuple[str, Database]) -> dict[str, str]:
    """Headers of an API token of the manager, for reading back what a browser stored."""
    _, database = live_server
    return bearer(database, 1)


def sign_in(page: Page, base: str, name: str = "walker", then: str = "/") -> None:
    """Sign in through the sign-in form, as a person would, and land on `then`."""
    page.goto(f"{base}{then}")
    page.get_by_label("User name").fill(name)
    page.get_by_label("Password").fill(PASSWORD)
    with page.expect_navigation():
        page.get_by_role("button", name="Sign in").click()
