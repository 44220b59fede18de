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

# both cores (pytest-xdist): the suite takes about 7 minutes on 2 cores, twice that on one
test: lint
	$(BIN)/python -m pytest -q -n auto

test-fast: $(STAMP)
	$(BIN)/python -m pytest -q -n auto -m "not slow"

bench: $(STAMP)
	$(BIN)/python bench/bench.py
	$(BIN)/python bench/bench_hydro.py
	$(BIN)/python bench/bench_studies.py
	$(BIN)/python bench/bench_sections.py
	$(BIN)/python bench/bench_parts.py

# Long property-based runs; results recorded in docs/records.md. fuzz-long: >= 10,000 generated
# specs through `geomgen check` on every core (log: fuzz-long.tsv); fuzz-long-core: the
# geometry and kernel properties in their long profile.
fuzz-long: $(STAMP)
	$(BIN)/python tests/fuzz_long.py --cases 10000 --log fuzz-long.tsv

fuzz-long-core: $(STAMP)
	GEOMGEN_FUZZ=long $(BIN)/python -m pytest -q tests/test_fuzz.py -p no:cacheprovider \
		-k "not every_spec_is_refused"

# The invented demo sets' outputs kept in output_samples/ (run after a change that alters them).
samples: $(STAMP)
	$(BIN)/geomgen build specs/demo-foilset.toml -o output_samples/demo-foilset
	$(BIN)/geomgen drawings specs/demo-foilset.toml -o output_samples/demo-foilset
	$(BIN)/geomgen balance specs/demo-foilset.toml -o output_samples/demo-foilset
	$(BIN)/geomgen loads specs/demo-foilset.toml --speed 26 --load-factor 2 --material carbon-epoxy-quasi-iso \
		-o output_samples/demo-foilset
	$(BIN)/geomgen compare specs/demo-foilset.toml --change 'area:stabilizer*1.3' --change move:stabilizer+60 \
		--change shim:stabilizer-0.5 -o output_samples/demo-foilset
	$(BIN)/geomgen report specs/demo-foilset.toml -o output_samples/demo-foilset
	$(BIN)/geomgen parts specs/demo-stabilizer-shop.toml -o output_samples/demo-stabilizer-shop
