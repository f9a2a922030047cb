"""Roll-ups kept while they hold: a summary is keyed by its site, survey and the site's
revision, which every write bumps (service/store/revisions.py), so a kept summary is
never stale. One cache belongs to one application; a page that compares with the survey
before takes that earlier roll-up from here instead of pricing it again."""

import threading
from collections import OrderedDict
from collections.abc import Callable
from typing import TypeVar

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.reports.pricing import SitePricing
from service.reports.schemas import SummaryOut
from service.reports.summary import SiteSummary, site_summary
from service.store.models import Site, Survey

Key = tuple[int, object, int, int]
V = TypeVar("V")


class RollupCache:
    """The last few summaries computed, by (site, when it was made, survey, revision),
    and each one's JSON as the API answers it, encoded once."""

    def __init__(self, size: int = 16) -> None:
        self._size = size
        self._kept: OrderedDict[Key, SiteSummary] = OrderedDict()
        self._encoded: OrderedDict[Key, bytes] = OrderedDict()
        self._lock = threading.Lock()

    @staticmethod
    def _key(session: Session, site: Site, survey: Survey) -> Key:
        revision = session.scalar(select(Site.revision).where(Site.id == site.id))
        return (site.id, site.created_at, survey.id, revision or 0)

    def _get(self, kept: "OrderedDict[Key, V]", key: Key, make: Callable[[], V]) -> V:
        with self._lock:
            found = kept.get(key)
            if found is not None:
                kept.move_to_end(key)
                return found
        made = make()
        with self._lock:
            kept[key] = made
            while len(kept) > self._size:
                kept.popitem(last=False)
        return made

    def summary(
        self, *, session: Session, site: Site, survey: Survey, pricing: SitePricing
    ) -> SiteSummary:
        return self._get(
            self._kept,
            self._key(session, site, survey),
            lambda: site_summary(session=session, site=site, survey=survey, pricing=pricing),
        )

    def summary_json(
        self, *, session: Session, site: Site, survey: Survey, pricing: SitePricing
    ) -> bytes:
        """The summary as the API's JSON (`SummaryOut`): at 100,000 traps some 24 MB,
        which took longer to build than the kept summary took to find."""
        return self._get(
            self._encoded,
            self._key(session, site, survey),
            lambda: (
                SummaryOut.of(
                    self.summary(session=session, site=site, survey=survey, pricing=pricing)
                )
                .model_dump_json()
                .encode()
            ),
        )
