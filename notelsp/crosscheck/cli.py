"""``notelsp check --cross-check``: cross-check every annotated species of some files.

``notelsp check --cross-check`` calls :func:`cross_check_paths`.  The report goes to
``stream``; a progress bar goes to ``progress`` (redrawn in place on a
terminal, one plain line per event otherwise).
"""

from __future__ import annotations

import asyncio
import sys
from collections.abc import Iterable
from pathlib import Path
from typing import TextIO

from ..notation.model import Annotation
from ..review.findings import Severity
from ..review.settings import Settings
from .availability import missing_extra
from .levels import DEFAULT_LEVEL_TEXT, Limits, parse_level
from .report import cross_check_findings, cross_check_markdown
from .runner import CrossCheckResult, Progress, cross_check

EXIT_OK, EXIT_DISAGREES, EXIT_CANNOT_RUN = 0, 1, 2
EXIT_CALCULATION_FAILED = 4  # a calculation failed, was killed or ran out of time: agreement is unknown
UNFINISHED = ("failed", "timeout")
BAR_WIDTH = 24


def progress_printer(progress_stream: TextIO):
    """A callback drawing a text progress bar on a terminal, plain lines elsewhere."""
    on_terminal = hasattr(progress_stream, "isatty") and progress_stream.isatty()

    def show(progress: Progress) -> None:
        if on_terminal:
            filled = round(progress.fraction * BAR_WIDTH)
            bar = "#" * filled + "." * (BAR_WIDTH - filled)
            progress_stream.write(f"\r[{bar}] {progress.fraction:4.0%} {progress.message}\033[K")
        else:
            progress_stream.write(f"cross-check: {progress.message}\n")
        progress_stream.flush()

    return show


def _annotations(path: Path) -> tuple[Annotation, ...]:
    from ..notation import scan
    from ..review.document import kind_of_path

    return scan(path.read_text(encoding="utf-8"), kind_of_path(str(path))).annotations


def cross_check_paths(
    paths: Iterable[str | Path],
    level: str = DEFAULT_LEVEL_TEXT,
    stream: TextIO | None = None,
    progress: TextIO | None = None,
    limits: Limits = Limits(),
    angle_tolerance: float = 5.0,
    settings: Settings | None = None,
) -> int:
    """Cross-check each annotated species in ``paths``; returns the exit code.

    ``settings`` (default settings when None) leave out the disabled codes and set the
    severities; a finding still at warning or error after them counts as disagreeing.

    0: every calculation agrees with the claims; 1: a computed value disagrees
    with a claim; 2: nothing could run (bad level, missing extra, unreadable file);
    4: a calculation did not finish (failed, killed, out of time), whatever the others said.
    """
    out = stream or sys.stdout
    named: list[tuple[str, tuple[Annotation, ...]]] = []
    unreadable = False
    for path in map(Path, paths):
        try:
            named.append((str(path), _annotations(path)))
        except (OSError, UnicodeDecodeError) as error:
            out.write(f"notelsp: cannot read {path}: {error}\n")
            unreadable = True
    code = _cross_check_named(named, level, out, progress or sys.stderr, limits, angle_tolerance, settings)
    return EXIT_CANNOT_RUN if unreadable else code


def _cross_check_named(
    named: Iterable[tuple[str, tuple[Annotation, ...]]],
    level: str,
    out: TextIO,
    bar: TextIO,
    limits: Limits,
    angle_tolerance: float,
    settings: Settings | None = None,
) -> int:
    try:
        chosen = parse_level(level)
    except ValueError as error:
        out.write(f"notelsp: {error}\n")
        return EXIT_CANNOT_RUN
    missing = missing_extra()
    if missing:
        out.write(f"notelsp: cross-check unavailable: {missing}\n")
        return EXIT_CANNOT_RUN
    show = progress_printer(bar)
    on_terminal = hasattr(bar, "isatty") and bar.isatty()
    results: dict[str, CrossCheckResult] = {}  # one calculation per species, however often it is annotated
    code = EXIT_OK
    unfinished = False
    for path, found in named:
        for annotation in found:
            if annotation.formula is None or annotation.errors or annotation.is_comparison:
                continue  # a comparison's claims concern several species; one calculation cannot answer them
            formula = annotation.formula
            if formula.text not in results:
                results[formula.text] = asyncio.run(cross_check(formula, chosen, limits, show))
                if on_terminal:
                    bar.write("\n")  # keep the finished bar; the next one starts on its own line
            result = results[formula.text]
            unfinished = unfinished or result.status in UNFINISHED
            markdown = cross_check_markdown(result, annotation, angle_tolerance=angle_tolerance, settings=settings)
            out.write(f"{path}: {{{formula.text}}}\n\n{markdown}\n\n")
            findings = cross_check_findings(result, annotation, angle_tolerance, settings)
            if any(f.severity in (Severity.ERROR, Severity.WARNING) for f in findings):
                code = max(code, EXIT_DISAGREES)
    return EXIT_CALCULATION_FAILED if unfinished else code
