"""SARIF output validated against the published SARIF 2.1.0 schema (see tests/data/README.md)."""

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path
from urllib.parse import unquote, unquote_to_bytes, urlsplit

import jsonschema
import pytest

from .conftest import run_notelsp

SCHEMA = Path(__file__).parent.parent / "data" / "sarif-2.1.0-rtm.5.json"


def test_sarif_output_is_valid_and_carries_findings_and_fixes(notes):
    result = run_notelsp("check", "--format", "sarif", str(notes))
    assert result.returncode == 1, result.stderr
    log = json.loads(result.stdout)
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    jsonschema.validate(log, schema)
    run = log["runs"][0]
    rule_ids = [rule["id"] for rule in run["tool"]["driver"]["rules"]]
    (result_entry,) = [r for r in run["results"] if r["ruleId"] == "wrong-shape"]
    assert rule_ids[result_entry["ruleIndex"]] == "wrong-shape"
    assert result_entry["level"] == "error"
    region = result_entry["locations"][0]["physicalLocation"]["region"]
    assert region["startLine"] == 3
    replacement = result_entry["fixes"][0]["artifactChanges"][0]["replacements"][0]
    assert replacement["insertedContent"]["text"] == "T-shaped"


def _sarif(*args: str, cwd=None) -> dict:
    result = run_notelsp("check", "--format", "sarif", *args, cwd=cwd)
    assert result.returncode in (0, 1, 2, 3), result.stderr
    return json.loads(result.stdout)


def _github_anchor(heading: str) -> str:
    """The id GitHub gives a Markdown heading: lower case, characters other than letters, digits,
    spaces, hyphens and underscores dropped, spaces made hyphens (common practice, no source)."""
    return re.sub(r"[^\w\- ]", "", heading.strip().lower()).replace(" ", "-")


def test_every_rule_has_help_and_an_absolute_help_uri_to_its_readme_heading(notes):
    rules = _sarif(str(notes))["runs"][0]["tool"]["driver"]["rules"]
    readme = (Path(__file__).parents[2] / "README.md").read_text(encoding="utf-8")
    anchors = {_github_anchor(line.lstrip("#")) for line in readme.splitlines() if line.startswith("#")}
    for rule in rules:
        assert rule["help"]["text"] and rule["help"]["markdown"], rule["id"]
        assert "``" not in rule["shortDescription"]["text"] + rule["fullDescription"]["text"] + rule["help"]["text"]
        uri = urlsplit(rule["helpUri"])
        assert uri.scheme == "https" and uri.netloc, rule["helpUri"]  # absolute, as code scanning requires
        assert uri.fragment in anchors, rule["helpUri"]


def test_uris_are_relative_to_srcroot_and_percent_encoded(notes):
    (notes / "with space é.md").write_text("{XeF2: bent}\n", encoding="utf-8")
    run = _sarif(".", cwd=notes)["runs"][0]
    root = run["originalUriBaseIds"]["%SRCROOT%"]["uri"]
    assert root.startswith("file://") and root.endswith("/")
    uris = {artifact["location"]["uri"] for artifact in run["artifacts"]}
    assert all(artifact["location"]["uriBaseId"] == "%SRCROOT%" for artifact in run["artifacts"])
    assert not any(str(notes) in uri for uri in uris)  # nothing of this machine's folders
    assert {unquote(uri) for uri in uris} == {"wrong.md", "fine.md", "with space é.md"}
    assert "with%20space%20%C3%A9.md" in uris  # RFC 3986 percent-encoding of UTF-8, as urllib.parse.quote does


def test_source_root_option_moves_the_base(notes):
    (notes / "sub").mkdir()
    (notes / "sub" / "deep.md").write_text("{XeF2: bent}\n", encoding="utf-8")
    run = _sarif("--source-root", str(notes), str(notes / "sub" / "deep.md"))["runs"][0]
    (artifact,) = run["artifacts"]
    assert artifact["location"] == {"uri": "sub/deep.md", "uriBaseId": "%SRCROOT%"}
    assert run["originalUriBaseIds"]["%SRCROOT%"]["uri"] == notes.resolve().as_uri() + "/"


def test_fingerprints_survive_moved_lines_and_tell_findings_apart(tmp_path):
    note = tmp_path / "n.md"
    note.write_text("{ClF3: trigonal planar}\n{XeF2: bent}\n{XeF2: bent}\n", encoding="utf-8")
    before = _sarif(".", cwd=tmp_path)["runs"][0]["results"]
    note.write_text("# New heading\n\nSome words first.\n\n{ClF3: trigonal planar}\n{XeF2: bent}\n{XeF2: bent}\n",
                    encoding="utf-8")
    after = _sarif(".", cwd=tmp_path)["runs"][0]["results"]
    prints = [[r["partialFingerprints"] for r in results] for results in (before, after)]
    assert prints[0] == prints[1]
    assert [r["locations"][0]["physicalLocation"]["region"]["startLine"] for r in after] != \
        [r["locations"][0]["physicalLocation"]["region"]["startLine"] for r in before]
    values = [value for fingerprint in prints[0] for value in fingerprint.values()]
    assert len(set(values)) == len(values)  # the two identical XeF2 findings are still two alerts


