"""Render a set of reviewed files for the terminal, as JSON or as SARIF 2.1.0.

These are translators at the edge: they read findings and never decide any.
"""

from __future__ import annotations

import re
from bisect import bisect_right
from dataclasses import dataclass, field
from functools import cached_property
from typing import Literal, NamedTuple, Protocol

from ..notation.model import Span
from ..review.document import DocumentReview
from ..review.findings import Severity

CautionMode = Literal["summary", "per-file", "none"]
SEVERITY_ORDER = (Severity.ERROR, Severity.WARNING, Severity.INFORMATION, Severity.HINT)

Region = tuple[int, int, int, int]  # 1-based (line, column, end_line, end_column) in code points; end exclusive


class ReportedFix(NamedTuple):
    title: str
    replacement: str
    region: Region


class ReportedFinding(NamedTuple):
    """One finding as every report shows it: positions already counted, no reference to the note's text."""

    region: Region
    severity: str  # Severity's value
    code: str
    message: str
    formula: str | None
    claim: str | None
    fixes: tuple[ReportedFix, ...]
    annotation: str  # the text of the annotation it is about (SARIF fingerprints; "" when not asked for)


class ReportedFile(NamedTuple):
    """What the reports need of one reviewed file (or notebook cell), small and picklable.

    A report is written from these as each file is done, so a run keeps no whole review
    (text, parses, line index) after its file is written, and worker processes send these back.
    """

    path: str
    cell: int | None
    annotations: int
    findings: tuple[ReportedFinding, ...]
    cautions: tuple[tuple[str, str], ...]  # (formula, caution), once each, in document order; () when not asked

    @property
    def shown_path(self) -> str:
        return self.path if self.cell is None else f"{self.path}#cell={self.cell}"


@dataclass(frozen=True)
class ReviewedFile:
    """One reviewed note (or notebook cell) as a report lists it."""

    path: str  # as the user named it (relative paths stay relative); may hold os.fsdecode surrogates
    review: DocumentReview
    cell: int | None = None  # a notebook's Markdown cell (1-based among all its cells); one ReviewedFile each

    @property
    def shown_path(self) -> str:
        """The path as text reports print it: a cell as ``path#cell=N``, as its lines count within the cell."""
        return self.path if self.cell is None else f"{self.path}#cell={self.cell}"

    def location(self, span: Span) -> tuple[int, int, int, int]:
        """1-based (line, column, end_line, end_column) in code points; end is exclusive."""
        index = self.review.line_index
        line, column = index.line_col(span.start)
        end_line, end_column = index.line_col(span.end)
        return line + 1, column + 1, end_line + 1, end_column + 1

    def cautions(self) -> list[tuple[str, str]]:
        """(formula, caution) for every hazardous species in the file, once each, in document order."""
        return list(self._cautions)

    @cached_property
    def _cautions(self) -> tuple[tuple[str, str], ...]:
        """Worked out once per file, as text, JSON and the run's summary all ask.

        Read from the scanner's position-free parses: no annotation object is made, and a body
        written many times (the parses are shared) is looked at once.
        """
        from ..chem import analyse

        seen: dict[tuple[str, str], None] = {}
        looked_at: set[int] = set()
        for found in self.review.scanned.found:
            parsed = found[4]
            if id(parsed) in looked_at:
                continue
            looked_at.add(id(parsed))
            for formula in parsed.formulas:
                analysis = analyse(formula)
                for caution in analysis.cautions:
                    seen.setdefault((analysis.formula, caution), None)
        return tuple(seen)

    def annotation_count(self) -> int:
        return len(self.review.scanned.found)

    def reported(self, cautions: bool = True, annotation_texts: bool = True) -> ReportedFile:
        """This file as the reports need it; cautions and annotation texts only when the report shows them."""
        text_of = self.annotation_text if annotation_texts else None
        findings = tuple(
            ReportedFinding(
                self.location(finding.span),
                finding.severity.value,
                finding.code,
                finding.message,
                finding.formula,
                finding.claim,
                tuple(ReportedFix(fix.title, fix.replacement, self.location(fix.span)) for fix in finding.fixes),
                text_of(finding.span) if text_of else "",
            )
            for finding in self.review.findings
        )
        return ReportedFile(self.path, self.cell, self.annotation_count(), findings,
                            self._cautions if cautions else ())

    def annotation_text(self, span: Span) -> str:
        """The text of the annotation holding ``span`` ("" for a finding about the note as a whole)."""
        scanned = self.review.scanned
        index = bisect_right(scanned.starts, span.start) - 1
        if index >= 0:
            start, end = scanned.found[index][0], scanned.found[index][1]
            if start <= span.start and span.end <= end:
                return self.review.text[start:end]
        return ""


@dataclass(frozen=True)
class Unreadable:
    """A named file that could not be read, and why."""

    path: str
    reason: str  # e.g. "not UTF-8 text (byte 0)", "Permission denied"


