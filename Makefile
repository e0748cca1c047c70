# sawplan — two commands on a fresh machine: `make demo` and `make test`.
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed
TEST_STAMP := $(VENV)/.installed-test

.PHONY: demo test lint bench clean browser postgres readme

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

test: $(TEST_STAMP) browser postgres
	$(BIN)/python -m pytest

# The job-sheet test prints through headless Chromium (Debian's package). Install
# it when missing and we may; otherwise that one test skips and says why.
browser:
	@command -v chromium >/dev/null 2>&1 || { \
	  if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	    echo "installing chromium for the job-sheet test (Debian package)"; \
	    (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null) \
	      || echo "chromium could not be installed: the browser test will be skipped"; \
	  else echo "chromium not installed: the browser test will be skipped"; fi; }

# The blade-log tests run on PostgreSQL too: on the server at 127.0.0.1:5432 when one
# answers, else on a private one the tests start from Debian's postgresql binaries.
# Install those when neither is there and we may; otherwise those tests skip and say why.
postgres:
	@ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 \
	  || $(PY) -c "import socket; socket.create_connection(('127.0.0.1', 5432), 2)" 2>/dev/null \
	  || { if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	    echo "installing postgresql for the blade-log tests (Debian package)"; \
	    (apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null) \
	      || echo "postgresql could not be installed: the PostgreSQL tests will be skipped"; \
	  else echo "no PostgreSQL server or binaries: the PostgreSQL tests will be skipped"; fi; }

lint: $(TEST_STAMP)
	$(BIN)/ruff check sawplan tests bench demo
	$(BIN)/ruff format --check sawplan tests bench demo

# regenerate the README tour from the demo shop (tests/test_readme.py checks it)
readme: $(STAMP)
	$(BIN)/python demo/make_readme.py

bench: $(TEST_STAMP)
	for f in bench/bench_*.py; do echo "== $$f"; $(BIN)/python $$f || exit 1; done

clean:
	rm -rf $(VENV) build dist *.egg-info .pytest_cache demo/out
