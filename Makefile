# towercost: set-up, demo, tests and benchmarks from nothing but Python and make.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: demo test fuzz bench report-check clean

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

# At least 10^4 hostile inputs (corrupted demos, generated scenarios, bad command arguments); the last
# line gives the count and the time. `make test` runs a few hundred of the same cases.
fuzz: $(STAMP)
	TOWERCOST_FUZZ=full $(BIN)/python -m pytest -q -s -p no:cacheprovider tests/test_fuzz.py

bench: $(STAMP)
	$(BIN)/python benchmarks/run.py

clean:
	rm -rf $(VENV) .pytest_cache build *.egg-info
