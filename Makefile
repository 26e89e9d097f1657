# Two commands do all set-up on a fresh machine: `make demo` and `make test`.
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin

.PHONY: demo test lint bench coverage notebooks sweeps clean

$(BIN)/python:
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install -q --upgrade pip

# Stamp files re-run the install when pyproject.toml changes.
$(VENV)/.installed: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install -q -e .
	touch $@

$(VENV)/.installed-test: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install -q -e ".[test]"
	touch $@ $(VENV)/.installed

demo: $(VENV)/.installed
	$(BIN)/cruiseplan airframes
	$(BIN)/cruiseplan table demo-trainer --altitudes 0:8000ft:2000ft --power 55,65,75 --isa-dev 10 --units aviation
	$(BIN)/cruiseplan table demo-survey-drone --altitudes 0:300m:100m --speeds 14:26m/s:4m/s --units si
	$(BIN)/cruiseplan plan demo-cross-country

lint: $(VENV)/.installed-test
	$(BIN)/ruff check cruiseplan tests benchmarks

# Two test processes (pytest-xdist): the suite's tests are independent of one another.
test: lint
	$(BIN)/python -m pytest -n 2

# Line coverage of the package over the suite (the packaging test left out: it runs an
# installed copy, which coverage does not follow).
coverage: $(VENV)/.installed-test
	$(BIN)/python -m pytest -q -m "not packaging" --cov=cruiseplan --cov-report=term

bench: $(VENV)/.installed-test
	$(BIN)/python benchmarks/run.py

$(VENV)/.installed-notebooks: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install -q -e ".[notebooks]"
	touch $@ $(VENV)/.installed

$(VENV)/.installed-sweeps: pyproject.toml | $(BIN)/python
	$(BIN)/python -m pip install -q -e ".[sweeps]"
	touch $@ $(VENV)/.installed

# Installs the sweeps extra (dask, distributed, xarray, zarr) and runs the demo study into
# out/ (completing it if an earlier run was interrupted).
SWEEP_OUT := out/demo-hot-day-loads.zarr
sweeps: $(VENV)/.installed-sweeps
	mkdir -p out
	if [ -d $(SWEEP_OUT) ]; then \
	  $(BIN)/cruiseplan sweep demo-hot-day-loads -o $(SWEEP_OUT) --resume; \
	else $(BIN)/cruiseplan sweep demo-hot-day-loads -o $(SWEEP_OUT); fi

# Opens the notebooks in JupyterLab (a local server; stop it with Ctrl-C).
notebooks: $(VENV)/.installed-notebooks
	$(BIN)/jupyter lab notebooks/

clean:
	rm -rf $(VENV) build *.egg-info .pytest_cache .ruff_cache .coverage
