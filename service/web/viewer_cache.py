"""Who a bearer token signs in, kept a few seconds in the process, so that the API's
requests need not read the token, its user and the user's sites every time.

A write in this process that touched a user or a token (a revoke, a disable, a password,
role or sites change) sets every kept viewer aside the moment it commits
(`store.access_changes`). Another worker process keeps its own: a token revoked there is
refused here within `seconds` (five by default), as the README says. Browser sessions
are not kept: their idle timeout is checked, and touched, on every request.
"""

import threading
import time
from typing import Generic, TypeVar

from service.accounts.credentials import digest
from service.store.access_changes import AccessChanges

V = TypeVar("V")


class ViewerCache(Generic[V]):
    """Token digest -> (when kept, access generation, viewer); at most `size` tokens."""

    def __init__(self, changes: AccessChanges, seconds: float = 5.0, size: int = 10_000) -> None:
        self._changes = changes
        self._seconds = seconds
        self._size = size
        self._kept: dict[str, tuple[float, int, V]] = {}
        self._lock = threading.Lock()

    def get(self, secret: str) -> V | None:
        """The viewer kept for the token, unless older than `seconds` or than the last
        change to access."""
        with self._lock:
            kept = self._kept.get(digest(secret))
        if kept is None:
            return None
        kept_at, generation, viewer = kept
        if generation != self._changes.generation or time.monotonic() - kept_at > self._seconds:
            return None
        return viewer

    def keep(self, secret: str, generation: int, viewer: V) -> None:
        """Keep the viewer read while access was at `generation` (read before the lookup,
        so a change committed meanwhile leaves it already stale)."""
        with self._lock:
            if len(self._kept) >= self._size:
                self._kept.clear()
            self._kept[digest(secret)] = (time.monotonic(), generation, viewer)
