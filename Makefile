# fieldkit: two commands for a newcomer — `make run` and `make test`. Both are idempotent.
SHELL := /bin/bash
PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
PIP := $(PY) -m pip
# Debian packages the tests need: the C compiler for the engine kernel, the browser and desktop window (see ../shared/RECIPES.md)
TEST_DEBS := gcc libc6-dev chromium poppler-utils xvfb xauth libxcb-icccm4 libxcb-keysyms1 libxcb-cursor0 libxkbcommon-x11-0 libnss3 libegl1 libgl1
PYTEST_ARGS ?=

.PHONY: run serve test lint format unit e2e bench clean system-test-deps _apt

# the package build compiles the engine's C kernel (hatch_build.py): rebuilt when its source changes
NATIVE := hatch_build.py fieldkit/antenna/native/build.py fieldkit/antenna/native/kernels.c

$(VENV)/.base: pyproject.toml $(NATIVE)
	@$(PYTHON) -c 'import sys; sys.exit(sys.version_info < (3, 11))' || \
	  { echo "fieldkit needs Python 3.11 or newer (found: $$($(PYTHON) --version))"; exit 1; }
	@$(PYTHON) -m venv --help >/dev/null 2>&1 || $(MAKE) --no-print-directory _apt DEBS=python3-venv
	$(PYTHON) -m venv $(VENV)
	$(PIP) install -q -U pip
	$(PIP) install -q -e .
	touch $@

$(VENV)/.test: $(VENV)/.base
	$(PIP) install -q -e '.[test]'
	touch $@

# Install Debian packages when missing and we may (root, or passwordless sudo); otherwise say what is missing.
_apt:
	@missing=""; for d in $(DEBS); do dpkg -s $$d >/dev/null 2>&1 || missing="$$missing $$d"; done; \
	if [ -z "$$missing" ]; then exit 0; fi; \
	if [ "$$(id -u)" = 0 ]; then SUDO=""; elif sudo -n true 2>/dev/null; then SUDO="sudo -n"; else \
	  echo "Missing Debian packages:$$missing — install them (apt-get install$$missing) and run again."; exit 1; fi; \
	echo "Installing Debian packages:$$missing"; \
	$$SUDO apt-get update -qq && DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq --no-install-recommends $$missing

system-test-deps:
	@$(MAKE) --no-print-directory _apt DEBS="$(TEST_DEBS)"
	@test -x /usr/bin/chromium || { echo "chromium is missing: /usr/bin/chromium not found"; exit 1; }
	@command -v pdfinfo >/dev/null || { echo "pdfinfo is missing (Debian package poppler-utils)"; exit 1; }
	@command -v xvfb-run >/dev/null || { echo "xvfb-run is missing (Debian package xvfb)"; exit 1; }

run: $(VENV)/.base
	$(VENV)/bin/fieldkit

serve: $(VENV)/.base
	$(VENV)/bin/fieldkit serve

lint: $(VENV)/.test
	$(VENV)/bin/ruff check .
	$(VENV)/bin/ruff format --check .

format: $(VENV)/.test
	$(VENV)/bin/ruff format .
	$(VENV)/bin/ruff check --fix .

# The whole suite: lint, unit, reference checks, API, desktop window (under Xvfb), e2e in chromium.
test: system-test-deps $(VENV)/.test lint
	FIELDKIT_NO_SKIPS=1 QT_API=pyside6 QTWEBENGINE_CHROMIUM_FLAGS=--no-sandbox \
	  xvfb-run -a -s "-screen 0 1280x800x24" $(PY) -m pytest $(PYTEST_ARGS)

# The quick loop: everything but the slow, browser and desktop tests.
unit: $(VENV)/.test
	$(PY) -m pytest -m "not slow and not browser and not desktop" $(PYTEST_ARGS)

e2e: system-test-deps $(VENV)/.test
	$(PY) -m pytest e2e $(PYTEST_ARGS)

bench: $(VENV)/.test
	@for b in benchmarks/bench_*.py; do echo "== $$b"; $(PY) $$b || exit 1; done

clean:
	rm -rf $(VENV) .pytest_cache .ruff_cache e2e/artifacts fieldkit/antenna/native/_kernels.so
