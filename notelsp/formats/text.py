"""Terminal output: one line a finding, ``path:line:col: severity[code] message``.

Every line is valid UTF-8 and one line: file names and claim text are passed
through :func:`terminal_safe`. The last line is the run's totals.
"""

from __future__ import annotations

from typing import TextIO

from ..chem.hazards import SAFETY_CAUTION
from . import CautionMode, CheckedRun, ReportedFile, RunTally, Unreadable, terminal_safe

CAUTIONS_LEFT_OUT = ("hazard cautions left out (--cautions none); predictions are not safety data: "
                     "follow the safety data sheet, local rules and licensed practice")


def _species(formulas: list[str]) -> str:
    return f"{', '.join(formulas)} {'is' if len(formulas) == 1 else 'are'} toxic or reactive"


class TextWriter:
    """Writes each file's lines as it is added; the cautions and totals when finished."""

    wants_annotation_texts = False

    def __init__(self, out: TextIO, cautions: CautionMode = "summary"):
        self.out = out
        self.cautions = cautions
        self.wants_cautions = cautions != "none"
        self.tally = RunTally()

    def add(self, reported: ReportedFile) -> None:
        self.tally.add(reported)
        path = terminal_safe(reported.shown_path)
        lines = []
        for finding in reported.findings:
            line, column, _, _ = finding.region
            lines.append(f"{path}:{line}:{column}: {finding.severity}[{finding.code}] "
                         f"{terminal_safe(finding.message)}\n")
            for fix in finding.fixes:
                lines.append(f"    fix: {terminal_safe(fix.title)}\n")
        if self.cautions == "per-file":
            hazardous = list(dict.fromkeys(formula for formula, _ in reported.cautions))
            if hazardous:
                lines.append(f"{path}: caution: {terminal_safe(_species(hazardous))}; {SAFETY_CAUTION}\n")
        if lines:
            self.out.write("".join(lines))

    def finish(self, unreadable: list[Unreadable]) -> None:
        out = self.out
        for problem in unreadable:
            out.write(f"{terminal_safe(problem.path)}: unreadable: {terminal_safe(problem.reason)}\n")
        if self.cautions == "summary":
            hazardous = list(dict.fromkeys(formula for formula, _, _ in self.tally.caution_summary()))
            if hazardous:
                out.write(f"caution: {terminal_safe(_species(hazardous))}; {SAFETY_CAUTION} "
                          f"('notelsp explain FORMULA' shows each species' caution)\n")
        elif self.cautions == "none":
            out.write(CAUTIONS_LEFT_OUT + "\n")
        out.write(summary_line(self.tally.totals(len(unreadable))) + "\n")


def write_text(run: CheckedRun, out: TextIO) -> None:
    run.write(TextWriter(out, run.cautions))


def _count(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 or word == 'information' else 's'}"


def summary_line(totals: dict) -> str:
    """``3 files, 12 annotations: 1 error, 2 warnings`` (``no findings`` when there are none)."""
    findings = ", ".join(_count(n, kind) for kind, n in totals["findings"].items() if n)
    line = f"{_count(totals['files'], 'file')}, {_count(totals['annotations'], 'annotation')}: {findings or 'no findings'}"
    if totals["unreadable"]:
        line += f"; {_count(totals['unreadable'], 'file')} unreadable"
    return line
