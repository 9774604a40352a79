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

.PHONY: demo test bench fuzz clean node-client neovim sarif-validator emacs chromium kate

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

test: $(STAMP) node-client neovim sarif-validator emacs chromium kate
	$(PY) -m pytest -q -ra

# npm packages for two tests, pinned by their lock files: the Node.js LSP client's vscode-jsonrpc
# and the SARIF multitool (a self-contained binary per platform, no .NET needed), which validates
# --format sarif with GitHub's rules. Without npm, or offline, those tests skip and say why.
# $(call npm-packages,FOLDER,TEST)
define npm-packages
	@if command -v npm >/dev/null 2>&1; then \
		(cd $(1) && npm install --no-audit --no-fund --silent) \
			|| echo "npm install failed in $(1): the $(2) will skip"; \
	else \
		echo "npm not found: the $(2) will skip"; \
	fi
endef

node-client:
	$(call npm-packages,$(NODE_CLIENT),Node.js client test)

sarif-validator:
	$(call npm-packages,$(SARIF_VALIDATOR),SARIF multitool test)

bench: $(STAMP)
	$(PY) benchmarks/run.py

# Same tests as in `make test`, pushed harder (tests/reliability/scale.py reads NOTELSP_FUZZ).
fuzz: $(STAMP)
	NOTELSP_FUZZ=1 $(PY) -m pytest -q -ra tests/reliability tests/notation/test_properties.py tests/notation/test_incremental.py

clean:
	rm -rf $(VENV) build dist *.egg-info

# Debian packages for the end-to-end client tests, as root, when the tool is missing. Best effort:
# without apt-get or root, or offline, the test that needs the tool skips and says why.
# $(call debian,CHECK,PACKAGES,TEST): install PACKAGES unless the shell command CHECK succeeds.
define debian
	@if ! { $(1); } >/dev/null 2>&1; then \
		if command -v apt-get >/dev/null 2>&1 && [ "$$(id -u)" = 0 ]; then \
			{ apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $(2); } >/dev/null 2>&1 \
				|| echo "apt-get could not install $(2): the $(3) will skip"; \
		else \
			echo "$(2) missing and apt-get unavailable (or not root): the $(3) will skip"; \
		fi; \
	fi
endef

# Headless Neovim for the Neovim client test.
neovim:
	$(call debian,command -v nvim,neovim,Neovim client test)

# Emacs with eglot for the Emacs client test (Emacs 28 needs elpa-eglot; 29+ has it built in).
emacs:
	$(call debian,command -v emacs && emacs --batch --eval "(require 'eglot)",emacs-nox elpa-eglot,Emacs client test)

# Headless Chromium for the review page's browser test.
chromium:
	$(call debian,command -v chromium,chromium,review page's browser test)

# Kate (22.12 on Debian 12) and Xvfb for the Kate client test; recommends left out (desktop extras, dictionaries).
kate:
	$(call debian,command -v kate && command -v Xvfb,--no-install-recommends kate xvfb,Kate client test)
