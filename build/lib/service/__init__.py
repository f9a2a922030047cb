"""Traptally: prices a steam-trap survey in steam, fuel, money and CO2."""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("traptally")
except PackageNotFoundError:  # running from a checkout that was never installed
    __version__ = "0.0.0"