def test_unreadable_file_is_a_tool_execution_notification(notes):
    (notes / "binary.md").write_bytes(b"\xff\xfe\x00 not text")
    log = _sarif(".", cwd=notes)
    jsonschema.validate(log, json.loads(SCHEMA.read_text(encoding="utf-8")))
    (invocation,) = log["runs"][0]["invocations"]
    assert invocation["executionSuccessful"] is False
    (notification,) = invocation["toolExecutionNotifications"]
    assert notification["level"] == "error"
    location = notification["locations"][0]["physicalLocation"]["artifactLocation"]
    assert location == {"uri": "binary.md", "uriBaseId": "%SRCROOT%"}


def test_odd_file_name_is_percent_encoded_from_its_bytes(tmp_path):
    if sys.platform in ("win32", "darwin"):
        pytest.skip("this file system does not keep a name of arbitrary bytes")
    name = b"odd\xffname\nx.md"
    (tmp_path / os.fsdecode(name)).write_text("{XeF2: bent}\n", encoding="utf-8")
    run = _sarif(".", cwd=tmp_path)["runs"][0]
    (artifact,) = run["artifacts"]
    assert unquote_to_bytes(artifact["location"]["uri"]) == name  # urllib.parse reads back the same bytes


# --- the SARIF multitool, with the GitHub code-scanning rules ------------------------------------

MULTITOOL_FOLDER = Path(__file__).parents[1] / "clients" / "sarif" / "node_modules" / "@microsoft"


def _multitool() -> Path:
    platform = {"linux": "linux", "darwin": "darwin", "win32": "win32"}.get(sys.platform)
    if platform is None:
        pytest.skip(f"the SARIF multitool ships no binary for {sys.platform}")
    if shutil.which("npm") is None and not MULTITOOL_FOLDER.exists():
        pytest.skip("npm not found: the SARIF multitool (tests/clients/sarif) cannot be installed")
    binary = MULTITOOL_FOLDER / f"sarif-multitool-{platform}" / ("Sarif.Multitool.exe" if platform == "win32" else "Sarif.Multitool")
    if not binary.is_file():
        pytest.skip("the SARIF multitool is not installed: run 'make sarif-validator' (npm install in tests/clients/sarif)")
    if not os.access(binary, os.X_OK):
        pytest.skip(f"{binary} is not executable (npm skipped its install script)")
    return binary


def test_multitool_finds_no_problem_with_the_github_rules(notes, tmp_path):
    binary = _multitool()
    (notes / "binary.md").write_bytes(b"\xff\xfe\x00 not text")  # a notification too
    log = tmp_path / "notes.sarif"
    log.write_text(run_notelsp("check", "--format", "sarif", ".", cwd=notes).stdout, encoding="utf-8")
    verdict = tmp_path / "verdict.sarif"
    # Run the binary itself: the package's bin.js passes arguments through a shell, which splits on ';'.
    # Gh and Ghas are the GitHub code-scanning rules (GH1001...); Sarif the format's own advice.
    done = subprocess.run(
        [str(binary), "validate", "--rule-kind", "Gh;Ghas;Sarif", "--output", str(verdict), str(log)],
        capture_output=True, text=True, timeout=300,
        env={**os.environ, "DOTNET_SYSTEM_GLOBALIZATION_INVARIANT": "1"},  # no ICU needed
    )
    assert verdict.is_file(), done.stdout + done.stderr
    results = json.loads(verdict.read_text(encoding="utf-8-sig"))["runs"][0].get("results", [])
    assert results == [], "\n".join(f"{r['ruleId']}: {r['message']}" for r in results)


def test_the_same_finding_in_two_notebook_cells_is_two_alerts(tmp_path):
    nbformat = pytest.importorskip("nbformat")
    cell = "{ClF3: trigonal planar}\n"
    notebook = nbformat.v4.new_notebook(cells=[nbformat.v4.new_markdown_cell(cell), nbformat.v4.new_markdown_cell(cell)])
    nbformat.write(notebook, str(tmp_path / "runs.ipynb"))
    results = [r for r in _sarif(".", cwd=tmp_path)["runs"][0]["results"] if r["ruleId"] == "wrong-shape"]
    assert len(results) == 2
    assert results[0]["partialFingerprints"] != results[1]["partialFingerprints"]
