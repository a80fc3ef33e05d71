# holeshape: the two commands a fresh clone needs are `make demo` and `make test`.
PYTHON ?= python3
VENV   ?= .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.holeshape-installed

.PHONY: demo test quick lint bench validate clean

$(STAMP): pyproject.toml
	test -x $(PY) || $(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e '.[test]'
	$(PY) -c "import gmsh" || { echo "gmsh cannot load its system libraries; see README (Installation)"; exit 1; }
	touch $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/holeshape check studies/rib-web-check.toml --plots runs/rib-web-access/current-design
	$(VENV)/bin/holeshape optimise studies/rib-web-access.toml --out runs/rib-web-access
	$(VENV)/bin/holeshape optimise studies/rib-web-lightening.toml --out runs/rib-web-lightening
	$(VENV)/bin/holeshape optimise studies/rib-web-freeform.toml --out runs/rib-web-freeform
	$(VENV)/bin/holeshape optimise studies/floor-beam-flanged-access.toml --out runs/floor-beam-flanged-access
	$(VENV)/bin/holeshape check studies/floor-beam-service-opening.toml --plots runs/floor-beam-service-opening
	$(VENV)/bin/holeshape optimise studies/floor-beam-lightening-row.toml --out runs/floor-beam-lightening-row
	$(VENV)/bin/holeshape optimise studies/deck-girder-cable-row.toml --out runs/deck-girder-cable-row
	$(VENV)/bin/holeshape optimise studies/bulkhead-cable-transit.toml --out runs/bulkhead-cable-transit
	$(VENV)/bin/holeshape optimise studies/rib-web-fatigue.toml --out runs/rib-web-fatigue

# one pytest worker per core and one more: several tests spend part of their time waiting on processes of their own
# (killed and resumed runs, several search workers, the database), and the extra worker fills those waits
JOBS ?= $(shell echo $$(( $$(nproc 2>/dev/null || echo 2) + 1 )))

test: $(STAMP)
	$(PY) -m pytest -n $(JOBS) --dist worksteal

quick: $(STAMP)
	$(PY) -m pytest -n $(JOBS) --dist worksteal -m "not slow"

lint: $(STAMP)
	$(VENV)/bin/ruff check holeshape tests benchmarks examples
	$(VENV)/bin/mypy

validate: $(STAMP)
	$(PY) benchmarks/validation.py standard --write docs/verification.md

bench: $(STAMP)
	$(PY) benchmarks/speed.py

clean:
	rm -rf $(VENV) out runs .pytest_cache
