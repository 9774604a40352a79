"""SARIF output validated against the published SARIF 2.1.0 schema (see tests/data/README.md)."""

import json
from pathlib import Path

import jsonschema

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
    assert replacement["insertedContent"]["text"] == "t-shaped"
