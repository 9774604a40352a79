"""The stable JSON report (documented in the README's "Command line" section).

Top level: ``files`` (one entry per reviewed file, with its findings and its
cautions), ``cautions`` (the run's hazardous species, once each),
``cautions_left_out``, ``unreadable`` and ``totals``. Compact unless an indent
is asked for (indenting costs several times the writing).
"""

from __future__ import annotations

from typing import Any, TextIO

from . import CheckedRun, json_text, utf8_safe


def report_dict(run: CheckedRun) -> dict[str, Any]:
    show_cautions = run.cautions != "none"
    report: list[dict[str, Any]] = []
    for reviewed in run.files:
        findings = []
        for finding in reviewed.review.findings:
            line, column, end_line, end_column = reviewed.location(finding.span)
            findings.append(
                {
                    "cell": reviewed.cell,
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
        cautions = (
            [{"formula": formula, "caution": caution} for formula, caution in reviewed.cautions()]
            if show_cautions else []
        )
        if reviewed.cell is not None and report and report[-1]["path"] == utf8_safe(reviewed.path):
            # a notebook's cells come one after another: one entry for the file, each finding naming its cell
            report[-1]["findings"].extend(findings)
            report[-1]["cautions"].extend(c for c in cautions if c not in report[-1]["cautions"])
        else:
            report.append({"path": utf8_safe(reviewed.path), "findings": findings, "cautions": cautions})
    summary = (
        [{"formula": formula, "caution": caution, "files": n} for formula, caution, n in run.caution_summary()]
        if show_cautions else []
    )
    return {
        "files": report,
        "cautions": summary,
        "cautions_left_out": not show_cautions,
        "unreadable": [{"path": utf8_safe(u.path), "reason": utf8_safe(u.reason)} for u in run.unreadable],
        "totals": run.totals(),
    }


def write_json(run: CheckedRun, out: TextIO, indent: int | None = None) -> None:
    out.write(json_text(report_dict(run), indent) + "\n")
