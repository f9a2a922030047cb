"""Secrets handed to a browser or an integration. Only their SHA-256 is stored: a secret
of 256 random bits needs no slow hash, and a copy of the database opens no session."""

import hashlib
import secrets


def new_secret() -> str:
    """A fresh 256-bit secret, URL-safe text."""
    return secrets.token_urlsafe(32)


def digest(secret: str) -> str:
    """The SHA-256 of a secret, in hex: what the database keeps.

    >>> len(digest("anything"))
    64
    """
    return hashlib.sha256(secret.encode("utf-8", "surrogatepass")).hexdigest()
