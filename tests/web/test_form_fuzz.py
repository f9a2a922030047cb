"""hypothesis on the finding, trap and settings forms: random text, huge numbers, NUL
bytes and numbers with units typed into any one field. The answer is a page (never a
server error); when it refuses, it says why, shows what was typed, and nothing is written."""

from html.parser import HTMLParser
from typing import Any

import pytest
from fastapi.testclient import TestClient
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from sqlalchemy import select

from service.store.database import Database
from service.store.demo import load_demo
from service.store.models import Role, Site
from service.web.app import create_app
from tests.conftest import emptied
from tests.factories import bearer, make_user

NASTY = st.one_of(
    st.text(max_size=60),
    st.text(alphabet=st.characters(codec="utf-8"), max_size=20).map(lambda text: text + "\x00"),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(min_value=-(10**30), max_value=10**30).map(str),
    st.sampled_from(["1e308", "-1e308", "9" * 400, "350 psi", "12 bar", "180 °C", "1,2,3", "０"]),
)


class _FormReader(HTMLParser):
    """The fields of the page's first POST form, with the values the page put in them."""

    def __init__(self, action: str) -> None:
        super().__init__()
        self.action, self._inside, self._text_of = action, False, ""
        self.fields: dict[str, str] = {}
        self.typed_fields: set[str] = set()  # where a person types free text

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        found = {key: value or "" for key, value in attrs}
        if tag == "form":
            self._inside = found.get("action") == self.action
        if tag == "option" and "selected" in found and self._text_of:
            self.fields[self._text_of] = found.get("value", "")
        if not self._inside or "name" not in found:
            return
        if tag == "input" and found.get("type") == "file":
            return  # a photo is no typed text: tests/web/test_photos.py sends files
        if tag == "input" and found.get("type") in {"radio", "checkbox"}:
            if "checked" in found:
                self.fields[found["name"]] = found.get("value", "on")
        elif tag == "input":
            self.fields[found["name"]] = found.get("value", "")
            if found.get("type") != "hidden":
                self.typed_fields.add(found["name"])
        elif tag in {"select", "textarea"}:
            if tag == "textarea":
                self.typed_fields.add(found["name"])
            self._text_of = found["name"]
            self.fields.setdefault(found["name"], "")

    def handle_data(self, data: str) -> None:
        if self._text_of in self.typed_fields:  # inside a textarea
            self.fields[self._text_of] += data

    def handle_endtag(self, tag: str) -> None:
        if tag == "form":
            self._inside = False
        if tag in {"select", "textarea"}:
            self._text_of = ""


def form_fields(page: str, action: str) -> tuple[dict[str, str], set[str]]:
    """The form's fields and values, and which of them take typed text."""
    reader = _FormReader(action)
    reader.feed(page)
    assert reader.fields, f"no form posting to {action}"
    return reader.fields, reader.typed_fields


@pytest.fixture(scope="module")
def plant(sqlite_database: Database) -> Any:
    emptied(sqlite_database)
    with sqlite_database.writing() as session:
        load_demo(session=session)
    headers = bearer(sqlite_database, make_user(sqlite_database, "fuzzer", Role.ADMIN))
    with TestClient(create_app(sqlite_database), headers=headers) as client:
        # The demo's rounds are closed: open the one fuzzed, so that a clean entry is stored.
        assert client.patch("/api/v1/surveys/2", json={"status": "in_progress"}).is_success
        yield client, sqlite_database
    emptied(sqlite_database)


def _revision(database: Database) -> int:
    with database.reading() as session:
        return session.scalars(select(Site.revision)).one()


FORMS = {
    "finding": ("/surveys/2/walk/traps/5", "/surveys/2/walk/traps/5"),
    "trap": ("/surveys/2/walk/new-trap", "/surveys/2/walk/new-trap"),
    "settings": ("/sites/1/settings", "/sites/1/settings"),
}
NOT_TYPED = {"csrf_token", "idempotency_key", "opened_at"}
# The new-trap form opens blank: these make it valid, so that one bad field is the only fault.
VALID_TRAP = {"orifice_diameter": "4", "inlet_pressure": "1000", "return_pressure": "0"}
CASES = {"finding": 0, "trap": 0, "settings": 0}


@pytest.mark.parametrize("form", sorted(FORMS))
@settings(max_examples=60, deadline=None, suppress_health_check=list(HealthCheck))
@given(data=st.data())
def test_anything_typed_into_a_form_field_is_refused_clearly_or_stored_whole(
    plant: Any, form: str, data: st.DataObject
) -> None:
    client, database = plant
    page_path, action = FORMS[form]
    fields, typed_fields = form_fields(client.get(page_path).text, action)
    if form == "trap":
        fields |= {**VALID_TRAP, "tag": f"FZ-{CASES['trap']:04d}"}
    name = data.draw(st.sampled_from(sorted(set(fields) - NOT_TYPED)), label="field")
    typed = data.draw(NASTY, label="typed")
    before = _revision(database)
    answer = client.post(action, data={**fields, name: typed}, follow_redirects=False)
    CASES[form] += 1
    assert answer.status_code in {303, 422}, (name, typed, answer.status_code)
    if answer.status_code == 303:
        return  # accepted and stored: the value was a valid one
    assert _revision(database) == before, "a refused form wrote something"
    assert 'class="error"' in answer.text
    keeps = name in typed_fields and "\x00" not in typed
    if keeps:
        kept, _ = form_fields(answer.text, action)
        assert kept[name].split() == typed.split(), (name, typed, kept[name])
