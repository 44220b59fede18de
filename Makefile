# Two entry points a user needs: `make demo` and `make test`. Both set up .venv on first use.
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install -q --upgrade pip
	$(BIN)/python -m pip install -q -e '.[test]'
	touch $(STAMP)

.PHONY: demo lint test test-fast bench setup fuzz-long
setup: $(STAMP)

# The demo set into out/demo-foilset (the default folder rule: out/<spec file name>):
# solids and meshes, the shaper's drawings, then the report (which checks the files first).
demo: $(STAMP)
	$(BIN)/geomgen build specs/demo-foilset.toml
	$(BIN)/geomgen drawings specs/demo-foilset.toml
	$(BIN)/geomgen report specs/demo-foilset.toml

# The style and type gate (settings in pyproject.toml): zero findings, run first by `make test`.
lint: $(STAMP)
	$(BIN)/ruff check geomgen tests bench
	$(BIN)/mypy geomgen

test: lint
	$(BIN)/python -m pytest -q

test-fast: $(STAMP)
	$(BIN)/python -m pytest -q -m "not slow"

bench: $(STAMP)
	$(BIN)/python bench/bench.py
	$(BIN)/python bench/bench_hydro.py
	$(BIN)/python bench/bench_studies.py
	$(BIN)/python bench/bench_sections.py
	$(BIN)/python bench/bench_parts.py

# Long property-based runs; results recorded in DEVELOPERS.md. fuzz-long: >= 10,000 generated
# specs through `geomgen check` on every core (log: fuzz-long.tsv); fuzz-long-core: the
# geometry and kernel properties in their long profile.
fuzz-long: $(STAMP)
	$(BIN)/python tests/fuzz_long.py --cases 10000 --log fuzz-long.tsv

fuzz-long-core: $(STAMP)
	GEOMGEN_FUZZ=long $(BIN)/python -m pytest -q tests/test_fuzz.py -p no:cacheprovider \
		-k "not every_spec_is_refused"
