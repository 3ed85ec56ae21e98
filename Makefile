# Rehydration Desk — one task runner. `make help` lists the targets.
SHELL := /bin/bash
.DEFAULT_GOAL := help
VENV := .venv
PY := $(VENV)/bin/python
FLASK := $(VENV)/bin/flask --app clinic_app
HOST ?= 127.0.0.1
PORT ?= 8000
# Debian packages the app needs: Pango and HarfBuzz for WeasyPrint's PDFs.
RUN_PACKAGES := libpango-1.0-0 libpangoft2-1.0-0 libharfbuzz0b fonts-dejavu-core
# And what the tests need: Chromium for browser tests, poppler for PDF checks, NSS tools for the
# TLS browser test, Node.js for the JavaScript engine tests, R's surveillance package as the
# outside oracle for the EARS C1/C2 test.
TEST_PACKAGES := chromium poppler-utils libnss3-tools nodejs r-cran-surveillance
STAMP := $(VENV)/.installed

.PHONY: help setup run test test-py test-js lint translations-extract translations-update \
	translations-compile screenshots bench

help: ## List the targets
	@grep -E '^[a-z-]+:.*## ' $(MAKEFILE_LIST) | awk -F':.*## ' '{printf "  %-22s %s\n", $$1, $$2}'

setup: system-packages $(STAMP) translations-compile ## Install what the app needs (idempotent, quick when done)

.PHONY: system-packages test-packages
system-packages:
	@$(MAKE) --no-print-directory apt-install PACKAGES="$(RUN_PACKAGES)"

test-packages:
	@$(MAKE) --no-print-directory apt-install PACKAGES="$(TEST_PACKAGES)"
	@# Debian's and Ubuntu's nodejs come without npm (NodeSource's nodejs carries its own and
	@# conflicts with the npm package): install it only when the command is missing.
	@command -v npm >/dev/null || $(MAKE) --no-print-directory apt-install PACKAGES=npm

.PHONY: apt-install
apt-install:
	@missing=$$(for p in $(PACKAGES); do dpkg -s $$p >/dev/null 2>&1 || echo $$p; done); \
	if [ -n "$$missing" ]; then \
	  echo "Installing Debian packages:" $$missing; \
	  SUDO=$$( [ "$$(id -u)" = 0 ] || echo sudo ); \
	  $$SUDO apt-get update -qq && \
	  DEBIAN_FRONTEND=noninteractive $$SUDO apt-get install -y -qq --no-install-recommends $$missing; \
	fi

$(STAMP): pyproject.toml
	@test -x $(PY) || python3 -m venv $(VENV)
	$(PY) -m pip install -q --upgrade pip
	$(PY) -m pip install -q -e '.[test]'
	@touch $(STAMP)

translations-compile: $(STAMP) ## Compile the .po catalogs to .mo and export JSON catalogs
	@if ls translations/*/LC_MESSAGES/messages.po >/dev/null 2>&1; then \
	  $(VENV)/bin/pybabel -q compile -d translations; fi
	@$(PY) -m clinic_app.i18n_export

translations-extract: $(STAMP) ## Extract translatable strings into translations/messages.pot
	$(VENV)/bin/pybabel -q extract -F babel.cfg --add-comments=I18N: -k lazy_gettext \
	  --sort-by-file --no-wrap -o translations/messages.pot .

translations-update: translations-extract ## Merge new strings into every catalog (keeps X-Review-Status)
	$(PY) -m clinic_app.i18n_export update

screenshots: setup ## PNGs of the A4 caregiver sheet in English, Swahili, Hindi and Arabic
	@mkdir -p screenshots && rm -f screenshots/sheet-a4-*
	$(PY) -m clinic_app.sheet_screenshots screenshots

run: setup ## Serve the app on http://127.0.0.1:8000 with the demo clinic
	@$(FLASK) init-db
	@$(FLASK) seed-demo
	@$(FLASK) serve --host $(HOST) --port $(PORT)

test: setup test-packages ## Set up, install the test tools, run the whole suite
	$(MAKE) --no-print-directory lint
	$(VENV)/bin/pytest -q -p no:cacheprovider
	$(MAKE) --no-print-directory test-js

test-js: ## Run the JavaScript engine tests with node --test
	@if [ -f tests/js/package-lock.json ]; then \
	  npm ci --prefix tests/js --no-audit --no-fund --loglevel=error; fi
	@if ls tests/js/*.test.mjs >/dev/null 2>&1; then node --test tests/js/; \
	else echo "no JavaScript tests yet"; fi

bench: setup test-packages ## Run every bench/*.py and print one table: measure, value, baseline, ratio, target, met
	$(PY) bench/run_all.py

lint: $(STAMP) ## Ruff over the whole tree
	$(VENV)/bin/ruff check clinic_app tests $(wildcard bench)
