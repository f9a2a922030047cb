"""The folders that ship inside the package: the page templates, the static files and
the demo plant's seed data.

They stay at the top of the checkout (templates/, static/, seed_data/) and are mapped
into the package by pyproject.toml, so an installed wheel and an editable install find
them the same way: through the import system, never by walking up from this file.
"""

import importlib.util
from pathlib import Path


def shipped_folder(package: str) -> Path:
    """The folder of a data package such as `service.templates`.

    >>> (shipped_folder("service.templates") / "base.html").is_file()
    True
    """
    spec = importlib.util.find_spec(package)
    if spec is None or not spec.submodule_search_locations:
        raise LookupError(f"{package} is not installed with the program")
    return Path(next(iter(spec.submodule_search_locations)))


TEMPLATES = shipped_folder("service.templates")
STATIC = shipped_folder("service.static")
SEED_DATA = shipped_folder("service.seed_data")
