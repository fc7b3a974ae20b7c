# Two commands set up everything on a fresh machine:
#   make demo   creates .venv, installs, serves the demo club at http://127.0.0.1:8000
#   make test   creates .venv, installs with the test extras, runs lint and the whole suite
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed
TEST_STAMP := $(VENV)/.installed-test

.PHONY: demo test lint bench serve clean

$(BIN)/python:
	$(PY) -m venv $(VENV)
	$(BIN)/pip install -q --upgrade pip

$(STAMP): pyproject.toml | $(BIN)/python
	$(BIN)/pip install -q -e .
	touch $@

$(TEST_STAMP): pyproject.toml | $(BIN)/python
	$(BIN)/pip install -q -e '.[test]'
	touch $@ $(STAMP)

demo: $(STAMP)
	$(BIN)/mastwatch demo

serve: $(STAMP)
	$(BIN)/mastwatch serve

lint: $(TEST_STAMP)
	$(BIN)/ruff check backend tests migrations
	$(BIN)/mypy

# pytest exits 5 when it collected no test: that is a failure of the suite here too.
test: $(TEST_STAMP) lint
	$(BIN)/python -m pytest

bench: $(TEST_STAMP)
	$(BIN)/python -m tests.bench

clean:
	rm -rf $(VENV) .pytest_cache .ruff_cache .mypy_cache .hypothesis artifacts
