"""The editor setups in editors/: each parses, launches `notelsp serve`, and passes only settings the server accepts.

The VS Code extension is also loaded by Node.js with stand-ins for the
`vscode` API (tests/clients/node/load_vscode_extension.js), so what it would
launch is read from the running code, not only from its manifest.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import tomllib
from pathlib import Path

import pytest

from notelsp.review.settings import settings_from_mapping

ROOT = Path(__file__).resolve().parents[2]
EDITORS = ROOT / "editors"
SERVE = ["notelsp", "serve"]


def accepted(values: dict) -> bool:
    """True when the server takes every key of an editor's "notelsp" section without a complaint."""
    _, problems = settings_from_mapping(values)
    return problems == []


def test_every_editor_folder_has_a_readme_that_names_the_command():
    folders = sorted(p for p in EDITORS.iterdir() if p.is_dir())
    assert {p.name for p in folders} >= {"neovim", "helix", "emacs", "kate", "sublime", "vscode"}
    for folder in folders:
        readme = folder / "README.md"
        assert readme.is_file(), folder
        assert "notelsp serve" in readme.read_text(encoding="utf-8"), readme


# --- VS Code ----------------------------------------------------------------------


def vscode_manifest() -> dict:
    return json.loads((EDITORS / "vscode" / "package.json").read_text(encoding="utf-8"))


def test_vscode_manifest_has_the_fields_vscode_requires():
    manifest = vscode_manifest()
    for field in ("name", "version", "publisher", "engines", "main", "activationEvents", "contributes"):
        assert field in manifest, field
    assert re.fullmatch(r"[a-z0-9][a-z0-9-]*", manifest["name"])
    assert re.fullmatch(r"\d+\.\d+\.\d+", manifest["version"])
    assert manifest["engines"]["vscode"].startswith("^1.")
    assert (EDITORS / "vscode" / manifest["main"]).is_file()
    assert "vscode-languageclient" in manifest["dependencies"]


def test_vscode_activates_on_the_reviewed_languages():
    events = vscode_manifest()["activationEvents"]
    assert "onLanguage:markdown" in events and "onLanguage:plaintext" in events
    assert "*" not in events  # never start for every window


def test_vscode_settings_default_to_notelsp_serve_and_leave_review_keys_unset():
    properties = vscode_manifest()["contributes"]["configuration"]["properties"]
    assert properties["notelsp.server.command"]["default"] == SERVE
    review_keys = {k.removeprefix("notelsp."): v for k, v in properties.items() if k != "notelsp.server.command"}
    assert review_keys, properties
    assert all(v["default"] is None for v in review_keys.values())  # unset: .notelsp.toml decides
    for key in review_keys:  # the server knows the key: a bad value is rejected as a value, not as a name
        _, problems = settings_from_mapping({key: object()})
        assert problems and "unknown setting" not in problems[0], key


def test_vscode_commands_are_declared():
    declared = {c["command"] for c in vscode_manifest()["contributes"]["commands"]}
    assert declared == {"notelsp.restartServer"}


@pytest.fixture(scope="module")
def node() -> str:
    found = shutil.which("node")
    if found is None:
        pytest.skip("node is not installed: the VS Code extension cannot be loaded")
    return found


def load_extension(node: str, settings: dict) -> dict:
    finished = subprocess.run(
        [node, str(ROOT / "tests" / "clients" / "node" / "load_vscode_extension.js"),
         str(EDITORS / "vscode" / "extension.js"), json.dumps(settings)],
        capture_output=True, text=True, timeout=60, check=False,
    )
    assert finished.stdout.strip(), finished.stderr
    return json.loads(finished.stdout)


def test_vscode_extension_launches_notelsp_serve_over_stdio(node):
    loaded = load_extension(node, {})
    assert "error" not in loaded, loaded
    assert loaded["started"] is True
    assert loaded["command"] == SERVE
    assert loaded["transport"] == 0  # TransportKind.stdio
    assert {s["language"] for s in loaded["documentSelector"]} == {"markdown", "plaintext"}
    assert loaded["configurationSection"] == "notelsp"
    assert loaded["watched"] == "**/.notelsp.toml"
    declared = {c["command"] for c in vscode_manifest()["contributes"]["commands"]}
    assert set(loaded["commands"]) == declared


