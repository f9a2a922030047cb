"""Fewer runs of Python's cycle collector while a large import builds its rows.

The collector looks at its youngest objects each time 700 more containers exist than
before (the default threshold); a 20,000-row import makes millions of small dicts and
lists, and with the older generations that brings on, collecting took about a quarter
of the import (1.27 s with, 0.93 s with 10,000: `bench import`). Within `fewer_collections`
the youngest generation waits for 10,000; nothing else changes, and the threshold is
put back when the last import running in the process ends.
"""

import gc
import threading
from collections.abc import Iterator
from contextlib import contextmanager

YOUNG_OBJECTS_DURING_IMPORT = 10_000


class _Threshold:
    """The collector's threshold, raised while any holder needs it raised."""

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self._holders = 0
        self._saved = gc.get_threshold()

    @contextmanager
    def raised(self) -> Iterator[None]:
        with self._lock:
            if self._holders == 0:
                self._saved = gc.get_threshold()
                gc.set_threshold(YOUNG_OBJECTS_DURING_IMPORT, *self._saved[1:])
            self._holders += 1
        try:
            yield
        finally:
            with self._lock:
                self._holders -= 1
                if self._holders == 0:
                    gc.set_threshold(*self._saved)


_THRESHOLD = _Threshold()


# `with fewer_collections():`, or `@fewer_collections()` on a function.
fewer_collections = _THRESHOLD.raised
