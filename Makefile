# Two commands on a fresh machine: `make run` and `make test`.
# `make run` installs only what running needs; `make test` adds the test extras.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
RUN_STAMP  := $(VENV)/.installed-run
TEST_STAMP := $(VENV)/.installed-test
SCENARIO ?=
PIP    := $(BIN)/pip install --progress-bar on

.PHONY: run test setup bench clean

$(BIN)/python:
	@echo "== creating $(VENV) with $(PYTHON)"
	$(PYTHON) -m venv $(VENV)
	$(PIP) --upgrade pip

$(RUN_STAMP): pyproject.toml | $(BIN)/python
	@echo "== installing heatload and what it needs to run (numpy, scipy, pandas, pint,"
	@echo "   CoolProp, plotly, dash ...); the first time takes a few minutes"
	$(PIP) -e .
	touch $@

$(TEST_STAMP): $(RUN_STAMP) pyproject.toml
	@echo "== adding the test extras (pytest, hypothesis, fluids, ht, dash[testing], bandit)"
	$(PIP) -e ".[test]"
	touch $@

setup: $(TEST_STAMP)

run: $(RUN_STAMP)
	$(BIN)/heatload compare $(SCENARIO)

test: $(TEST_STAMP)
	$(BIN)/python -m pytest -q --cov=heatload --cov-report=term:skip-covered

bench: $(RUN_STAMP)
	for f in benchmarks/bench_*.py; do $(BIN)/python $$f || exit 1; done

clean:
	rm -rf $(VENV) .pytest_cache .hypothesis .coverage test-output
