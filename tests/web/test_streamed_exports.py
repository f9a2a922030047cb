"""Exports are sent as their rows are read: in chunks, with no length known before."""

from fastapi.testclient import TestClient

from service.store.csv_format import csv_chunks, write_table
from tests.factories import make_site, make_trap


def test_rows_come_in_chunks_that_join_to_the_whole_file() -> None:
    rows: list[list[object]] = [[f"T-{number}", number * 1.5, "=1+1"] for number in range(2_500)]
    chunks = list(csv_chunks(["tag", "figure", "notes"], iter(rows), rows_per_chunk=1000))
    assert len(chunks) == 3
    assert "".join(chunks) == write_table(["tag", "figure", "notes"], rows)
    assert chunks[1].count("\r\n") == 1000


def test_the_register_export_is_streamed_and_complete(api: TestClient) -> None:
    site = make_site(api)
    for number in range(5):
        make_trap(api, site, tag=f"S-{number}")
    answer = api.get(f"/api/v1/sites/{site['id']}/exports/register.csv")
    assert answer.status_code == 200
    assert "content-length" not in answer.headers  # streamed: its length was not known
    assert answer.headers["content-disposition"] == 'attachment; filename="register.csv"'
    lines = answer.text.splitlines()
    assert lines[0].startswith("tag,")
    assert sorted(line.split(",")[0] for line in lines[1:]) == [f"S-{n}" for n in range(5)]


def test_a_reader_without_the_site_is_refused_before_anything_is_sent(
    api: TestClient,
) -> None:
    answer = api.get("/api/v1/sites/999999/exports/register.csv")
    assert answer.status_code == 404
