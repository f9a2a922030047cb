"""Photos of findings: taken on the walk, checked by their first bytes and size, kept
beside the database, served only to those who may read the site, shown on the trap's page
and in the report's appendix; a refused photo leaves no finding behind."""

import base64
from pathlib import Path
from typing import Any

import pytest
from fastapi.testclient import TestClient

from service.settings import Settings
from service.store.database import Database
from service.store.models import Role
from service.store.photos import MAX_PHOTO_BYTES
from service.web.app import create_app
from tests.factories import bearer, make_site, make_survey, make_trap, make_user

# A 1x1 PNG (PNG specification, ISO/IEC 15948: signature, IHDR, IDAT, IEND).
PNG = base64.b64decode(
    "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8/5+hHgAHggJ/PchI7wAAAABJRU5ErkJggg=="
)


@pytest.fixture
def walk(store: Database, tmp_path: Path) -> dict[str, Any]:
    app = create_app(store, Settings(photo_dir=str(tmp_path / "photos")))
    admin = make_user(store, "photo-admin", Role.ADMIN)
    client = TestClient(app, headers=bearer(store, admin))
    site = make_site(client)
    trap = make_trap(client, site, tag="PH-1")
    survey = make_survey(client, site)
    return {"client": client, "site": site, "trap": trap, "survey": survey, "app": app}


def _save(walk: dict[str, Any], photo: bytes, name: str = "trap.png") -> Any:
    return walk["client"].post(
        f"/surveys/{walk['survey']['id']}/walk/traps/{walk['trap']['id']}",
        data={"condition": "blow_through", "method": "visual", "notes": "plume at the vent"},
        files={"photo": (name, photo, "image/png")},
        follow_redirects=False,
    )


def test_a_photo_taken_on_the_walk_is_kept_and_shown(walk: dict[str, Any], tmp_path: Path) -> None:
    assert _save(walk, PNG).status_code == 303
    kept = list((tmp_path / "photos").iterdir())
    assert [path.read_bytes() for path in kept] == [PNG]
    page = walk["client"].get(f"/traps/{walk['trap']['id']}").text
    photo_path = page.split('<a class="photo" href="', 1)[1].split('"', 1)[0]
    served = walk["client"].get(photo_path)
    assert served.content == PNG
    assert served.headers["content-type"] == "image/png"
    assert served.headers["cache-control"] == "private, max-age=86400"
    report = walk["client"].get(f"/sites/{walk['site']['id']}/report").text
    assert "Appendix: photos taken at the findings" in report
    assert photo_path in report


@pytest.mark.parametrize(
    ("photo", "message"),
    [
        (b"<svg onload=alert(1)>", "must be a JPEG, PNG or WebP"),
        (PNG + b"\x00" * MAX_PHOTO_BYTES, "larger than 8 MB"),
    ],
    ids=["not a picture", "too large"],
)
def test_a_refused_photo_keeps_the_form_and_stores_nothing(
    walk: dict[str, Any], tmp_path: Path, photo: bytes, message: str
) -> None:
    refused = _save(walk, photo, name="trap.png")  # the name and type claimed are not trusted
    assert refused.status_code == 422
    assert message in refused.text
    assert "plume at the vent" in refused.text
    findings = walk["client"].get(f"/api/v1/surveys/{walk['survey']['id']}/findings").json()
    assert findings["total"] == 0
    assert not (tmp_path / "photos").exists() or not any((tmp_path / "photos").iterdir())


def test_a_photo_is_served_only_to_those_who_may_read_its_site(
    store: Database, walk: dict[str, Any]
) -> None:
    _save(walk, PNG)
    page = walk["client"].get(f"/traps/{walk['trap']['id']}").text
    photo_path = page.split('<a class="photo" href="', 1)[1].split('"', 1)[0]
    other_site = make_site(walk["client"], name="Other Mill")
    outsider = make_user(store, "outsider", Role.MANAGER, site_ids=[other_site["id"]])
    with TestClient(walk["app"], headers=bearer(store, outsider)) as stranger:
        assert stranger.get(photo_path).status_code == 404
    assert TestClient(walk["app"]).get(photo_path, follow_redirects=False).status_code == 302
