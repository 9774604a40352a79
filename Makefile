# Two commands set up everything on a fresh machine:
#   make demo   - create .venv, install notelsp, check the bundled demo notes
#   make test   - the same install plus test extras, then the whole test suite
PYTHON ?= python3
VENV   ?= .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed

.PHONY: demo test bench fuzz clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install -q --upgrade pip
	$(PY) -m pip install -q -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/notelsp demo

test: $(STAMP)
	$(PY) -m pytest -q -ra

clean:
	rm -rf $(VENV) build dist *.egg-info