class RunTally:
    """What the end of a report needs, counted as files are written: totals and the caution summary.

    Its size grows with the hazardous species and notebooks met, not with the number of files.
    """

    def __init__(self) -> None:
        self.findings = {severity.value: 0 for severity in SEVERITY_ORDER}
        self.annotations = 0
        self.notes = 0  # files that are not notebook cells
        self.notebooks: set[str] = set()  # a notebook's cells are one file
        self._caution_counts: dict[tuple[str, str], int] = {}
        self._counted_in_notebooks: set[tuple[str, str, str]] = set()

    def add(self, reported: ReportedFile) -> None:
        self.annotations += reported.annotations
        for finding in reported.findings:
            self.findings[finding.severity] += 1
        if reported.cell is None:
            self.notes += 1
        else:
            self.notebooks.add(reported.path)
        for pair in reported.cautions:
            if reported.cell is not None:  # a notebook's cells count as one file
                if (*pair, reported.path) in self._counted_in_notebooks:
                    continue
                self._counted_in_notebooks.add((*pair, reported.path))
            self._caution_counts[pair] = self._caution_counts.get(pair, 0) + 1

    @property
    def files(self) -> int:
        return self.notes + len(self.notebooks)

    def totals(self, unreadable: int) -> dict:
        return {"files": self.files, "annotations": self.annotations, "findings": dict(self.findings),
                "unreadable": unreadable}

    def caution_summary(self) -> list[tuple[str, str, int]]:
        """(formula, caution, number of files) over the run, in order of first appearance."""
        return [(formula, caution, n) for (formula, caution), n in self._caution_counts.items()]


class ReportWriter(Protocol):
    """A report written as the run goes: each file when it is done, the run's summary at the end."""

    tally: RunTally
    wants_cautions: bool  # whether files must carry their cautions
    wants_annotation_texts: bool  # whether findings must carry their annotation's text

    def add(self, reported: ReportedFile) -> None: ...

    def finish(self, unreadable: list[Unreadable]) -> None: ...


@dataclass(frozen=True)
class CheckedRun:
    """Everything one ``check`` run reports, held whole (for callers that have their reviews at hand)."""

    files: list[ReviewedFile]
    unreadable: list[Unreadable] = field(default_factory=list)
    cautions: CautionMode = "summary"

    def _tally(self) -> RunTally:
        tally = RunTally()
        for reviewed in self.files:
            tally.add(reviewed.reported(annotation_texts=False))
        return tally

    def totals(self) -> dict:
        return self._tally().totals(len(self.unreadable))

    def caution_summary(self) -> list[tuple[str, str, int]]:
        """(formula, caution, number of files) over the run, in order of first appearance."""
        return self._tally().caution_summary()

    def write(self, writer: ReportWriter) -> None:
        for reviewed in self.files:
            writer.add(reviewed.reported(writer.wants_cautions, writer.wants_annotation_texts))
        writer.finish(self.unreadable)


# --- names and text that are safe to print ----------------------------------------------------

# Surrogates stand for bytes a file name had that were not UTF-8 (os.fsdecode); C0 and C1
# controls, DEL and the bidirectional overrides could move the cursor, recolour the terminal
# or reorder what is shown.
_UNSAFE_FOR_TERMINAL = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069\ud800-\udfff]")
_SURROGATE = re.compile("[\ud800-\udfff]")
_NAMED = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}


def _escape(match: re.Match) -> str:
    char = match.group()
    code = ord(char)
    if char in _NAMED:
        return _NAMED[char]
    if 0xDC80 <= code <= 0xDCFF:  # an undecodable byte, as os.fsdecode keeps it
        return f"\\x{code - 0xDC00:02x}"
    return f"\\x{code:02x}" if code <= 0xFF else f"\\u{code:04x}"


def terminal_safe(text: str) -> str:
    """``text`` as one line of valid UTF-8: undecodable bytes as ``\\xNN``, controls escaped."""
    return _UNSAFE_FOR_TERMINAL.sub(_escape, text)


def utf8_safe(text: str) -> str:
    """``text`` with undecodable bytes (surrogates) written ``\\xNN``, so it encodes as UTF-8.

    For JSON strings: the encoder escapes control characters itself.
    """
    return _SURROGATE.sub(_escape, text)


def json_text(value: object, indent: int | None = None) -> str:
    """``value`` as JSON text that always encodes as UTF-8.

    Strings are written as they are (``ensure_ascii=False``); a lone surrogate (a JSON
    notebook may hold one as ``\\udcff``) is written back as a JSON escape, since it
    cannot be UTF-8. Compact unless ``indent`` is given.
    """
    import json  # JSON and SARIF reports only: the text report never loads it

    separators = (",", ":") if indent is None else None
    text = json.dumps(value, ensure_ascii=False, indent=indent, separators=separators)
    if _SURROGATE.search(text):  # surrogates occur only inside strings, where the escape means the same
        text = _SURROGATE.sub(lambda match: f"\\u{ord(match.group()):04x}", text)
    return text
