# Two commands on a fresh machine: `make run` and `make test`.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed
SCENARIO ?=

.PHONY: run test setup bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e ".[test]"
	touch $(STAMP)

setup: $(STAMP)

run: $(STAMP)
	$(BIN)/heatload compare $(SCENARIO)

test: $(STAMP)
	$(BIN)/python -m pytest -q --cov=heatload --cov-report=term:skip-covered

bench: $(STAMP)
	for f in benchmarks/bench_*.py; do $(BIN)/python $$f || exit 1; done

clean:
	rm -rf $(VENV) .pytest_cache .hypothesis .coverage test-output
