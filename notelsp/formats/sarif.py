"""SARIF 2.1.0 output, for code-review and CI systems that collect static-analysis results.

What code-scanning services expect beyond the schema: every rule has ``help``
(plain text and Markdown) and an absolute ``helpUri``; every result has
``partialFingerprints`` that survive the note being edited elsewhere; files
under the source root are named relative to ``%SRCROOT%`` (percent-encoded),
so no path of the machine that ran the check appears in an artifact's URI.
Files that could not be read are tool execution notifications.
"""

from __future__ import annotations

import hashlib
import os
import re
import shutil
import tempfile
from pathlib import Path
from typing import Any, TextIO
from urllib.parse import quote

from .. import __version__
from ..review.document import kind_of_path
from ..review.findings import Severity
from ..review.rules import RULES, Rule
from ..review.describe import PROJECT_URL, rule_doc_url  # the project's address, in one place
from . import CheckedRun, Region, ReportedFile, RunTally, Unreadable, json_text

SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"
SOURCE_ROOT = "%SRCROOT%"
FINGERPRINT = "notelspFinding/v1"  # bump the version if what is hashed changes

_LEVELS = {
    Severity.ERROR: "error",
    Severity.WARNING: "warning",
    Severity.INFORMATION: "note",
    Severity.HINT: "note",
}

_LEVELS_BY_VALUE = {severity.value: level for severity, level in _LEVELS.items()}

# How each kind of note was read, as SARIF's sourceLanguage (lower-case names, as the standard suggests)
_LANGUAGES = {"markdown": "markdown", "text": "plaintext"}

_LITERAL = re.compile(r"``(.+?)``")


def plain_text(doc: str) -> str:
    """A rule docstring without its reStructuredText literal markup (````x```` becomes ``x``)."""
    return _LITERAL.sub(r"\1", doc)


def rule_descriptor(rule: Rule) -> dict[str, Any]:
    plain = plain_text(rule.doc)
    return {
        "id": rule.code,
        "shortDescription": {"text": rule.title},
        "fullDescription": {"text": f"{rule.title} {plain}".strip() if plain else rule.title},
        "help": {
            "text": f"{rule.title}\n\n{plain}" if plain else rule.title,
            "markdown": f"**{rule.title}**\n\n{rule.doc}" if rule.doc else f"**{rule.title}**",
        },
        "helpUri": rule_doc_url(rule.code),
        "defaultConfiguration": {"level": _LEVELS[rule.severity]},
    }


class _Locations:
    """Artifact locations relative to the source root when the file is under it."""

    def __init__(self, source_root: str):
        self.root = os.path.abspath(source_root)

    def root_uri(self) -> str:
        uri = Path(self.root).as_uri()
        return uri if uri.endswith("/") else uri + "/"

    def of(self, path: str) -> dict[str, str]:
        absolute = os.path.abspath(path)
        try:
            relative = os.path.relpath(absolute, self.root)
        except ValueError:  # another drive (Windows): not under the root
            relative = os.pardir
        if relative == os.pardir or relative.startswith(os.pardir + os.sep) or os.path.isabs(relative):
            return {"uri": Path(absolute).as_uri()}
        posix = relative.replace(os.sep, "/")
        # os.fsencode gives back the bytes of a name that was not UTF-8, so they are encoded as they are
        return {"uri": quote(os.fsencode(posix), safe="/"), "uriBaseId": SOURCE_ROOT}


def _region(region: Region) -> dict[str, int]:
    line, column, end_line, end_column = region
    return {"startLine": line, "startColumn": column, "endLine": end_line, "endColumn": end_column}


def _fingerprint(parts: tuple[str, ...], occurrence: int) -> str:
    """Stable across runs and line moves: what the finding is about, not where it is."""
    digest = hashlib.sha256("\0".join(parts).encode("utf-8", "surrogateescape")).hexdigest()[:32]
    return f"{digest}:{occurrence}"


def _cell_location(reported: ReportedFile) -> dict[str, Any]:
    """What names a notebook's cell beside the physical location, whose region counts within the cell."""
    return {
        "logicalLocations": [{"name": f"cell {reported.cell}", "kind": "element"}],
        "properties": {"cell": reported.cell},
    }


def _results(
    reported: ReportedFile,
    location: dict[str, Any],
    rule_index: dict[str, int],
    occurrences: dict[tuple[str, ...], int],  # per artifact: a notebook's cells count on from each other
) -> list[dict[str, Any]]:
    results: list[dict[str, Any]] = []
    for finding in reported.findings:
        key = (finding.code, location["uri"], finding.annotation, finding.claim or "")
        occurrence = occurrences[key] = occurrences.get(key, 0) + 1
        result: dict[str, Any] = {
            "ruleId": finding.code,
            "ruleIndex": rule_index[finding.code],
            "level": _LEVELS_BY_VALUE[finding.severity],
            "message": {"text": finding.message},
            "locations": [
                {"physicalLocation": {"artifactLocation": location, "region": _region(finding.region)}}
            ],
            "partialFingerprints": {FINGERPRINT: _fingerprint(key, occurrence)},
        }
        if reported.cell is not None:
            result["locations"][0].update(_cell_location(reported))
        # A replacement addresses the artifact's own text; in a notebook that is the JSON, not the cell,
        # so fixes in cells are left out rather than offered where applying them would break the file.
        if finding.fixes and reported.cell is None:
            result["fixes"] = [
                {
                    "description": {"text": fix.title},
                    "artifactChanges": [
                        {
                            "artifactLocation": location,
                            "replacements": [
                                {
                                    "deletedRegion": _region(fix.region),
                                    "insertedContent": {"text": fix.replacement},
                                }
                            ],
                        }
                    ],
                }
                for fix in finding.fixes
            ]
        results.append(result)
    return results


