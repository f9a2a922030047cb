"""Passwords: a policy, and Argon2id hashes through argon2-cffi.

Parameters: Argon2id, m = 19,456 KiB, t = 2, p = 1 -- the first option of the OWASP Password
Storage Cheat Sheet. Policy after NIST SP 800-63B section 5.1.1.2: at least 8 characters, up to
128, no composition rules, and not one of the common passwords shipped in
`common_passwords.txt`, nor the account's own name.
"""

from functools import lru_cache
from importlib.resources import files

from argon2 import PasswordHasher, Type
from argon2.exceptions import InvalidHashError, VerificationError

MIN_PASSWORD_LENGTH = 8
MAX_PASSWORD_LENGTH = 128

_HASHER = PasswordHasher(time_cost=2, memory_cost=19_456, parallelism=1, type=Type.ID)


@lru_cache(maxsize=1)
def common_passwords() -> frozenset[str]:
    """The shipped list of common passwords, in lower case."""
    text = (files("service.accounts") / "common_passwords.txt").read_text(encoding="utf-8")
    return frozenset(
        line.strip().lower() for line in text.splitlines() if line and not line.startswith("#")
    )


def password_problem(password: str, user_name: str) -> str | None:
    """Why `password` may not be used, in a sentence; None when it may.

    >>> password_problem("short", "ana")
    'A password needs at least 8 characters.'
    >>> password_problem("Password1", "ana")
    'That password is on the list of common passwords; choose another.'
    >>> password_problem("condensate return line 4", "ana") is None
    True
    """
    if len(password) < MIN_PASSWORD_LENGTH:
        return f"A password needs at least {MIN_PASSWORD_LENGTH} characters."
    if len(password) > MAX_PASSWORD_LENGTH:
        return f"A password may have at most {MAX_PASSWORD_LENGTH} characters."
    if "\x00" in password:
        return "A password may not hold a NUL character."
    if password.lower() in common_passwords() or password.lower() == user_name.lower():
        return "That password is on the list of common passwords; choose another."
    return None


def hash_password(password: str) -> str:
    """An Argon2id hash in PHC string form (parameters and salt included)."""
    return _HASHER.hash(password)


def password_matches(stored_hash: str, password: str) -> bool:
    """Whether `password` is the one hashed in `stored_hash`."""
    try:
        return _HASHER.verify(stored_hash, password)
    except (VerificationError, InvalidHashError):
        return False


@lru_cache(maxsize=1)
def _no_such_account() -> str:
    """A hash made on the first sign-in with an unknown name, not at every start-up."""
    return _HASHER.hash("no account has this name")


def spend_time_as_if_checking(password: str) -> None:
    """Verify against a hash no one has, so that a wrong name takes as long to refuse as a
    wrong password."""
    password_matches(_no_such_account(), password)
