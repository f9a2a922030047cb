"""Failed sign-ins are counted per account (the name tried) and per client address in a
moving window, in the database, so every worker process of the server counts the same.
Past the limit, sign-in answers 429 until the oldest failure in the window leaves it:
the real user waits minutes, never forever. A successful sign-in clears the account's
count. Limits are written in the `limits` library's notation ("5/15 minutes")."""

import datetime as dt
from dataclasses import dataclass

from limits import RateLimitItem, parse
from sqlalchemy import delete, select
from sqlalchemy.orm import Session

from service.store.models import SignInFailure

ACCOUNT, ADDRESS = "account", "address"
KEY_CHARACTERS = 200  # the column's width: a longer name tried is counted by its start


def _key(text: str) -> str:
    return text.lower()[:KEY_CHARACTERS]


@dataclass(frozen=True, slots=True)
class SignInLimits:
    per_account: RateLimitItem
    per_address: RateLimitItem

    @classmethod
    def of(cls, per_account: str, per_address: str) -> "SignInLimits":
        """From the notation of the settings, e.g. "5/15 minutes".

        >>> SignInLimits.of("5/15 minutes", "30/15 minutes").per_account.get_expiry()
        900
        """
        return cls(parse(per_account), parse(per_address))

    def _rules(self, account: str, address: str) -> list[tuple[RateLimitItem, str, str]]:
        return [
            (self.per_account, ACCOUNT, _key(account)),
            (self.per_address, ADDRESS, _key(address)),
        ]

    def wait_seconds(
        self, session: Session, *, account: str, address: str, now: dt.datetime
    ) -> int:
        """0 when a sign-in may be tried now, else the whole seconds until one may."""
        waits = []
        for rule, kind, key in self._rules(account, address):
            window = dt.timedelta(seconds=rule.get_expiry())
            recent = session.scalars(
                select(SignInFailure.at)
                .where(SignInFailure.kind == kind, SignInFailure.key == key)
                .where(SignInFailure.at > now - window)
                .order_by(SignInFailure.at.desc())
                .limit(rule.amount)
            ).all()
            if len(recent) >= rule.amount:
                waits.append((recent[-1] + window - now).total_seconds())
        return max(1, round(max(waits))) if waits else 0

    def failed(self, session: Session, *, account: str, address: str, now: dt.datetime) -> None:
        """Count a failure against both; forget the key's failures the window has passed."""
        for rule, kind, key in self._rules(account, address):
            window = dt.timedelta(seconds=rule.get_expiry())
            session.execute(
                delete(SignInFailure).where(
                    SignInFailure.kind == kind,
                    SignInFailure.key == key,
                    SignInFailure.at <= now - window,
                )
            )
            session.add(SignInFailure(kind=kind, key=key, at=now))
        session.flush()

    def succeeded(self, session: Session, *, account: str) -> None:
        session.execute(
            delete(SignInFailure).where(
                SignInFailure.kind == ACCOUNT, SignInFailure.key == _key(account)
            )
        )
