# Every target sets up its own virtual environment from the pinned constraints first.
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed-stamp
SRC := core service tests scripts bench

.PHONY: serve test lint fuzz bench load soak openapi clean

$(STAMP): pyproject.toml constraints.txt
	$(PY) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --disable-pip-version-check --upgrade pip
	$(BIN)/python -m pip install --quiet --disable-pip-version-check -c constraints.txt -e '.[test]'
	touch $(STAMP)

serve: $(STAMP)  ## run the service on 127.0.0.1:8000 (GEARWORK_HOST / _PORT / _WORKERS)
	$(BIN)/gearwork serve

lint: $(STAMP)
	$(BIN)/ruff check $(SRC)
	$(BIN)/ruff format --check $(SRC)
	$(BIN)/mypy

test: lint  ## lint, type-check and run the whole test suite (installs Chromium and poppler if missing)
	timeout 900 bash scripts/setup_browser.sh || echo "browser setup failed: the e2e tests will skip"
	timeout 600 bash scripts/setup_pdf_tools.sh || echo "poppler setup failed: the PDF picture tests will skip"
	$(BIN)/python -m pytest

fuzz: $(STAMP)  ## long schemathesis run over every endpoint
	GEARWORK_FUZZ_EXAMPLES=$${EXAMPLES:-2000} $(BIN)/python -m pytest -p no:cacheprovider \
		tests/service/test_schema_fuzz.py tests/core/test_properties.py \
		tests/core/converter/test_drive.py

bench: $(STAMP)  ## benchmarks: core timings and served throughput against /healthz
	command -v wrk >/dev/null || (apt-get update -qq && apt-get install -y -qq wrk)
	$(BIN)/python -m bench.acceleration_run
	$(BIN)/python -m bench.final_drive_sweep
	$(BIN)/python -m bench.charts
	$(BIN)/python -m bench.sheets
	$(BIN)/python -m bench.log_analysis
	$(BIN)/python -m bench.imports
	$(BIN)/python -m bench.shift_plan
	$(BIN)/python -m bench.growth
	$(BIN)/python -m bench.worst_case
	$(BIN)/python -m bench.saturation
	$(BIN)/python -m bench.load
	$(BIN)/python -m bench.batch --runs $${BATCH_RUNS:-10000}

load: $(STAMP)  ## 64 connections for 60 s on every endpoint, one worker then two (wrk)
	command -v wrk >/dev/null || (apt-get update -qq && apt-get install -y -qq wrk)
	$(BIN)/python -m bench.load --seconds 60 --connections 64 --workers 1,2

soak: $(STAMP)  ## 100k requests on every endpoint; resident memory growth once warm
	command -v wrk >/dev/null || (apt-get update -qq && apt-get install -y -qq wrk)
	$(BIN)/python -m bench.load --soak 100000 --connections 16 --workers 1

openapi: $(STAMP)  ## rewrite openapi/openapi.json from the app
	$(BIN)/python -m scripts.write_openapi

clean:
	rm -rf $(VENV) .pytest_cache .mypy_cache .ruff_cache .hypothesis
