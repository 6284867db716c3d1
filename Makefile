# Two entry points for a fresh Debian machine with Python 3.11:
#   make demo   -- install into .venv and run Counterdraft on the bundled demo agreements
#   make test   -- install into .venv with the test extra (and LibreOffice), run the whole suite
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
DEBIAN_PACKAGES := libreoffice-writer python3-uno xvfb

.PHONY: demo test bench system-deps clean

$(VENV)/.installed: pyproject.toml constraints.txt
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -c constraints.txt -e '.[test]'
	touch $@

demo: $(VENV)/.installed
	$(PY) -m core.cli demo

# LibreOffice is the outside reference for numbering labels and tracked changes.
system-deps:
	@if ! command -v soffice >/dev/null 2>&1 || ! /usr/bin/python3 -c 'import uno' >/dev/null 2>&1; then \
	  SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); \
	  $$SUDO apt-get update -qq && \
	  DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq --no-install-recommends $(DEBIAN_PACKAGES); \
	fi

test: $(VENV)/.installed system-deps
	QT_QPA_PLATFORM=offscreen $(PY) -m pytest

bench: $(VENV)/.installed
	for b in benchmarks/bench_*.py; do $(PY) $$b || exit 1; done

clean:
	rm -rf $(VENV) build *.egg-info
