# One-step set-up on a fresh machine with only python3.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin

.PHONY: run test test-quick bench clean

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

# Everything but the terminal-UI pilot tests (they take most of the full run's time).
test-quick: $(VENV)/.installed
	$(BIN)/python -m pytest -q --ignore-glob='tests/test_tui_*'

bench: $(VENV)/.installed
	for f in benchmarks/bench_*.py; do $(BIN)/python $$f; done

clean:
	rm -rf $(VENV) .pytest_cache build *.egg-info
