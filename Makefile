# One entry for each everyday job. `make demo` and `make test` are the two a newcomer needs;
# both create the virtual environment in .venv and install the project into it first.
VENV ?= .venv
BIN := $(VENV)/bin
HOST ?= 127.0.0.1
PORT ?= 8000

.PHONY: install demo serve test check lint fix bench clean

$(BIN)/.installed: pyproject.toml
	python3 -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet --editable '.[dev]'
	touch $@

install: $(BIN)/.installed

demo: install
	$(BIN)/traptally serve --demo --host $(HOST) --port $(PORT)

serve: install
	$(BIN)/traptally serve --host $(HOST) --port $(PORT)

lint: install
	$(BIN)/ruff check .
	$(BIN)/ruff format --check .
	$(BIN)/mypy service tests

# The whole suite, with the coverage floor, on every core: what CI runs.
test: lint
	$(BIN)/pytest -n auto --cov=service --cov-report=term-missing:skip-covered --cov-fail-under=90

# The everyday run: no browser, load, fuzzing or PostgreSQL tests, no coverage (under a minute).
check: lint
	$(BIN)/pytest -q -n auto -m "not slow and not browser and not load and not postgres"

fix: install
	$(BIN)/ruff check --fix .
	$(BIN)/ruff format .

bench: install
	$(BIN)/python -m bench.run

clean:
	rm -rf $(VENV) .pytest_cache .mypy_cache .ruff_cache .coverage
