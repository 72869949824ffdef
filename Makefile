# One-command set-up: a virtual environment in .venv, the package and its tools,
# and (as root) the TeX packages for PDFs. Run `make help` for the targets.
PYTHON ?= python3
VENV   ?= .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed
DEMO   := calcsheets/kestrel-cove-boathouse

.PHONY: help demo test bench lab system clean

help:
	@echo "make demo   set up, then build the demo job's calc package (outputs/kestrel-cove-boathouse/)"
	@echo "make test   set up, then run the test suite (real papermill, nbconvert and xelatex)"
	@echo "make bench  set up, then time a 100-member package and the sizing search"
	@echo "make lab    open JupyterLab on the templates"

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install -q --upgrade pip
	$(BIN)/python -m pip install -q -e '.[dev]'
	touch $(STAMP)

system:
	@tools/ensure-system-packages

demo: $(STAMP) system
	$(BIN)/timbersheets run $(DEMO); status=$$?; [ $$status -le 1 ] || exit $$status

test: $(STAMP) system
	$(BIN)/python -m pytest -q

bench: $(STAMP) system
	$(BIN)/python tools/bench.py

lab: $(STAMP)
	$(BIN)/jupyter lab templates/

clean:
	rm -rf $(VENV) outputs/*/ build lib/*.egg-info
