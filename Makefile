# Two entry points for a fresh Debian machine with Python 3.11:
#   make demo   -- install into .venv and run Counterdraft on the bundled demo agreements
#   make test   -- install into .venv with the test extra (and LibreOffice), run the static checks
#                  (ruff, mypy --strict) and the whole suite
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
# LibreOffice (with Debian's python3-uno) is the tests' outside reference for .docx; the font
# keeps offscreen Qt text readable; Xvfb and xwininfo (x11-utils) let a test open the real
# window on a virtual screen, as the command printed by a headless `make demo` does;
# PostgreSQL (initdb, pg_ctl, psql) runs the throwaway server the shared-store tests start.
TEST_PACKAGES := libreoffice-writer python3-uno fonts-dejavu-core xvfb xauth x11-utils postgresql
# What Qt's X11 plugin (PySide6's libqxcb.so) needs beyond a minimal Debian: the libraries
# `ldd libqxcb.so` reported "not found" on one (libxcb-icccm4, libxcb-keysyms1) and those a
# fresh container may lack, plus a font.
GUI_PACKAGES := libxcb-icccm4 libxcb-keysyms1 libxcb-cursor0 libxkbcommon-x11-0 libegl1 fonts-dejavu-core
# Without a display the window runs on a virtual screen (xvfb-run, which wants xauth).
HEADLESS_PACKAGES := xvfb xauth
APT_INSTALL = SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); $$SUDO apt-get update -qq && \
	DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq --no-install-recommends

.PHONY: demo test static bench bench-all system-deps gui-deps clean

$(VENV)/.installed: pyproject.toml constraints.txt
	@# Debian's python3 has no ensurepip (so no venv) until python3-venv is installed.
	@$(PYTHON) -c 'import ensurepip, venv' 2>/dev/null || { $(APT_INSTALL) python3-venv; }
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -c constraints.txt -e '.[test]'
	touch $@

# The main job on the demo (review, example decisions, counter-draft, redline, issues list in
# demo_output/), then the window on the same files -- or, without a display, the exact
# commands that open it (on a virtual screen here, or on a machine with a display).
demo: $(VENV)/.installed gui-deps
	$(PY) -m core.cli demo
	$(PY) -m desktop --demo

# Qt's X11 plugin must find every library it links (ldd on libqxcb.so); without a display,
# xvfb-run too.  Installed only when missing.
gui-deps: $(VENV)/.installed
	@qxcb=$$($(PY) -c 'import pathlib, PySide6; print(pathlib.Path(PySide6.__file__).parent / "Qt/plugins/platforms/libqxcb.so")'); \
	if ldd "$$qxcb" | grep -q "not found"; then \
	  $(APT_INSTALL) $(GUI_PACKAGES); \
	fi
	@if [ -z "$$DISPLAY$$WAYLAND_DISPLAY" ] && ! command -v xvfb-run >/dev/null 2>&1; then \
	  $(APT_INSTALL) $(HEADLESS_PACKAGES); \
	fi

# LibreOffice is the outside reference for numbering labels and tracked changes; Xvfb for the
# window on a virtual screen; PostgreSQL's server binaries (Debian keeps them off PATH, in
# /usr/lib/postgresql/VERSION/bin) for the shared-store tests.
system-deps:
	@if ! command -v soffice >/dev/null 2>&1 || ! /usr/bin/python3 -c 'import uno' >/dev/null 2>&1 \
	    || ! [ -d /usr/share/fonts/truetype/dejavu ] || ! command -v xvfb-run >/dev/null 2>&1 \
	    || ! command -v xauth >/dev/null 2>&1 || ! command -v xwininfo >/dev/null 2>&1 \
	    || ! { command -v initdb >/dev/null 2>&1 || ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1; }; then \
	  $(APT_INSTALL) $(TEST_PACKAGES); \
	fi

test: $(VENV)/.installed system-deps gui-deps static
	QT_QPA_PLATFORM=offscreen $(PY) -m pytest

# The static checks (configured in pyproject.toml): lint the tree, type-check core/ and desktop/.
static: $(VENV)/.installed
	$(PY) -m ruff check .
	$(PY) -m mypy

# The speed and memory ratios of start-up, hostile inputs, size, the precedent set and the
# window, with their targets, in one run (about 15 minutes; BENCH_ARGS=--quick for a smoke
# run, --slow for 10,000 past agreements); bench-all runs every benchmark script.
bench: $(VENV)/.installed
	QT_QPA_PLATFORM=offscreen $(PY) benchmarks/bench_ratios.py $(BENCH_ARGS)

bench-all: $(VENV)/.installed
	for b in benchmarks/bench_*.py; do QT_QPA_PLATFORM=offscreen $(PY) $$b || exit 1; done

clean:
	rm -rf $(VENV) build *.egg-info
