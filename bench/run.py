"""Traptally's benchmarks: prints figures, asserts nothing. `make bench` runs them all.

    python -m bench.run                 # every benchmark
    python -m bench.run physics api     # only those named

Each figure that is a comparison is measured side by side in the same run.
"""

import argparse
import sys
import time
from collections.abc import Callable
from pathlib import Path

from bench import api_load, pages, physics, reliability, scale, viewers, walk, workers

BENCHMARKS: dict[str, Callable[[Path], None]] = {
    "physics": lambda tmp: physics.run(),
    "api": api_load.run,
    "import": scale.run_import,
    "scale": scale.run,
    "writers": scale.run_writers,
    "pages": pages.run,
    "walk": walk.run,
    "viewers": viewers.run,
    "workers": workers.run,
    "reliability": reliability.run,
}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("names", nargs="*", help=f"which to run: {', '.join(BENCHMARKS)}")
    arguments = parser.parse_args()
    unknown = set(arguments.names) - set(BENCHMARKS)
    if unknown:
        parser.error(f"unknown benchmarks: {', '.join(sorted(unknown))}")
    out = Path(__file__).resolve().parent / "out"
    out.mkdir(exist_ok=True)
    print(f"python {sys.version.split()[0]}, {time.strftime('%Y-%m-%d %H:%M')}")
    for name in arguments.names or BENCHMARKS:
        BENCHMARKS[name](out)


if __name__ == "__main__":
    main()
