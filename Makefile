# sawplan — two commands on a fresh machine: `make demo` and `make test`.
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed
TEST_STAMP := $(VENV)/.installed-test

.PHONY: demo test lint bench clean

$(BIN)/python:
	$(PY) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip

$(STAMP): pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install --quiet -e .
	touch $@

$(TEST_STAMP): pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $(STAMP) $@

demo: $(STAMP)
	$(BIN)/python demo/run_demo.py

test: $(TEST_STAMP)
	$(BIN)/python -m pytest

lint: $(TEST_STAMP)
	$(BIN)/ruff check sawplan tests bench demo
	$(BIN)/ruff format --check sawplan tests bench demo

bench: $(TEST_STAMP)
	for f in bench/bench_*.py; do echo "== $$f"; $(BIN)/python $$f || exit 1; done

clean:
	rm -rf $(VENV) build dist *.egg-info .pytest_cache demo/out
