"""Who is signed in, and the CSRF token a script needs to change anything under the
session cookie (the survey walk's outbox fetches it afresh before it sends)."""

from fastapi import APIRouter
from pydantic import BaseModel, Field

from service.store.models import Role
from service.web.access import Reading, masked_csrf_token

router = APIRouter(tags=["session"])


class SessionOut(BaseModel):
    user: str
    role: Role
    csrf_token: str | None = Field(
        description="For X-CSRF-Token or a form's csrf_token; null when signed in by a token"
    )


@router.get("/session", summary="Who is signed in, and a CSRF token for the session")
def current_session(viewer: Reading) -> SessionOut:
    token = masked_csrf_token(viewer.csrf_token) if viewer.csrf_token is not None else None
    return SessionOut(user=viewer.name, role=viewer.role, csrf_token=token)
