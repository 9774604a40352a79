"""SARIF 2.1.0 output, for code-review and CI systems that collect static-analysis results."""

from __future__ import annotations

import json
from collections.abc import Iterable
from pathlib import PurePath
from typing import Any, TextIO

from .. import __version__
from ..notation.model import Span
from ..review.findings import Severity
from ..review.rules import RULES
from . import ReviewedFile

SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"

_LEVELS = {
    Severity.ERROR: "error",
    Severity.WARNING: "warning",
    Severity.INFORMATION: "note",
    Severity.HINT: "note",
}


def _region(reviewed: ReviewedFile, span: Span) -> dict[str, int]:
    line, column, end_line, end_column = reviewed.location(span)
    return {"startLine": line, "startColumn": column, "endLine": end_line, "endColumn": end_column}


def _uri(path: str) -> str:
    return PurePath(path).as_posix()


def sarif_dict(files: Iterable[ReviewedFile]) -> dict[str, Any]:
    files = list(files)
    rule_ids = list(RULES)
    results: list[dict[str, Any]] = []
    for reviewed in files:
        location = {"uri": _uri(reviewed.path)}
        for finding in reviewed.review.findings:
            result: dict[str, Any] = {
                "ruleId": finding.code,
                "ruleIndex": rule_ids.index(finding.code),
                "level": _LEVELS[finding.severity],
                "message": {"text": finding.message},
                "locations": [
                    {"physicalLocation": {"artifactLocation": location, "region": _region(reviewed, finding.span)}}
                ],
            }
            if finding.fixes:
                result["fixes"] = [
                    {
                        "description": {"text": fix.title},
                        "artifactChanges": [
                            {
                                "artifactLocation": location,
                                "replacements": [
                                    {
                                        "deletedRegion": _region(reviewed, fix.span),
                                        "insertedContent": {"text": fix.replacement},
                                    }
                                ],
                            }
                        ],
                    }
                    for fix in finding.fixes
                ]
            results.append(result)
    rules = [
        {
            "id": rule.code,
            "name": rule.code,
            "shortDescription": {"text": rule.title},
            "fullDescription": {"text": rule.doc or rule.title},
            "defaultConfiguration": {"level": _LEVELS[rule.severity]},
        }
        for rule in RULES.values()
    ]
    return {
        "$schema": SCHEMA_URI,
        "version": "2.1.0",
        "runs": [
            {
                "tool": {"driver": {"name": "notelsp", "version": __version__, "rules": rules}},
                "columnKind": "unicodeCodePoints",
                "artifacts": [{"location": {"uri": _uri(f.path)}} for f in files],
                "results": results,
            }
        ],
    }


def write_sarif(files: Iterable[ReviewedFile], out: TextIO) -> None:
    json.dump(sarif_dict(files), out, ensure_ascii=False, indent=2)
    out.write("\n")
