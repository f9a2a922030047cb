"""Failed sign-ins are counted per account and per client address in a moving window
(the `limits` library, in this process's memory). Past the limit, sign-in answers 429
until the oldest failure leaves the window: the real user waits minutes, never forever.
A successful sign-in clears the account's count.
"""

import time
from dataclasses import dataclass, field

from limits import RateLimitItem, parse
from limits.storage import MemoryStorage
from limits.strategies import MovingWindowRateLimiter


@dataclass
class SignInLimiter:
    """`per_account` and `per_address` in the limits notation, e.g. "5/15 minutes"."""

    per_account: str
    per_address: str
    _limiter: MovingWindowRateLimiter = field(
        default_factory=lambda: MovingWindowRateLimiter(MemoryStorage())
    )

    def _rules(self, account: str, address: str) -> list[tuple[RateLimitItem, str, str]]:
        return [
            (parse(self.per_account), "account", account.lower()),
            (parse(self.per_address), "address", address),
        ]

    def wait_seconds(self, account: str, address: str) -> int:
        """0 when a sign-in may be tried now, else the seconds until one may."""
        waits = [
            self._limiter.get_window_stats(rule, kind, key).reset_time - time.time()
            for rule, kind, key in self._rules(account, address)
            if not self._limiter.test(rule, kind, key)
        ]
        return max(1, round(max(waits))) if waits else 0

    def failed(self, account: str, address: str) -> None:
        for rule, kind, key in self._rules(account, address):
            self._limiter.hit(rule, kind, key)

    def succeeded(self, account: str) -> None:
        rule, kind, key = self._rules(account, "")[0]
        self._limiter.clear(rule, kind, key)
