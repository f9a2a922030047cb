"""Roll-ups kept while they hold: a summary is keyed by its site, survey and the site's
revision, which every write bumps (service/store/revisions.py), so a kept summary is
never stale. One cache belongs to one application; a page that compares with the survey
before takes that earlier roll-up from here instead of pricing it again."""

import threading
from collections import OrderedDict

from sqlalchemy import select
from sqlalchemy.orm import Session

from service.reports.pricing import SitePricing
from service.reports.summary import SiteSummary, site_summary
from service.store.models import Site, Survey

Key = tuple[int, object, int, int]


class RollupCache:
    """The last few summaries computed, by (site, when it was made, survey, revision)."""

    def __init__(self, size: int = 16) -> None:
        self._size = size
        self._kept: OrderedDict[Key, SiteSummary] = OrderedDict()
        self._lock = threading.Lock()

    def summary(
        self, *, session: Session, site: Site, survey: Survey, pricing: SitePricing
    ) -> SiteSummary:
        revision = session.scalar(select(Site.revision).where(Site.id == site.id))
        key: Key = (site.id, site.created_at, survey.id, revision or 0)
        with self._lock:
            kept = self._kept.get(key)
            if kept is not None:
                self._kept.move_to_end(key)
                return kept
        computed = site_summary(session=session, site=site, survey=survey, pricing=pricing)
        with self._lock:
            self._kept[key] = computed
            while len(self._kept) > self._size:
                self._kept.popitem(last=False)
        return computed
