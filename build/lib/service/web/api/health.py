"""Is the service up, and which version is it."""

from fastapi import APIRouter
from pydantic import BaseModel

from service import __version__

router = APIRouter(tags=["health"])


class HealthOut(BaseModel):
    status: str
    version: str


@router.get("/health", summary="Liveness and version")
def health() -> HealthOut:
    return HealthOut(status="ok", version=__version__)
