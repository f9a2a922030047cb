"""Photos of findings: checked by their first bytes (never by the name or type a browser
claims), limited in size, and written to the photo folder under a random name.

Accepted: JPEG, PNG and WebP, the formats a tablet's camera and every browser share."""

import secrets
from pathlib import Path

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.store.errors import FieldError
from service.store.models import Area, Finding, FindingPhoto, Trap
from service.store.register import ROUTE_ORDER

MAX_PHOTO_BYTES = 8 * 1024 * 1024  # a tablet camera's JPEG is 2-5 MB


def photo_kind(content: bytes) -> tuple[str, str]:
    """(content type, file suffix) of a photo, told by its first bytes; FieldError on
    `photo` for anything else.

    >>> photo_kind(bytes.fromhex("ffd8ffe0") + b"...")
    ('image/jpeg', '.jpg')
    """
    if content.startswith(b"\xff\xd8\xff"):
        return "image/jpeg", ".jpg"
    if content.startswith(b"\x89PNG\r\n\x1a\n"):
        return "image/png", ".png"
    if content[:4] == b"RIFF" and content[8:12] == b"WEBP":
        return "image/webp", ".webp"
    raise FieldError("photo", "the photo must be a JPEG, PNG or WebP picture")


def check_photo(content: bytes) -> tuple[str, str]:
    """(content type, file suffix) of an acceptable photo; FieldError on `photo` if it is
    too large or not a picture. Check before writing anything, so a refused photo leaves
    no finding behind."""
    if len(content) > MAX_PHOTO_BYTES:
        raise FieldError("photo", f"the photo is larger than {MAX_PHOTO_BYTES // 2**20} MB")
    return photo_kind(content)


def store_photo(
    *, session: Session, folder: Path, finding: Finding, content: bytes
) -> FindingPhoto:
    """Check a photo, write it to `folder`, and record it against the finding."""
    content_type, suffix = check_photo(content)
    folder.mkdir(parents=True, exist_ok=True)
    stored_name = secrets.token_hex(16) + suffix
    (folder / stored_name).write_bytes(content)
    trap = session.get_one(Trap, finding.trap_id)
    photo = FindingPhoto(
        site_id=trap.site_id,
        finding_id=finding.id,
        stored_name=stored_name,
        content_type=content_type,
        size_bytes=len(content),
    )
    session.add(photo)
    session.flush()
    return photo


def photos_of(*, session: Session, finding_ids: list[int]) -> dict[int, list[FindingPhoto]]:
    """Each finding's photos, oldest first."""
    found: dict[int, list[FindingPhoto]] = {}
    query = (
        select(FindingPhoto)
        .where(FindingPhoto.finding_id.in_(finding_ids))
        .order_by(FindingPhoto.id)
    )
    for photo in session.scalars(query):
        found.setdefault(photo.finding_id, []).append(photo)
    return found


def survey_photos(*, session: Session, survey_id: int) -> list[tuple[FindingPhoto, Finding, str]]:
    """The photos of a survey's findings with each finding and its trap's tag, in route
    order: a report's appendix."""
    query = (
        select(FindingPhoto, Finding, Trap.tag)
        .join(Finding, Finding.id == FindingPhoto.finding_id)
        .join(Trap, Trap.id == Finding.trap_id)
        .outerjoin(Area, Area.id == Trap.area_id)
        .where(Finding.survey_id == survey_id)
        .order_by(*ROUTE_ORDER, Finding.tested_at, FindingPhoto.id)
    )
    return [(photo, finding, tag) for photo, finding, tag in session.execute(query)]
