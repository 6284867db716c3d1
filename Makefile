# Two entry points for a fresh Debian machine with Python 3.11:
#   make demo   -- install into .venv and run Counterdraft on the bundled demo agreements
#   make test   -- install into .venv with the test extra (and LibreOffice), run the whole suite
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
# LibreOffice (with Debian's python3-uno) is the tests' outside reference for .docx; the font
# keeps offscreen Qt text readable.  The GUI packages are what Qt's X11 plugin needs on a
# machine with a display (checked with ldd on libqxcb.so).
TEST_PACKAGES := libreoffice-writer python3-uno fonts-dejavu-core
GUI_PACKAGES := libxcb-icccm4 libxcb-keysyms1 libxcb-cursor0 libxkbcommon-x11-0 libegl1 fonts-dejavu-core
APT_INSTALL = SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); $$SUDO apt-get update -qq && \
	DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq --no-install-recommends

.PHONY: demo test bench system-deps gui-deps clean

$(VENV)/.installed: pyproject.toml constraints.txt
	@# Debian's python3 has no ensurepip (so no venv) until python3-venv is installed.
	@$(PYTHON) -c 'import ensurepip, venv' 2>/dev/null || { $(APT_INSTALL) python3-venv; }
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -c constraints.txt -e '.[test]'
	touch $@

# The main job on the demo (review, example decisions, counter-draft, redline, issues list in
# demo_output/), then the window on the same files -- or, without a display, how to open it.
demo: $(VENV)/.installed gui-deps
	$(PY) -m core.cli demo
	$(PY) -m desktop --demo

gui-deps:
	@if [ -n "$$DISPLAY$$WAYLAND_DISPLAY" ] && ! ldconfig -p | grep -q libxcb-icccm.so.4; then \
	  $(APT_INSTALL) $(GUI_PACKAGES); \
	fi

# LibreOffice is the outside reference for numbering labels and tracked changes.
system-deps:
	@if ! command -v soffice >/dev/null 2>&1 || ! /usr/bin/python3 -c 'import uno' >/dev/null 2>&1 \
	    || ! [ -d /usr/share/fonts/truetype/dejavu ]; then \
	  $(APT_INSTALL) $(TEST_PACKAGES); \
	fi

test: $(VENV)/.installed system-deps
	QT_QPA_PLATFORM=offscreen $(PY) -m pytest

bench: $(VENV)/.installed
	for b in benchmarks/bench_*.py; do $(PY) $$b || exit 1; done

clean:
	rm -rf $(VENV) build *.egg-info
