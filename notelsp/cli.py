"""The command line: ``notelsp check``, ``explain``, ``rules``, ``demo`` and ``serve``.

Reads files, hands their text to the review layer and prints what it found.
Exit status of ``check``: 0 nothing at or above ``--fail-level`` (default: error),
1 findings at or above it, 2 usage or I/O error (an unreadable file included),
3 no notes were reviewed (a warning: nothing matched).
"""

from __future__ import annotations

import argparse
import fnmatch
import os
import sys
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any, TextIO

from . import __version__

NOTE_SUFFIXES = (".md", ".markdown", ".txt")
SKIPPED_FOLDERS = {".git", ".hg", ".svn", "_darcs", "CVS", "node_modules", "__pycache__"}
CONFIG_NAME = ".notelsp.toml"

EXIT_CLEAN, EXIT_ERRORS, EXIT_USAGE, EXIT_NOTHING_REVIEWED = 0, 1, 2, 3
FAIL_LEVELS = ("error", "warning", "information", "hint")  # most severe first
STDIN = "-"


class UsageError(Exception):
    """A problem with what the user asked for: printed as one line, exit status 2."""


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="notelsp",
        description="Check the bonding claims written in lab notes.",
    )
    parser.add_argument("-V", "--version", action="version", version=f"notelsp {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    check = commands.add_parser("check", help="check notes (files or folders) and report implausible claims")
    check.add_argument("paths", nargs="*", metavar="PATH", help="a note, a folder of notes, or - for standard input")
    check.add_argument("--format", choices=("text", "json", "sarif"), default="text")
    check.add_argument(
        "--fail-level",
        choices=FAIL_LEVELS,
        default="error",
        help="exit 1 when a finding is this severe or more (default: error)",
    )
    check.add_argument(
        "--files-from",
        metavar="FILE",
        help="also check the NUL-separated paths listed in FILE (- for standard input)",
    )
    check.add_argument(
        "--stdin-name",
        metavar="NAME",
        help="the name reports give standard input; a .txt suffix reads it as plain text (default: <stdin>, Markdown)",
    )
    check.add_argument(
        "--cautions",
        choices=("summary", "per-file", "none"),
        default="summary",
        help="hazard cautions once for the run (default), per file, or left out",
    )
    check.add_argument("--indent", type=int, metavar="N", help="indent JSON and SARIF by N spaces (default: compact)")
    check.add_argument(
        "--source-root",
        metavar="FOLDER",
        default=".",
        help="SARIF: artifact URIs are relative to this folder, as %%SRCROOT%% (default: the current folder)",
    )
    check.add_argument("--config", metavar="FILE", help=f"settings file (default: the nearest {CONFIG_NAME})")
    check.add_argument(
        "--cross-check",
        action="store_true",
        help="also optimise each annotated species with a small quantum-chemistry calculation (needs notelsp[qc])",
    )
    check.add_argument("--level", metavar="METHOD/BASIS", help="level of theory for --cross-check (default HF/3-21G)")

    explain = commands.add_parser("explain", help="show the full analysis of one species")
    explain.add_argument("formula", metavar="FORMULA", help="e.g. ClF3, 'SO4^2-', 'HOCl @O'")
    explain.add_argument("--format", choices=("text", "json"), default="text")

    commands.add_parser("rules", help="list every rule with its explanation (Markdown)")
    commands.add_parser("demo", help="check the bundled demo notebook")

    serve = commands.add_parser("serve", help="run the language server (stdio by default)")
    serve.add_argument("--tcp", metavar="HOST:PORT", help="listen on a loopback TCP port instead (for debugging)")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = _parser()
    args = parser.parse_args(argv)
    try:
        if args.command == "check":
            return _check_command(args, sys.stdout)
        if args.command == "explain":
            return _explain(args.formula, args.format, sys.stdout)
        if args.command == "rules":
            return _rules(sys.stdout)
        if args.command == "demo":
            return _demo(sys.stdout)
        if args.command == "serve":
            from .server import run

            return run(tcp=args.tcp)
        parser.print_help()
        return EXIT_USAGE
    except UsageError as problem:
        from .formats import terminal_safe  # a file name in the message may hold anything

        print(f"notelsp: {terminal_safe(str(problem))}", file=sys.stderr)
        return EXIT_USAGE
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return EXIT_CLEAN
    except Exception as error:  # a bug of ours: say so in one line, never a traceback
        print(f"notelsp: internal error ({type(error).__name__}: {error}); please report it", file=sys.stderr)
        return EXIT_USAGE


# --- check --------------------------------------------------------------------


STDIN_NAME = "<stdin>"


@dataclass(frozen=True)
class CheckOptions:
    """How ``check`` reviews and reports (the command's options, parsed)."""

    output: str = "text"
    config: str | None = None
    cross_check: bool = False
    level: str | None = None
    fail_level: str = "error"
    cautions: str = "summary"
    indent: int | None = None
    source_root: str = "."
    stdin_name: str | None = None


def _check_command(args: argparse.Namespace, out: TextIO) -> int:
    paths = list(args.paths)
    if args.files_from is not None:
        if args.files_from == STDIN and STDIN in paths:
            raise UsageError("standard input cannot be both a note (-) and the list of paths (--files-from -)")
        paths.extend(_paths_from(args.files_from))
    elif not paths:
        raise UsageError("name a note, a folder or - (standard input), or give --files-from FILE")
    if paths.count(STDIN) > 1:
        raise UsageError("standard input (-) can be named once")
    if args.indent is not None and not 0 <= args.indent <= 16:
        raise UsageError(f"--indent must be between 0 and 16 (got {args.indent})")
    options = CheckOptions(
        output=args.format,
        config=args.config,
        cross_check=args.cross_check,
        level=args.level,
        fail_level=args.fail_level,
        cautions=args.cautions,
        indent=args.indent,
        source_root=args.source_root,
        stdin_name=args.stdin_name,
    )
    return _check(paths, options, out)


def _paths_from(source: str) -> list[str]:
    """NUL-separated paths from a file or standard input (empty entries, e.g. a trailing NUL, dropped)."""
    try:
        if source == STDIN:
            data = sys.stdin.buffer.read()
        else:
            with open(source, "rb") as handle:
                data = handle.read()
    except OSError as error:
        raise UsageError(f"cannot read the list of paths {source}: {error.strerror or error}") from None
    return [os.fsdecode(name) for name in data.split(b"\0") if name]


def _read_stdin() -> str:
    try:
        data = sys.stdin.buffer.read()
    except (AttributeError, OSError) as error:  # no standard input at all, or a closed one
        raise UsageError(f"cannot read standard input: {error}") from None
    try:
        return data.decode("utf-8-sig")  # bytes decoded as they are: CRLF kept, as for files
    except UnicodeDecodeError as error:
        raise UsageError(f"not UTF-8 text (byte {error.start})") from None


def _check(paths: Sequence[str], options: CheckOptions, out: TextIO) -> int:
    from .formats import CheckedRun, ReviewedFile, Unreadable, terminal_safe
    from .review.document import kind_of_path, review_text

    settings = _load_settings(options.config, [name for name in paths if name != STDIN])
    reviewed: list[ReviewedFile] = []
    on_disk: list[str] = []  # what the cross-check can read again (not standard input)
    unreadable: list[Unreadable] = []

    def cannot_read(name: str, problem: UsageError) -> None:
        # the reading functions say "cannot read PATH: reason"; the report keeps path and reason apart
        reason = str(problem).removeprefix(f"cannot read {name}: ")
        print(f"notelsp: cannot read {terminal_safe(name)}: {terminal_safe(reason)}", file=sys.stderr)
        unreadable.append(Unreadable(name, reason))

    for name in paths:
        if name == STDIN:
            stdin_name = options.stdin_name or STDIN_NAME
            try:
                text = _read_stdin()
            except UsageError as problem:
                cannot_read(stdin_name, problem)
                continue
            reviewed.append(ReviewedFile(stdin_name, review_text(text, kind_of_path(stdin_name), settings)))
            continue
        for path in _note_files([name], settings.globs):
            try:
                text = _read_note(path)
            except UsageError as problem:
                cannot_read(str(path), problem)
                continue
            reviewed.append(ReviewedFile(str(path), review_text(text, kind_of_path(str(path)), settings)))
            on_disk.append(str(path))
    run = CheckedRun(reviewed, unreadable, options.cautions)  # type: ignore[arg-type]
    _write_report(run, options, out)
    threshold = FAIL_LEVELS.index(options.fail_level)
    failing = any(FAIL_LEVELS.index(f.severity.value) <= threshold for r in reviewed for f in r.review.findings)
    cannot_run = bool(unreadable)
    unfinished = False  # a cross-check calculation failed or ran out of time
    if options.cross_check:
        from .crosscheck.cli import EXIT_CALCULATION_FAILED, EXIT_CANNOT_RUN, EXIT_DISAGREES, cross_check_paths
        from .crosscheck.levels import DEFAULT_LEVEL_TEXT

        if len(on_disk) < len(reviewed):
            print("notelsp: the cross-check reads files again, so it leaves standard input out", file=sys.stderr)
        outcome = cross_check_paths(
            on_disk,
            level=options.level or DEFAULT_LEVEL_TEXT,
            stream=out if options.output == "text" else sys.stderr,  # keep JSON and SARIF parseable
            progress=sys.stderr,
            angle_tolerance=settings.angle_tolerance,
        )
        cannot_run = cannot_run or outcome == EXIT_CANNOT_RUN
        failing = failing or outcome == EXIT_DISAGREES
        unfinished = outcome == EXIT_CALCULATION_FAILED
    if cannot_run:
        return EXIT_USAGE
    if unfinished:
        return EXIT_CALCULATION_FAILED  # agreement unknown: neither "clean" nor only "findings"
    if failing:
        return EXIT_ERRORS
    if not reviewed:
        print("notelsp: warning: no notes were reviewed (none found in the paths given)",
              file=sys.stderr)
        return EXIT_NOTHING_REVIEWED
    return EXIT_CLEAN


def _write_report(run: Any, options: CheckOptions, out: TextIO) -> None:
    if options.output == "json":
        from .formats.json_report import write_json

        write_json(run, out, options.indent)
    elif options.output == "sarif":
        from .formats.sarif import write_sarif

        write_sarif(run, out, options.source_root, options.indent)
    else:
        from .formats.text import write_text

        write_text(run, out)


def _note_files(paths: Sequence[str], globs: Sequence[str]) -> Iterator[Path]:
    """Named files as they are; folders recursed for notes, hidden and VCS folders skipped."""
    for name in paths:
        path = Path(name)
        if path.is_dir():
            yield from _notes_below(path, globs)
        elif path.exists():
            yield path
        else:
            raise UsageError(f"no such file or folder: {name}")


def _notes_below(folder: Path, globs: Sequence[str]) -> Iterator[Path]:
    for root, folders, files in os.walk(folder):
        folders[:] = sorted(f for f in folders if not f.startswith(".") and f not in SKIPPED_FOLDERS)
        for file in sorted(files):
            if file.startswith("."):
                continue
            path = Path(root, file)
            relative = path.relative_to(folder).as_posix()
            if any(_glob_match(relative, pattern) for pattern in globs):
                yield path


def _glob_match(relative: str, pattern: str) -> bool:
    # "**/*.md" should also match a note at the top of the folder ("a.md").
    return fnmatch.fnmatch(relative, pattern) or (
        pattern.startswith("**/") and fnmatch.fnmatch(relative, pattern[3:])
    )


def _read_note(path: Path) -> str:
    try:
        # keep CRLF: offsets must match the file; a leading BOM is no column (editors hide it too)
        with open(path, encoding="utf-8-sig", newline="") as handle:
            return handle.read()
    except UnicodeDecodeError as error:
        raise UsageError(f"cannot read {path}: not UTF-8 text (byte {error.start})") from None
    except OSError as error:
        raise UsageError(f"cannot read {path}: {error.strerror or error}") from None


def _load_settings(config: str | None, paths: Sequence[str]):
    from .review.settings import Settings, settings_from_toml

    if config is not None:
        config_path: Path | None = Path(config)
        if not config_path.is_file():
            raise UsageError(f"no such settings file: {config}")
    else:
        config_path = _nearest_config(Path(paths[0]) if paths else Path.cwd())
    if config_path is None:
        return Settings()
    try:
        text = config_path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as error:
        raise UsageError(f"cannot read {config_path}: {error}") from None
    settings, problems = settings_from_toml(text)
    for problem in problems:
        print(f"notelsp: {config_path}: {problem} (using the default)", file=sys.stderr)
    return settings


def _nearest_config(start: Path) -> Path | None:
    try:
        folder = start.resolve()
    except (OSError, RuntimeError):  # a symlink loop: look from where it was named instead
        folder = start.absolute()
    if not folder.is_dir():
        folder = folder.parent
    for candidate in (folder, *folder.parents):
        if (candidate / CONFIG_NAME).is_file():
            return candidate / CONFIG_NAME
    return None


# --- explain, rules, demo -----------------------------------------------------


def _explain(formula_text: str, output: str, out: TextIO) -> int:
    import json

    from .chem import analyse
    from .chem.report import analysis_to_dict
    from .notation import NotationSyntaxError, parse_formula
    from .review.describe import species_markdown

    try:
        formula = parse_formula(formula_text)
    except NotationSyntaxError as problem:
        shown = formula_text if len(formula_text) <= 80 else formula_text[:77] + "..."
        raise UsageError(f"cannot read the formula {shown!r}: {problem.error.message}") from None
    analysis = analyse(formula)
    if output == "json":
        json.dump(analysis_to_dict(analysis), out, ensure_ascii=False, indent=2)
        out.write("\n")
    else:
        out.write(species_markdown(analysis) + "\n")
    return EXIT_CLEAN


def _rules(out: TextIO) -> int:
    from .review.describe import rules_markdown

    out.write(rules_markdown() + "\n")
    return EXIT_CLEAN


def _demo(out: TextIO) -> int:
    demo = resources.files("notelsp.demo")
    notes = sorted(p.name for p in demo.iterdir() if p.name.endswith(NOTE_SUFFIXES))
    with resources.as_file(demo) as folder:
        out.write(f"Checking the demo notebook ({', '.join(notes)}):\n\n")
        previous = os.getcwd()
        os.chdir(folder)  # report short relative paths
        try:
            _check(notes, CheckOptions(), out)
        finally:
            os.chdir(previous)
    out.write("\nEach line above is path:line:column: severity[rule] message. "
              "Run 'notelsp explain FORMULA' for the full analysis of a species.\n")
    return EXIT_CLEAN


if __name__ == "__main__":
    raise SystemExit(main())
