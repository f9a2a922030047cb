"""Benchmarks that print figures; `make bench` runs them (python -m bench.run)."""
