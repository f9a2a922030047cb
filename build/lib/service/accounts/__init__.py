"""Accounts: the people who sign in, what their roles permit, their sessions and tokens."""
