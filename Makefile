# Two commands for a newcomer: `make demo` and `make test`. Both install into .venv first.
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed-stamp
PIP := $(BIN)/python -m pip

.PHONY: install test lint demo bench clean

$(STAMP): pyproject.toml
	$(PY) -m venv $(VENV)
	$(PIP) install --quiet --upgrade pip
	$(PIP) install --quiet -e ".[dev,postgres]"
	touch $(STAMP)

install: $(STAMP)

lint: install
	$(BIN)/ruff check registry tests benchmarks migrations
	$(BIN)/ruff format --check registry tests benchmarks migrations

test: install lint
	$(BIN)/pytest -p no:cacheprovider

demo: install
	PATH="$(CURDIR)/$(BIN):$$PATH" bash seed_demo/run_demo.sh

bench: install
	@for b in benchmarks/bench_*.py; do echo "== $$b"; $(BIN)/python $$b || exit 1; done

clean:
	rm -rf $(VENV) demo_out build *.egg-info
