"""The command line: ``notelsp check``, ``explain``, ``rules``, ``demo`` and ``serve``.

Reads files, hands their text to the review layer and prints what it found.
Exit status of ``check``: 0 no errors, 1 errors found, 2 usage or I/O error.
"""

from __future__ import annotations

import argparse
import fnmatch
import os
import sys
from collections.abc import Iterator, Sequence
from importlib import resources
from pathlib import Path
from typing import TextIO

from . import __version__

NOTE_SUFFIXES = (".md", ".markdown", ".txt")
SKIPPED_FOLDERS = {".git", ".hg", ".svn", "_darcs", "CVS", "node_modules", "__pycache__"}
CONFIG_NAME = ".notelsp.toml"

EXIT_CLEAN, EXIT_ERRORS, EXIT_USAGE = 0, 1, 2


class UsageError(Exception):
    """A problem with what the user asked for: printed as one line, exit status 2."""


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="notelsp",
        description="Check the bonding claims written in lab notes.",
    )
    parser.add_argument("--version", action="version", version=f"notelsp {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")

    check = commands.add_parser("check", help="check notes (files or folders) and report implausible claims")
    check.add_argument("paths", nargs="+", metavar="PATH")
    check.add_argument("--format", choices=("text", "json", "sarif"), default="text")
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
            return _check(args.paths, args.format, args.config, args.cross_check, sys.stdout, args.level)
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
        print(f"notelsp: {problem}", file=sys.stderr)
        return EXIT_USAGE
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return EXIT_CLEAN
    except Exception as error:  # a bug of ours: say so in one line, never a traceback
        print(f"notelsp: internal error ({type(error).__name__}: {error}); please report it", file=sys.stderr)
        return EXIT_USAGE


# --- check --------------------------------------------------------------------


def _check(
    paths: Sequence[str], output: str, config: str | None, cross_check: bool, out: TextIO, level: str | None = None
) -> int:
    from .formats import ReviewedFile
    from .review.document import kind_of_path, review_text

    settings = _load_settings(config, paths)
    reviewed: list[ReviewedFile] = []
    unreadable = False
    for path in _note_files(paths, settings.globs):
        try:
            text = _read_note(path)
        except UsageError as problem:
            print(f"notelsp: {problem}", file=sys.stderr)
            unreadable = True
            continue
        reviewed.append(ReviewedFile(str(path), review_text(text, kind_of_path(str(path)), settings)))
    _write_report(reviewed, output, out)
    has_errors = any(f.severity.value == "error" for r in reviewed for f in r.review.findings)
    if cross_check:
        from .crosscheck.cli import EXIT_CANNOT_RUN, EXIT_DISAGREES, cross_check_paths
        from .crosscheck.levels import DEFAULT_LEVEL_TEXT

        outcome = cross_check_paths(
            [r.path for r in reviewed],
            level=level or DEFAULT_LEVEL_TEXT,
            stream=out if output == "text" else sys.stderr,  # keep JSON and SARIF parseable
            progress=sys.stderr,
            angle_tolerance=settings.angle_tolerance,
        )
        unreadable = unreadable or outcome == EXIT_CANNOT_RUN
        has_errors = has_errors or outcome == EXIT_DISAGREES
    if unreadable:
        return EXIT_USAGE
    return EXIT_ERRORS if has_errors else EXIT_CLEAN


def _write_report(reviewed: list, output: str, out: TextIO) -> None:
    if output == "json":
        from .formats.json_report import write_json

        write_json(reviewed, out)
    elif output == "sarif":
        from .formats.sarif import write_sarif

        write_sarif(reviewed, out)
    else:
        from .formats.text import write_text

        write_text(reviewed, out)


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
            _check(notes, "text", None, False, out)
        finally:
            os.chdir(previous)
    out.write("\nEach line above is path:line:column: severity[rule] message. "
              "Run 'notelsp explain FORMULA' for the full analysis of a species.\n")
    return EXIT_CLEAN


if __name__ == "__main__":
    raise SystemExit(main())
