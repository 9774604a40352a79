# Two commands set up everything on a fresh machine:
#   make demo   - create .venv, install notelsp (runtime dependencies only), check the bundled demo notes
#   make test   - the same install plus the test extras, then the whole test suite
#   make bench  - the install with test extras, then the benchmarks (prints one 'name: value' per figure)
#   make fuzz   - the reliability tests with larger example counts and the full 10 s edit storm
PYTHON ?= python3
VENV   ?= .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed
RUNTIME_STAMP := $(VENV)/.installed-runtime

NODE_CLIENT := tests/clients/node
SARIF_VALIDATOR := tests/clients/sarif

.PHONY: demo test bench fuzz clean node-client neovim sarif-validator emacs chromium

$(PY):
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install -q --upgrade pip

# Two stamps: `make demo` installs the runtime only, `make test` adds the test extras (.installed).
$(RUNTIME_STAMP): pyproject.toml setup.py | $(PY)
	$(PY) -m pip install -q -e .
	touch $(RUNTIME_STAMP)

$(STAMP): pyproject.toml setup.py | $(PY)
	$(PY) -m pip install -q -e '.[test]'
	touch $(STAMP)

demo: $(RUNTIME_STAMP)
	$(VENV)/bin/notelsp demo --page demo-review.html

test: $(STAMP) node-client neovim sarif-validator emacs chromium
	$(PY) -m pytest -q -ra

# The Node.js LSP client test's one dependency (vscode-jsonrpc, pinned by the lock file).
# Without npm, or offline, that test skips and says why; the rest still runs.
node-client:
	@if command -v npm >/dev/null 2>&1; then \
		(cd $(NODE_CLIENT) && npm install --no-audit --no-fund --silent) \
			|| echo "npm install failed in $(NODE_CLIENT): the Node.js client test will skip"; \
	else \
		echo "npm not found: the Node.js client test will skip"; \
	fi

# The SARIF multitool (npm package @microsoft/sarif-multitool, pinned by the lock file; it ships a
# self-contained binary per platform, no .NET needed) validates --format sarif with GitHub's rules.
# Without npm, or offline, that test skips and says why; the rest still runs.
sarif-validator:
	@if command -v npm >/dev/null 2>&1; then \
		(cd $(SARIF_VALIDATOR) && npm install --no-audit --no-fund --silent) \
			|| echo "npm install failed in $(SARIF_VALIDATOR): the SARIF multitool test will skip"; \
	else \
		echo "npm not found: the SARIF multitool test will skip"; \
	fi

# Headless Neovim for the Neovim client test: Debian's package, as root, when nvim is missing.
# Best effort: without apt-get or root, or offline, that test skips and says why.
neovim:
	@if ! command -v nvim >/dev/null 2>&1; then \
		if command -v apt-get >/dev/null 2>&1 && [ "$$(id -u)" = 0 ]; then \
			{ apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq neovim; } >/dev/null 2>&1 \
				|| echo "apt-get could not install neovim: the Neovim client test will skip"; \
		else \
			echo "nvim missing and apt-get unavailable (or not root): the Neovim client test will skip"; \
		fi; \
	fi

# Emacs with eglot for the Emacs client test: Debian's packages (Emacs 28 needs elpa-eglot; 29+ has it
# built in), as root, when emacs or its eglot is missing. Best effort, like neovim above.
emacs:
	@if ! { command -v emacs >/dev/null 2>&1 && emacs --batch --eval "(require 'eglot)" >/dev/null 2>&1; }; then \
		if command -v apt-get >/dev/null 2>&1 && [ "$$(id -u)" = 0 ]; then \
			{ apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq emacs-nox elpa-eglot; } >/dev/null 2>&1 \
				|| echo "apt-get could not install emacs-nox elpa-eglot: the Emacs client test will skip"; \
		else \
			echo "emacs with eglot missing and apt-get unavailable (or not root): the Emacs client test will skip"; \
		fi; \
	fi

bench: $(STAMP)
	$(PY) benchmarks/run.py

# Same tests as in `make test`, pushed harder (tests/reliability/scale.py reads NOTELSP_FUZZ).
fuzz: $(STAMP)
	NOTELSP_FUZZ=1 $(PY) -m pytest -q -ra tests/reliability tests/notation/test_properties.py tests/notation/test_incremental.py

clean:
	rm -rf $(VENV) build dist *.egg-info

# Headless Chromium for the review page's browser test: Debian's package, as root, when missing.
chromium:
	@if ! command -v chromium >/dev/null 2>&1; then \
		if command -v apt-get >/dev/null 2>&1 && [ "$$(id -u)" = 0 ]; then \
			{ apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium; } >/dev/null 2>&1 \
				|| echo "apt-get could not install chromium: the review page's browser test will skip"; \
		else \
			echo "chromium missing and apt-get unavailable (or not root): the review page's browser test will skip"; \
		fi; \
	fi
