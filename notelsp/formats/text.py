"""Terminal output: one line a finding, ``path:line:col: severity[code] message``."""

from __future__ import annotations

from collections.abc import Iterable
from typing import TextIO

from ..chem.hazards import SAFETY_CAUTION
from . import ReviewedFile


def write_text(files: Iterable[ReviewedFile], out: TextIO) -> None:
    counts = {"error": 0, "warning": 0, "information": 0, "hint": 0}
    for reviewed in files:
        for finding in reviewed.review.findings:
            line, column, _, _ = reviewed.location(finding.span)
            counts[finding.severity.value] += 1
            out.write(f"{reviewed.path}:{line}:{column}: {finding.severity.value}[{finding.code}] {finding.message}\n")
            for fix in finding.fixes:
                out.write(f"    fix: {fix.title}\n")
        hazardous = list(dict.fromkeys(formula for formula, _ in reviewed.cautions()))
        if hazardous:
            out.write(f"{reviewed.path}: caution: {', '.join(hazardous)} {'is' if len(hazardous) == 1 else 'are'} "
                      f"toxic or reactive; {SAFETY_CAUTION}\n")
    summary = ", ".join(f"{n} {kind}{'s' if n != 1 and kind != 'information' else ''}" for kind, n in counts.items() if n)
    out.write(f"{summary or 'no findings'}\n")
