# towercost: set-up, demo, tests and benchmarks from nothing but Python and make.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: demo test bench report-check clean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip

$(STAMP): $(BIN)/python pyproject.toml
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(BIN)/towercost optimize scenarios/demo_absorber.toml

test: $(STAMP)
	$(BIN)/python -m pytest -q -rs models optimizer tests README.md

# The demo's HTML report in a real headless Chromium; its first screen saved to reports/ for a person to look at.
report-check: $(STAMP)
	$(BIN)/python tests/report_check.py

bench: $(STAMP)
	$(BIN)/python benchmarks/run.py

clean:
	rm -rf $(VENV) .pytest_cache build *.egg-info
