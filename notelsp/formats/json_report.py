"""The stable JSON report (documented in the README)."""

from __future__ import annotations

import json
from collections.abc import Iterable
from typing import Any, TextIO

from . import ReviewedFile


def report_dict(files: Iterable[ReviewedFile]) -> dict[str, Any]:
    report: list[dict[str, Any]] = []
    for reviewed in files:
        findings = []
        for finding in reviewed.review.findings:
            line, column, end_line, end_column = reviewed.location(finding.span)
            findings.append(
                {
                    "line": line,
                    "column": column,
                    "end_line": end_line,
                    "end_column": end_column,
                    "severity": finding.severity.value,
                    "code": finding.code,
                    "message": finding.message,
                    "formula": finding.formula,
                    "claim": finding.claim,
                    "fixes": [{"title": fix.title, "replacement": fix.replacement} for fix in finding.fixes],
                }
            )
        cautions = [{"formula": formula, "caution": caution} for formula, caution in reviewed.cautions()]
        report.append({"path": reviewed.path, "findings": findings, "cautions": cautions})
    return {"files": report}


def write_json(files: Iterable[ReviewedFile], out: TextIO) -> None:
    json.dump(report_dict(files), out, ensure_ascii=False, indent=2)
    out.write("\n")