def test_vscode_extension_passes_only_review_settings(node):
    user = {"server": {"command": ["/opt/venv/bin/notelsp", "serve"]}, "inlay_hints": False,
            "disabled": None, "severity": {"wrong-shape": "warning"}}
    loaded = load_extension(node, user)
    assert loaded["command"] == ["/opt/venv/bin/notelsp", "serve"]
    assert loaded["passed"] == {"inlay_hints": False, "severity": {"wrong-shape": "warning"}}
    assert accepted(loaded["passed"])


# --- Helix, Sublime Text, Emacs, Neovim ----------------------------------------------------


def test_helix_languages_toml_runs_notelsp_serve_for_markdown_and_text():
    config = tomllib.loads((EDITORS / "helix" / "languages.toml").read_text(encoding="utf-8"))
    server = config["language-server"]["notelsp"]
    assert [server["command"], *server["args"]] == SERVE
    assert accepted(server["config"]["notelsp"])
    languages = {entry["name"]: entry for entry in config["language"]}
    assert "notelsp" in languages["markdown"]["language-servers"]
    text = languages["text"]
    assert "notelsp" in text["language-servers"] and "txt" in text["file-types"]
    assert {"scope", "roots"} <= set(text)  # Helix needs these for a language it does not ship


def test_sublime_lsp_client_runs_notelsp_serve_for_notes():
    config = json.loads((EDITORS / "sublime" / "LSP-notelsp.sublime-settings").read_text(encoding="utf-8"))
    client = config["clients"]["notelsp"]
    assert client["command"] == SERVE and client["enabled"] is True
    assert {"text.html.markdown", "text.plain"} <= {s.strip() for s in client["selector"].split("|")}
    assert accepted(client["settings"]["notelsp"])


def test_kate_lsp_client_runs_notelsp_serve_for_markdown_and_plain_text():
    config = json.loads((EDITORS / "kate" / "settings.json").read_text(encoding="utf-8"))
    servers = config["servers"]
    # Kate's highlighting mode names for Markdown and for plain text (Kate's own mode list, from memory)
    assert re.search(servers["markdown"]["highlightingModeRegex"], "Markdown")
    assert re.search(servers["plaintext"]["highlightingModeRegex"], "None")
    for server in servers.values():
        assert server["command"] == SERVE
        assert ".notelsp.toml" in server["rootIndicationFileNames"]
        assert accepted(server["settings"]["notelsp"])


def elisp_forms_balance(source: str) -> bool:
    """Parentheses balance outside strings and comments (enough to catch a broken copy-paste)."""
    depth, in_string, escaped, in_comment = 0, False, False, False
    for char in source:
        if in_comment:
            in_comment = char != "\n"
        elif in_string:
            escaped, in_string = (not escaped and char == "\\"), (escaped or char != '"')
        elif char == ";":
            in_comment = True
        elif char == '"':
            in_string = True
        elif char in "()":
            depth += 1 if char == "(" else -1
            if depth < 0:
                return False
    return depth == 0 and not in_string


def test_emacs_snippet_registers_notelsp_serve_with_eglot():
    source = (EDITORS / "emacs" / "notelsp.el").read_text(encoding="utf-8")
    assert elisp_forms_balance(source)
    assert '(defvar notelsp-command \'("notelsp" "serve")' in source
    assert "eglot-server-programs" in source and "markdown-mode" in source
    assert "(provide 'notelsp)" in source


def test_elisp_balance_check_catches_a_missing_paren():
    assert not elisp_forms_balance('(setq a "(")\n(foo (bar)')
    assert elisp_forms_balance('(setq a "(") ; )\n(foo (bar))')


def test_neovim_module_offers_both_client_apis_and_runs_notelsp_serve():
    source = (EDITORS / "neovim" / "lua" / "notelsp.lua").read_text(encoding="utf-8")
    assert 'cmd = { "notelsp", "serve" }' in source
    for api in ("vim.lsp.config(", "vim.lsp.enable(", "vim.lsp.start_client("):
        assert api in source, api
