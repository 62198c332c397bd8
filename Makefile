# Two set-up commands for a fresh machine: `make demo` and `make test`.
PY      ?= python3
VENV    := .venv
BIN     := $(VENV)/bin
STAMP   := $(VENV)/.installed
OUT     ?= out

.PHONY: demo test test-long bench clean syslibs

$(STAMP): pyproject.toml
	$(MAKE) syslibs
	$(PY) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

# WeasyPrint needs Pango; install it from the distribution when it is missing and we may.
syslibs:
	@if ! ldconfig -p 2>/dev/null | grep -q 'libpango-1.0.so.0'; then \
	  if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null; then \
	    apt-get update -qq && apt-get install -y -qq libpango-1.0-0 libpangoft2-1.0-0 libharfbuzz0b fonts-dejavu-core; \
	  else echo "windsheet: WeasyPrint needs Pango (libpango-1.0-0); ask your administrator to install it" >&2; exit 1; fi; \
	fi
	@# Optional: HarfBuzz's subsetter makes WeasyPrint embed only the glyphs used (smaller PDFs).
	@if ! ldconfig -p 2>/dev/null | grep -q 'libharfbuzz-subset.so.0' && [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null; then \
	  (apt-get install -y -qq libharfbuzz-subset0 >/dev/null 2>&1 || (apt-get update -qq && apt-get install -y -qq libharfbuzz-subset0 >/dev/null 2>&1)) \
	    || echo "windsheet: libharfbuzz-subset0 not installed; PDFs will be larger" >&2; \
	fi

	@# The bench page's browser tests drive Debian's chromium (Playwright never downloads a browser).
	@if [ ! -x /usr/bin/chromium ] && [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null; then \
	  apt-get update -qq && apt-get install -y -qq chromium >/dev/null \
	    || echo "windsheet: chromium not installed; the browser tests will be skipped" >&2; \
	fi

demo: $(STAMP)
	$(BIN)/windsheet demo --out $(OUT)

test: $(STAMP)
	$(BIN)/python -m pytest

# The nightly run: every paper and unit pairing of the page-fault test, and ten times the
# property tests' examples (tests/conftest.py's "long" hypothesis profile).
test-long: $(STAMP)
	WINDSHEET_LONG=1 $(BIN)/python -m pytest

bench: $(STAMP)
	$(BIN)/python benchmarks/run.py $(ONLY)

clean:
	rm -rf $(VENV) $(OUT) build *.egg-info
