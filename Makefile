# Two commands set everything up: `make demo` and `make test`.
# Each creates .venv if missing and installs gearcad (editable) with its test extra.
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
STAMP := $(VENV)/.gearcad-installed

.PHONY: demo test bench clean

$(STAMP): pyproject.toml
	test -x $(PY) || $(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/gearcad demo

test: $(STAMP)
	$(PY) -m pytest -q -n 2 --dist loadfile

bench: $(STAMP)
	for f in tests/benchmarks/bench_*.py; do $(PY) $$f; done

clean:
	rm -rf $(VENV) build *.egg-info