_RESULTS_PLACE = "notelsp: the results go here"  # a string value no other part of the log can end with
_RESULTS_DEPTH = 4  # the log, "runs", the run, "results": each result sits this many levels in


class SarifWriter:
    """Collects artifacts (one small dict per file) and results as JSON text, spooled to a temporary
    file past a few megabytes; writes the log when finished, the same bytes as dumping it whole."""

    wants_cautions = False  # SARIF carries no cautions
    wants_annotation_texts = True  # fingerprints hash the annotation's text

    def __init__(self, out: TextIO, source_root: str = ".", indent: int | None = None):
        self.out = out
        self.indent = indent
        self.tally = RunTally()
        self.locations = _Locations(source_root)
        self.rule_index = {code: index for index, code in enumerate(RULES)}
        self.artifacts: list[dict[str, Any]] = []
        self._results = tempfile.SpooledTemporaryFile(max_size=8 << 20, mode="w+", encoding="utf-8",
                                                      newline="")
        self._result_count = 0
        self._result_start = "" if indent is None else "\n" + " " * (_RESULTS_DEPTH * indent)
        self._previous: ReportedFile | None = None
        self._location: dict[str, Any] = {}
        self._occurrences: dict[tuple[str, ...], int] = {}

    def add(self, reported: ReportedFile) -> None:
        self.tally.add(reported)
        previous = self._previous
        if not (reported.cell is not None and previous is not None and previous.path == reported.path):
            location = {**self.locations.of(reported.path), "index": len(self.artifacts)}  # a notebook's cells share one
            artifact: dict[str, Any] = {"location": {key: value for key, value in location.items() if key != "index"}}
            notebook = reported.cell is not None or reported.path.lower().endswith(".ipynb")  # JSON, not a note
            language = None if notebook else _LANGUAGES.get(kind_of_path(reported.path))
            if language:
                artifact["sourceLanguage"] = language
            self.artifacts.append(artifact)
            self._location, self._occurrences = location, {}
        self._previous = reported._replace(findings=())  # only its path and cell are looked at again
        for result in _results(reported, self._location, self.rule_index, self._occurrences):
            text = json_text(result, self.indent)
            if self.indent is not None:
                text = text.replace("\n", self._result_start)  # strings hold no raw line breaks
            self._results.write(("," if self._result_count else "") + self._result_start + text)
            self._result_count += 1

    def finish(self, unreadable: list[Unreadable]) -> None:
        log = sarif_log(self.artifacts, _RESULTS_PLACE, unreadable, self.locations, reviewed_any=self.tally.files > 0)
        text = json_text(log, self.indent)
        head, tail = text.rsplit(json_text(_RESULTS_PLACE), 1)  # the last string of the log: the results
        self.out.write(head)
        if self._result_count:
            self.out.write("[")
            self._results.seek(0)
            shutil.copyfileobj(self._results, self.out)
            self.out.write(("" if self.indent is None else "\n" + " " * ((_RESULTS_DEPTH - 1) * self.indent)) + "]")
        else:
            self.out.write("[]")
        self.out.write(tail + "\n")
        self._results.close()


def sarif_log(
    artifacts: list[dict[str, Any]],
    results: Any,
    unreadable: list[Unreadable],
    locations: _Locations,
    reviewed_any: bool,
) -> dict[str, Any]:
    notifications: list[dict[str, Any]] = []
    for problem in unreadable:
        notifications.append({
            "level": "error",
            "message": {"text": f"cannot read this file: {problem.reason}"},
            "locations": [{"physicalLocation": {"artifactLocation": locations.of(problem.path)}}],
        })
    if not reviewed_any:
        notifications.append({"level": "warning", "message": {"text": "no notes were reviewed"}})
    invocation: dict[str, Any] = {"executionSuccessful": not unreadable}
    if notifications:
        invocation["toolExecutionNotifications"] = notifications
    return {
        "$schema": SCHEMA_URI,
        "version": "2.1.0",
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "notelsp",
                        "version": __version__,
                        "informationUri": PROJECT_URL,
                        "rules": [rule_descriptor(rule) for rule in RULES.values()],
                    }
                },
                "invocations": [invocation],
                "originalUriBaseIds": {SOURCE_ROOT: {"uri": locations.root_uri()}},
                "columnKind": "unicodeCodePoints",
                "artifacts": artifacts,
                "results": results,
            }
        ],
    }


def sarif_dict(run: CheckedRun, source_root: str = ".") -> dict[str, Any]:
    """The whole log as a dict (for callers that hold their reviews)."""
    import io
    import json

    out = io.StringIO()
    write_sarif(run, out, source_root)
    return json.loads(out.getvalue())


def write_sarif(run: CheckedRun, out: TextIO, source_root: str = ".", indent: int | None = None) -> None:
    run.write(SarifWriter(out, source_root, indent))
