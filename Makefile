# One-step set-up on a fresh machine with only python3.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin

.PHONY: run test bench clean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip

$(VENV)/.installed: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $@

run: $(VENV)/.installed
	$(BIN)/camwright presets/tray-lidder.toml

test: $(VENV)/.installed
	$(BIN)/python -m pytest

bench: $(VENV)/.installed
	for f in benchmarks/bench_*.py; do $(BIN)/python $$f; done

clean:
	rm -rf $(VENV) .pytest_cache build *.egg-info
