"""Terminal output: one line a finding, ``path:line:col: severity[code] message``.

Every line is valid UTF-8 and one line: file names and claim text are passed
through :func:`terminal_safe`. The last line is the run's totals.
"""

from __future__ import annotations

from typing import TextIO

from ..chem.hazards import SAFETY_CAUTION
from . import CheckedRun, terminal_safe

CAUTIONS_LEFT_OUT = ("hazard cautions left out (--cautions none); predictions are not safety data: "
                     "follow the safety data sheet, local rules and licensed practice")


def _species(formulas: list[str]) -> str:
    return f"{', '.join(formulas)} {'is' if len(formulas) == 1 else 'are'} toxic or reactive"


def write_text(run: CheckedRun, out: TextIO) -> None:
    for reviewed in run.files:
        path = terminal_safe(reviewed.shown_path)
        for finding in reviewed.review.findings:
            line, column, _, _ = reviewed.location(finding.span)
            out.write(f"{path}:{line}:{column}: {finding.severity.value}[{finding.code}] "
                      f"{terminal_safe(finding.message)}\n")
            for fix in finding.fixes:
                out.write(f"    fix: {terminal_safe(fix.title)}\n")
        if run.cautions == "per-file":
            hazardous = list(dict.fromkeys(formula for formula, _ in reviewed.cautions()))
            if hazardous:
                out.write(f"{path}: caution: {terminal_safe(_species(hazardous))}; {SAFETY_CAUTION}\n")
    for unreadable in run.unreadable:
        out.write(f"{terminal_safe(unreadable.path)}: unreadable: {terminal_safe(unreadable.reason)}\n")
    if run.cautions == "summary":
        hazardous = list(dict.fromkeys(formula for formula, _, _ in run.caution_summary()))
        if hazardous:
            out.write(f"caution: {terminal_safe(_species(hazardous))}; {SAFETY_CAUTION} "
                      f"('notelsp explain FORMULA' shows each species' caution)\n")
    elif run.cautions == "none":
        out.write(CAUTIONS_LEFT_OUT + "\n")
    out.write(summary_line(run.totals()) + "\n")


def _count(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 or word == 'information' else 's'}"


def summary_line(totals: dict) -> str:
    """``3 files, 12 annotations: 1 error, 2 warnings`` (``no findings`` when there are none)."""
    findings = ", ".join(_count(n, kind) for kind, n in totals["findings"].items() if n)
    line = f"{_count(totals['files'], 'file')}, {_count(totals['annotations'], 'annotation')}: {findings or 'no findings'}"
    if totals["unreadable"]:
        line += f"; {_count(totals['unreadable'], 'file')} unreadable"
    return line
