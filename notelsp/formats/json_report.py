"""The stable JSON report (documented in the README's "Command line" section).

Top level: ``files`` (one entry per reviewed file, with its findings and its
cautions), ``cautions`` (the run's hazardous species, once each),
``cautions_left_out``, ``unreadable`` and ``totals``. Compact unless an indent
is asked for (indenting costs several times the writing).
"""

from __future__ import annotations

from typing import Any, TextIO

from . import CautionMode, CheckedRun, ReportedFile, RunTally, Unreadable, json_text, utf8_safe


def _findings(reported: ReportedFile) -> list[dict[str, Any]]:
    return [
        {
            "cell": reported.cell,
            "line": finding.region[0],
            "column": finding.region[1],
            "end_line": finding.region[2],
            "end_column": finding.region[3],
            "severity": finding.severity,
            "code": finding.code,
            "message": finding.message,
            "formula": finding.formula,
            "claim": finding.claim,
            "fixes": [{"title": fix.title, "replacement": fix.replacement} for fix in finding.fixes],
        }
        for finding in reported.findings
    ]


class JsonWriter:
    """Writes the ``files`` array element by element, then the rest of the document when finished.

    The output is the same document, byte for byte, as dumping the whole report at once:
    the top level is dumped with an empty ``files`` and each entry is put in its place,
    indented to its depth when an indent is asked for.
    """

    wants_annotation_texts = False

    def __init__(self, out: TextIO, cautions: CautionMode = "summary", indent: int | None = None):
        self.out = out
        self.show_cautions = self.wants_cautions = cautions != "none"
        self.indent = indent
        self.tally = RunTally()
        self._entry: dict[str, Any] | None = None  # held back while a notebook's next cell may join it
        self._written = 0
        self._head, _ = json_text({"files": []}, indent).split("[]", 1)
        self._entry_start = "" if indent is None else "\n" + " " * (2 * indent)

    def add(self, reported: ReportedFile) -> None:
        self.tally.add(reported)
        path = utf8_safe(reported.path)
        findings = _findings(reported)
        cautions = ([{"formula": formula, "caution": caution} for formula, caution in reported.cautions]
                    if self.show_cautions else [])
        entry = self._entry
        if reported.cell is not None and entry is not None and entry["path"] == path:
            # a notebook's cells come one after another: one entry for the file, each finding naming its cell
            entry["findings"].extend(findings)
            entry["cautions"].extend(c for c in cautions if c not in entry["cautions"])
            return
        self._flush()
        self._entry = {"path": path, "findings": findings, "cautions": cautions}

    def _flush(self) -> None:
        if self._entry is None:
            return
        text = json_text(self._entry, self.indent)
        if self.indent is not None:
            text = text.replace("\n", self._entry_start)  # strings hold no raw line breaks: only layout ones
        self.out.write((self._head + "[" if not self._written else ",") + self._entry_start + text)
        self._written += 1
        self._entry = None

    def finish(self, unreadable: list[Unreadable]) -> None:
        summary = (
            [{"formula": formula, "caution": caution, "files": n}
             for formula, caution, n in self.tally.caution_summary()]
            if self.show_cautions else []
        )
        rest = json_text({
            "files": [],
            "cautions": summary,
            "cautions_left_out": not self.show_cautions,
            "unreadable": [{"path": utf8_safe(u.path), "reason": utf8_safe(u.reason)} for u in unreadable],
            "totals": self.tally.totals(len(unreadable)),
        }, self.indent)
        _, tail = rest.split("[]", 1)
        self._flush()
        if self._written:
            closing = "" if self.indent is None else "\n" + " " * self.indent
            self.out.write(closing + "]" + tail + "\n")
        else:
            self.out.write(self._head + "[]" + tail + "\n")


def write_json(run: CheckedRun, out: TextIO, indent: int | None = None) -> None:
    run.write(JsonWriter(out, run.cautions, indent))
