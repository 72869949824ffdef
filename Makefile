# One-command set-up: a virtual environment in .venv, the package and its tools,
# and (as root) the TeX packages for PDFs. Run `make help` for the targets.
PYTHON ?= python3
VENV   ?= .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed
DEMO   := calcsheets/kestrel-cove-boathouse

.PHONY: help demo check test wheel-check bench lab system clean

help:
	@echo "make demo   set up, then build the demo job's calc package (outputs/kestrel-cove-boathouse/)"
	@echo "make check  the fast tests (no notebooks, no TeX, no corpus): the inner loop, under 30 s"
	@echo "make test   set up, then run the whole test suite (real papermill, nbconvert and xelatex)"
	@echo "make wheel-check  build the wheel, install it in a fresh venv, build a demo sheet from another folder"
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

check: $(STAMP)
	$(BIN)/python -m pytest -q -m "not pipeline and not corpus" -n 2

test: $(STAMP) system
	$(BIN)/python -m pytest -q

wheel-check: $(STAMP) system
	rm -rf build/wheel-check && mkdir -p build/wheel-check/elsewhere
	$(BIN)/python -m pip wheel -q --no-deps -w build/wheel-check .
	$(PYTHON) -m venv build/wheel-check/venv
	build/wheel-check/venv/bin/python -m pip install -q build/wheel-check/timbersheets-*.whl
	cp -r $(DEMO) build/wheel-check/elsewhere/job
	# exit 1 says a member does not pass (the demo's P-4 is undersized on purpose); 2 and up are errors
	cd build/wheel-check/elsewhere && { ../venv/bin/timbersheets run job --only C-3 --jobs 1 --out out; \
		[ $$? -le 1 ]; } && test -s out/rev-A/sheets/C-3.pdf && echo "wheel-check: the installed wheel built a sheet"

bench: $(STAMP) system
	$(BIN)/python tools/bench.py

lab: $(STAMP)
	$(BIN)/python -m pip install -q -e '.[lab]'
	$(BIN)/jupyter lab templates/

clean:
	rm -rf $(VENV) outputs/*/ build lib/*.egg-info
