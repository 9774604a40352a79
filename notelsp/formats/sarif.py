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
from pathlib import Path
from typing import Any, TextIO
from urllib.parse import quote

from .. import __version__
from ..notation.model import Span
from ..review.document import kind_of_path
from ..review.findings import Severity
from ..review.rules import RULES, Rule
from . import PROJECT_URL, README_URL, CheckedRun, ReviewedFile, json_text

SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"
SOURCE_ROOT = "%SRCROOT%"
FINGERPRINT = "notelspFinding/v1"  # bump the version if what is hashed changes

_LEVELS = {
    Severity.ERROR: "error",
    Severity.WARNING: "warning",
    Severity.INFORMATION: "note",
    Severity.HINT: "note",
}

# How each kind of note was read, as SARIF's sourceLanguage (lower-case names, as the standard suggests)
_LANGUAGES = {"markdown": "markdown", "text": "plaintext"}

_LITERAL = re.compile(r"``(.+?)``")


def plain_text(doc: str) -> str:
    """A rule docstring without its reStructuredText literal markup (````x```` becomes ``x``)."""
    return _LITERAL.sub(r"\1", doc)


def readme_anchor(rule: Rule) -> str:
    """The anchor GitHub gives the rule's README heading "`code` (severity)": lower case,
    punctuation other than hyphens dropped, spaces made hyphens (common practice, no source)."""
    return f"{rule.code}-{rule.severity.value}"


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
        "helpUri": f"{README_URL}#{readme_anchor(rule)}",
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


def _region(reviewed: ReviewedFile, span: Span) -> dict[str, int]:
    line, column, end_line, end_column = reviewed.location(span)
    return {"startLine": line, "startColumn": column, "endLine": end_line, "endColumn": end_column}


def _fingerprint(parts: tuple[str, ...], occurrence: int) -> str:
    """Stable across runs and line moves: what the finding is about, not where it is."""
    digest = hashlib.sha256("\0".join(parts).encode("utf-8", "surrogateescape")).hexdigest()[:32]
    return f"{digest}:{occurrence}"


def _cell_location(reviewed: ReviewedFile) -> dict[str, Any]:
    """What names a notebook's cell beside the physical location, whose region counts within the cell."""
    return {
        "logicalLocations": [{"name": f"cell {reviewed.cell}", "kind": "element"}],
        "properties": {"cell": reviewed.cell},
    }


def _results(
    reviewed: ReviewedFile,
    location: dict[str, Any],
    rule_index: dict[str, int],
    occurrences: dict[tuple[str, ...], int],  # per artifact: a notebook's cells count on from each other
) -> list[dict[str, Any]]:
    results: list[dict[str, Any]] = []
    for finding in reviewed.review.findings:
        key = (finding.code, location["uri"], reviewed.annotation_text(finding.span), finding.claim or "")
        occurrence = occurrences[key] = occurrences.get(key, 0) + 1
        result: dict[str, Any] = {
            "ruleId": finding.code,
            "ruleIndex": rule_index[finding.code],
            "level": _LEVELS[finding.severity],
            "message": {"text": finding.message},
            "locations": [
                {"physicalLocation": {"artifactLocation": location, "region": _region(reviewed, finding.span)}}
            ],
            "partialFingerprints": {FINGERPRINT: _fingerprint(key, occurrence)},
        }
        if reviewed.cell is not None:
            result["locations"][0].update(_cell_location(reviewed))
        # A replacement addresses the artifact's own text; in a notebook that is the JSON, not the cell,
        # so fixes in cells are left out rather than offered where applying them would break the file.
        if finding.fixes and reviewed.cell is None:
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
    return results


def sarif_dict(run: CheckedRun, source_root: str = ".") -> dict[str, Any]:
    locations = _Locations(source_root)
    rule_index = {code: index for index, code in enumerate(RULES)}
    artifacts: list[dict[str, Any]] = []
    results: list[dict[str, Any]] = []
    previous: ReviewedFile | None = None
    for reviewed in run.files:
        if not (reviewed.cell is not None and previous is not None and previous.path == reviewed.path):
            location = {**locations.of(reviewed.path), "index": len(artifacts)}  # a notebook's cells share one
            artifact: dict[str, Any] = {"location": {key: value for key, value in location.items() if key != "index"}}
            notebook = reviewed.cell is not None or reviewed.path.lower().endswith(".ipynb")  # JSON, not a note
            language = None if notebook else _LANGUAGES.get(kind_of_path(reviewed.path))
            if language:
                artifact["sourceLanguage"] = language
            artifacts.append(artifact)
            occurrences: dict[tuple[str, ...], int] = {}
        results.extend(_results(reviewed, location, rule_index, occurrences))
        previous = reviewed
    notifications: list[dict[str, Any]] = []
    for unreadable in run.unreadable:
        notifications.append({
            "level": "error",
            "message": {"text": f"cannot read this file: {unreadable.reason}"},
            "locations": [{"physicalLocation": {"artifactLocation": locations.of(unreadable.path)}}],
        })
    if not run.files:
        notifications.append({"level": "warning", "message": {"text": "no notes were reviewed"}})
    invocation: dict[str, Any] = {"executionSuccessful": not run.unreadable}
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


def write_sarif(run: CheckedRun, out: TextIO, source_root: str = ".", indent: int | None = None) -> None:
    out.write(json_text(sarif_dict(run, source_root), indent) + "\n")
