"""The command line: ``notelsp check``, ``explain``, ``rules``, ``demo`` and ``serve``.

Reads files, hands their text to the review layer and prints what it found.
Exit status of ``check``: 0 nothing at or above ``--fail-level`` (default: error),
1 findings at or above it, 2 usage or I/O error (an unreadable file included),
3 no notes were reviewed (a warning: nothing matched), 4 with ``--cross-check``:
a calculation failed, was killed or ran out of time.
"""

from __future__ import annotations

import argparse
import functools
import gc
import os
import sys
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, TextIO

from . import __version__

NOTE_SUFFIXES = (".md", ".markdown", ".txt")
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
    check.add_argument("--level", metavar="METHOD/BASIS", help="level of theory for --cross-check (default HF/6-31G*)")
    check.add_argument(
        "--rules-only",
        action="store_true",
        help="judge by the rules alone, at once: compute no geometries (also NOTELSP_COMPUTE=off)",
    )
    check.add_argument(
        "--review-all",
        action="store_true",
        help="review every note again, neither reading nor keeping the reports of unchanged notes "
             "(also NOTELSP_REPORT_CACHE=off)",
    )

    explain = commands.add_parser("explain", help="show the full analysis of one species")
    explain.add_argument("formula", metavar="FORMULA", help="e.g. ClF3, 'SO4^2-', 'HOCl @O'")
    explain.add_argument("--format", choices=("text", "json"), default="text")

    report = commands.add_parser("report", help="write a reviewer's page (one self-contained HTML file) with drawings")
    report.add_argument("paths", nargs="+", metavar="PATH")
    report.add_argument("-o", "--output", required=True, metavar="FILE.html", help="where to write the page")
    report.add_argument("--config", metavar="FILE", help=f"settings file for every note (default: each note's nearest {CONFIG_NAME})")

    commands.add_parser("rules", help="list every rule with its explanation (Markdown)")
    demo = commands.add_parser("demo", help="check the bundled demo notebook")
    demo.add_argument("--page", metavar="FILE.html", help="also write the demo notebook's review page there")

    serve = commands.add_parser("serve", help="run the language server (stdio by default)")
    serve.add_argument("--tcp", metavar="HOST:PORT", help="listen on a loopback TCP port instead (for debugging)")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = _parser()
    args = parser.parse_args(argv)
    thresholds = gc.get_threshold()
    if args.command != "serve":  # a long-lived server keeps the default (it freezes what start-up made)
        # What start-up imports and builds lives to the end of the run: collecting the youngest
        # generation every 700 allocations walked it again and again (a twentieth of a one-note check).
        gc.set_threshold(*BATCH_GC_THRESHOLD)
        _freeze_at_exit()
    try:
        if args.command == "check":
            return _check_command(args, sys.stdout)
        if args.command == "explain":
            return _explain(args.formula, args.format, sys.stdout)
        if args.command == "report":
            return _report(args.paths, args.output, args.config)
        if args.command == "rules":
            return _rules(sys.stdout)
        if args.command == "demo":
            return _demo(sys.stdout, args.page)
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
    finally:
        gc.set_threshold(*thresholds)


@functools.cache  # registered once per process
def _freeze_at_exit() -> None:
    """At exit the interpreter's last collections would walk every object the run made, only to free
    memory the operating system takes back anyway (a twentieth of a one-note check): freeze them first."""
    import atexit

    atexit.register(gc.freeze)


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
    compute: bool = True  # compute each species' geometry (GFN2-xTB) and judge claims against it too
    remembered: bool = True  # reuse the kept report of a note unchanged since it was reviewed (report_cache.py)


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
    if not os.path.isdir(args.source_root):
        raise UsageError(f"--source-root is not a folder: {args.source_root}")
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
        compute=not args.rules_only,
        remembered=not args.review_all,
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


_stdin_read: list = []  # standard input as first read (or why it could not be): read once, used twice


def _read_stdin() -> str:
    if _stdin_read:
        found = _stdin_read[0]
        if isinstance(found, UsageError):
            raise found
        return found
    try:
        _stdin_read.append(_read_stdin_once())
    except UsageError as problem:
        _stdin_read.append(problem)
        raise
    return _stdin_read[0]


def _read_stdin_once() -> str:
    try:
        data = sys.stdin.buffer.read()
    except (AttributeError, OSError) as error:  # no standard input at all, or a closed one
        raise UsageError(f"cannot read standard input: {error}") from None
    try:
        return data.decode("utf-8-sig")  # bytes decoded as they are: CRLF kept, as for files
    except UnicodeDecodeError as error:
        raise UsageError(f"not UTF-8 text (byte {error.start})") from None


POOL_MIN_NOTES = 200  # below this, starting worker processes costs more CPU than it saves in waiting
NOTES_PER_TASK = 16  # small enough to spread the work evenly, large enough that sending it is cheap
WORKERS_VARIABLE = "NOTELSP_WORKERS"  # 1: one process; N >= 2: N workers whatever the number of notes
# A batch run makes many objects that live until its end (parses and analyses, cached by text):
# collecting the youngest generation every 700 allocations walked them again and again.
BATCH_GC_THRESHOLD = (50_000, 20, 20)


def _check(paths: Sequence[str], options: CheckOptions, out: TextIO) -> int:
    import gc

    from .formats import Unreadable, terminal_safe

    found = _note_files(paths, options.config)  # every settings file is read first: a bad one stops the run
    settings = found.settings  # standard input's and the cross-check's
    writer = _report_writer(options, out)
    on_disk: list[str] = []  # what the cross-check can read again (not standard input)
    unreadable: list[Unreadable] = []
    notebooks_left_out = False
    reviewed = 0

    def cannot_read(name: str, problem: str) -> None:
        # the reading functions say "cannot read PATH: reason"; the report keeps path and reason apart
        reason = problem.removeprefix(f"cannot read {name}: ")
        print(f"notelsp: cannot read {terminal_safe(name)}: {terminal_safe(reason)}", file=sys.stderr)
        unreadable.append(Unreadable(name, reason))

    items: list[Any] = []  # in the order reports list them: None for standard input, else a note
    for name in paths:
        items.extend([None] if name == STDIN else found.named[name])
    cache = _report_cache(options, writer)
    looked_up = _looked_up(items, options, settings, cache, options.compute and not computing_switched_off())
    computed = _computed_for(looked_up.wanted, looked_up.computing_hit)
    _computed.clear()
    _computed.update(computed)
    looked_up.keep_only_whole(computed)
    misses = [(item, looked_up.remember.get(index)) for index, item in enumerate(items) if index not in looked_up.hits]
    notes = sum(item is not None for item, _ in misses)
    workers = 1 if options.output == "html" else _workers_for(notes)  # the page needs whole reviews
    thresholds = gc.get_threshold()
    gc.freeze()  # what the imports made is kept to the end: no collection need walk it
    gc.set_threshold(*BATCH_GC_THRESHOLD)
    try:
        outcomes = _reviewed_items([item for item, _ in misses], workers, writer, options, settings,
                                   [remember for _, remember in misses])
        for item, outcome in _in_order(items, looked_up.hits, outcomes, cache, writer):
            files, problem, notebook, messages = outcome
            if messages:
                sys.stderr.write(messages)  # what reading the note said, in a worker, in its place
            name = (options.stdin_name or STDIN_NAME) if item is None else str(item.path)
            if problem is not None:
                cannot_read(name, problem)
            elif item is not None and not notebook:
                on_disk.append(name)
            notebooks_left_out = notebooks_left_out or (notebook and item is not None)
            for reported in files:
                writer.add(reported)
                reviewed += 1
        writer.finish(unreadable)
    finally:
        gc.set_threshold(*thresholds)
        gc.unfreeze()
    if cache is not None:
        cache.kept += len(looked_up.remember)
        cache.finish()
    threshold = FAIL_LEVELS.index(options.fail_level)
    failing = any(writer.tally.findings[level] for level in FAIL_LEVELS[: threshold + 1])
    cannot_run = bool(unreadable)
    unfinished = False  # a cross-check calculation failed or ran out of time
    if options.cross_check:
        from .crosscheck.cli import EXIT_CALCULATION_FAILED, EXIT_CANNOT_RUN, EXIT_DISAGREES, cross_check_paths
        from .crosscheck.levels import DEFAULT_LEVEL_TEXT

        if STDIN in paths:
            print("notelsp: the cross-check reads files again, so it leaves standard input out", file=sys.stderr)
        if notebooks_left_out:
            print("notelsp: the cross-check reads notes only, so it leaves notebooks out", file=sys.stderr)
        outcome = cross_check_paths(
            on_disk,
            level=options.level or DEFAULT_LEVEL_TEXT,
            stream=out if options.output == "text" else sys.stderr,  # keep JSON and SARIF parseable
            progress=sys.stderr,
            angle_tolerance=settings.angle_tolerance,
            settings=settings,
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


def _report_writer(options: CheckOptions, out: TextIO) -> Any:
    """The report, written as files are reviewed (see ``ReportWriter`` in notelsp/formats)."""
    if options.output == "html":
        return _PageWriter(out)
    if options.output == "json":
        from .formats.json_report import JsonWriter

        return JsonWriter(out, options.cautions, options.indent)  # type: ignore[arg-type]
    if options.output == "sarif":
        from .formats.sarif import SarifWriter

        return SarifWriter(out, options.source_root, options.indent)
    from .formats.text import TextWriter

    return TextWriter(out, options.cautions)  # type: ignore[arg-type]


def _report_cache(options: CheckOptions, writer: Any) -> Any:
    """The kept reports of unchanged notes (notelsp/report_cache.py); None for the page (it needs whole
    reviews), with --review-all or NOTELSP_REPORT_CACHE=off, or without a cache folder."""
    if options.output == "html" or not options.remembered:
        return None
    from . import report_cache

    where = None if report_cache.switched_off() else report_cache.folder()
    if where is None:
        return None
    return report_cache.ReportCache(where, writer.wants_cautions, writer.wants_annotation_texts)


@dataclass
class _LookedUp:
    """What reading every note once before any review found (by each note's index among the items)."""

    hits: dict[int, Any]  # the outcome kept for a note unchanged since its report was kept
    remember: dict[int, Any]  # where a reviewed note's report is to be kept (report_cache.Remembered)
    wanted: dict[str, None]  # the species the notes to review name, as written, in order
    named: dict[int, dict[str, None]]  # the species each note to review with computed geometries names
    computing_hit: bool = False  # a kept report was made with computed geometries

    def keep_only_whole(self, computed: dict[str, Any]) -> None:
        """A report that used a failed or unfinished calculation may come out otherwise next time: not kept."""
        for index, named in self.named.items():
            if index in self.remember and not all(_computed_whole(computed[text]) for text in named if text in computed):
                del self.remember[index]


def _computed_whole(species: Any) -> bool:
    """Every structure computed to the end, or skipped for a reason of the species itself (species_cache.store's
    condition for keeping a species: what the same code, versions and limits give again)."""
    if any(structure.failed is not None for structure in species.structures):
        return False
    return (species.skipped is None) != (not species.structures)


def _looked_up(items: list, options: CheckOptions, settings: Any, cache: Any, computing: bool) -> _LookedUp:
    """Each note read once before any review: its kept report when it has one (then it is not scanned or
    reviewed), else, when geometries are computed for it, the species it names.

    What cannot be read here is reported when it is reviewed; what reading says is printed in the note's place.
    """
    import contextlib
    import io

    found = _LookedUp({}, {}, {}, {})
    if cache is None and not computing:
        return found
    for index, item in enumerate(items):
        note_settings = settings if item is None else item.settings
        computes = computing and getattr(note_settings, "compute", True)
        said = io.StringIO()
        try:
            with contextlib.redirect_stderr(said):
                text, kind = (_read_stdin(), _stdin_kind(options)) if item is None else (_read_note(item), item.kind)
        except UsageError:
            continue
        remember = None
        if cache is not None and item is not None:  # standard input is not kept
            path = str(item.path)
            remember = cache.remembered(path, kind, text, note_settings, computes)
            if remember is not None and not computes and cache.present(remember):
                # read when its turn to be written comes (a run keeps no more than one report at a time);
                # should it be unusable then, the note is reviewed there, as it needs no computed geometry
                found.hits[index] = _Kept(remember, said.getvalue())
                continue
            kept = None if remember is None else cache.load(remember, path, kind == "notebook")
            if kept is not None:  # read now: the species of a note reviewed later are computed before any review
                found.hits[index] = (kept, None, kind == "notebook", said.getvalue())
                found.computing_hit = True
                continue
        if computes:
            found.named[index] = _species_named(text, kind)
            found.wanted.update(found.named[index])
        if remember is not None:
            found.remember[index] = remember
    return found


@dataclass(frozen=True)
class _Kept:
    """A note (reviewed without computed geometries) whose kept report is read when it is written."""

    remember: Any  # report_cache.Remembered
    said: str  # what reading the note wrote on standard error


def _in_order(items: list, hits: dict[int, Any], reviewed: Any, cache: Any, writer: Any):
    """Each item with its outcome in the order of ``items``: kept outcomes where there are, the rest reviewed."""
    def reported(reviewed_file: Any) -> Any:
        return reviewed_file.reported(writer.wants_cautions, writer.wants_annotation_texts)

    try:
        for index, item in enumerate(items):
            if index not in hits:
                yield next(reviewed)
                continue
            kept = hits.pop(index)
            if isinstance(kept, _Kept):
                notebook = item.kind == "notebook"
                files = cache.load(kept.remember, str(item.path), notebook)
                if files is None:  # damaged or removed since it was looked up
                    cache.kept += 1
                    kept = _review_note(item, reported, kept.remember)
                else:
                    kept = (files, None, notebook, kept.said)
            yield item, kept
    finally:
        reviewed.close()  # a pool's workers end when the report stops early


class _PageWriter:
    """The reviewer's page shows each annotation beside its findings: it keeps the whole reviews."""

    wants_cautions = wants_annotation_texts = False

    def __init__(self, out: TextIO):
        from .formats import RunTally

        self.out, self.tally, self.files = out, RunTally(), []

    def add(self, reviewed: Any) -> None:
        self.tally.add(reviewed.reported(cautions=False, annotation_texts=False))
        self.files.append(reviewed)

    def finish(self, unreadable: list) -> None:
        from .formats.html_report import write_html

        write_html(self.files, self.out)


# One note's outcome: (what the report gets of each file, why it could not be read or None,
# whether it was a notebook, what reading it wrote on standard error). Picklable: workers send it back.
_Outcome = tuple[list, "str | None", bool, str]


def _workers_for(notes: int) -> int:
    """How many processes review: one for a few notes, one per core for many (or NOTELSP_WORKERS)."""
    asked = os.environ.get(WORKERS_VARIABLE, "").strip()
    if asked:
        if not asked.isdigit() or int(asked) < 1:
            raise UsageError(f"{WORKERS_VARIABLE} must be a whole number of processes, 1 or more (got {asked!r})")
        return min(int(asked), max(notes, 1))
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1)
    return min(cores, 8) if notes >= POOL_MIN_NOTES else 1


def _review_note(note: Any, reported: Any, remember: Any = None) -> _Outcome:
    """One note's outcome; its report kept where ``remember`` (report_cache.Remembered) says, if given."""
    from .formats import ReviewedFile

    try:
        text = _read_note(note)
    except UsageError as problem:
        return [], str(problem), False, ""
    if note.kind == "notebook":  # one review per Markdown cell, each report naming its cell
        try:
            files = [reported(cell) for cell in _notebook_reviews(str(note.path), text, note.settings)]
        except UsageError as problem:
            return [], str(problem), True, ""
    else:
        files = [reported(ReviewedFile(str(note.path), _reviewed(str(note.path), text, note.kind, note.settings)))]
    if remember is not None:
        remember.keep(text, files)
    return files, None, note.kind == "notebook", ""


def _review_stdin(options: CheckOptions, settings: Any, reported: Any) -> _Outcome:
    from .formats import ReviewedFile
    from .review.document import kind_of_path

    stdin_name = options.stdin_name or STDIN_NAME
    try:
        text = _read_stdin()
    except UsageError as problem:
        return [], str(problem), False, ""
    if stdin_name.lower().endswith(".ipynb"):  # --stdin-name says it is a notebook
        try:
            return [reported(cell) for cell in _notebook_reviews(stdin_name, text, settings)], None, True, ""
        except UsageError as problem:
            return [], str(problem), True, ""
    return [reported(ReviewedFile(stdin_name, _reviewed(stdin_name, text, kind_of_path(stdin_name), settings)))], \
        None, False, ""


def _review_notes_in_worker(notes: list, wants_cautions: bool, wants_annotation_texts: bool,
                            remember: list | None = None) -> list[_Outcome]:
    """A worker's task: review these notes, return what the report needs of each (no review objects)."""
    import contextlib
    import io

    def reported(reviewed: Any) -> Any:
        return reviewed.reported(wants_cautions, wants_annotation_texts)

    outcomes = []
    for note, kept_at in zip(notes, remember or [None] * len(notes)):
        said = io.StringIO()
        with contextlib.redirect_stderr(said):  # e.g. "only its beginning was read": printed by the parent
            files, problem, notebook, _ = _review_note(note, reported, kept_at)
        outcomes.append((files, problem, notebook, said.getvalue()))
    return outcomes


def _worker_started(computed: dict | None = None) -> None:
    import gc
    import signal

    _computed.update(computed or {})
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is the parent's to handle: it ends the workers
    gc.freeze()
    gc.set_threshold(*BATCH_GC_THRESHOLD)


def _reviewed_items(items: list, workers: int, writer: Any, options: CheckOptions, settings: Any,
                    remember: list | None = None):
    """Each item with its outcome, in order; notes reviewed by ``workers`` processes when more than one, each
    report kept where ``remember`` (one place or None per item) says."""
    remember = remember or [None] * len(items)
    if options.output == "html":
        def reported(reviewed: Any) -> Any:
            return reviewed
    else:
        def reported(reviewed: Any) -> Any:
            return reviewed.reported(writer.wants_cautions, writer.wants_annotation_texts)

    if workers <= 1:
        for item, kept_at in zip(items, remember):
            yield item, (_review_stdin(options, settings, reported) if item is None
                         else _review_note(item, reported, kept_at))
        return
    yield from _pooled(items, workers, writer, options, settings, reported, remember)


def _pooled(items: list, workers: int, writer: Any, options: CheckOptions, settings: Any, reported: Any,
            remember: list):
    """Notes in tasks of a few to a pool of processes; standard input in this one; outcomes in order."""
    import multiprocessing
    from collections import deque
    from concurrent.futures import ProcessPoolExecutor

    methods = multiprocessing.get_all_start_methods()
    # a fork server imports notelsp once and forks each worker from it; spawn imports it in each worker
    context = multiprocessing.get_context("forkserver" if "forkserver" in methods else "spawn")
    if context.get_start_method() == "forkserver":
        context.set_forkserver_preload(["notelsp.cli", "notelsp.formats", "notelsp.review.document"])
    pool = ProcessPoolExecutor(workers, mp_context=context, initializer=_worker_started, initargs=(dict(_computed),))
    tasks: list[tuple[list, list]] = []  # ([], []) for standard input, (remember, notes) for a task of notes
    for item, kept_at in zip(items, remember):
        if item is None:
            tasks.append(([], []))
        elif tasks and tasks[-1][1] and len(tasks[-1][1]) < NOTES_PER_TASK:
            tasks[-1][0].append(kept_at)
            tasks[-1][1].append(item)
        else:
            tasks.append(([kept_at], [item]))
    wanted = (writer.wants_cautions, writer.wants_annotation_texts)
    pending: deque = deque()
    window = 4 * workers  # tasks sent ahead: workers never wait, and results waiting to be written stay few
    finished = False
    try:
        for kept_at, notes in tasks:
            pending.append((notes, pool.submit(_review_notes_in_worker, notes, *wanted, kept_at) if notes else None))
            while len(pending) > window:
                yield from _task_outcomes(*pending.popleft(), options, settings, reported)
        while pending:
            yield from _task_outcomes(*pending.popleft(), options, settings, reported)
        finished = True
    finally:
        if not finished:  # Ctrl-C, a closed pipe, an error: the workers' tasks are no longer wanted
            for process in list(getattr(pool, "_processes", {}).values()):
                process.terminate()
        pool.shutdown(wait=True, cancel_futures=True)
        _stop_fork_server(context)


def _task_outcomes(notes: list, future: Any, options: CheckOptions, settings: Any, reported: Any):
    if future is None:
        yield None, _review_stdin(options, settings, reported)
        return
    yield from zip(notes, future.result())


def _stop_fork_server(context: Any) -> None:
    """Ends the fork server now and waits for it, so its CPU time and its workers' count as this process's
    children's (resource.getrusage), rather than it ending on its own after this process."""
    if context.get_start_method() != "forkserver":
        return
    from multiprocessing import forkserver

    stop = getattr(getattr(forkserver, "_forkserver", None), "_stop", None)
    if stop is not None:
        stop()


@dataclass(frozen=True)
class _FoundNotes:
    """The notes each named path stands for, and the settings of the first."""

    named: dict[str, list[Any]]  # each named path -> its notes (notelsp.notefiles.NoteFile)
    settings: Any  # the first path's settings (standard input: the current folder's), for the cross-check


def _note_files(paths: Sequence[str], config: str | None) -> _FoundNotes:
    """The notes each path stands for, with their settings: ``--config`` or each note's nearest settings file.

    Every settings file is read before any note: a problem in one stops the run (a typo
    must not quietly loosen the review), all problems listed.
    """
    from .notefiles import NoteFinder

    finder = NoteFinder(config)  # folders give notes of every kind, notebooks included
    named = {name: finder.notes(name) for name in dict.fromkeys(paths) if name != STDIN}
    first = paths[0] if paths else STDIN
    settings = finder.settings_at(Path.cwd()) if first == STDIN else (
        named[first][0].settings if named[first] else finder.settings_at(Path(first)))
    if finder.problems:
        from .formats import terminal_safe

        for problem in finder.problems:
            print(f"notelsp: {terminal_safe(problem)}", file=sys.stderr)
        raise UsageError("nothing was reviewed: the settings above are not valid")
    return _FoundNotes(named, settings)


def _read_note(note: Any) -> str:
    from .notefiles import MAX_NOTE_BYTES, FileProblem, read_note

    if note.problem is None and note.kind == "notebook":
        return _read_notebook(note.path)
    if note.problem is not None:
        raise UsageError(f"cannot read {note.path}: {note.problem}")
    try:
        read = read_note(note.path)
    except FileProblem as problem:
        raise UsageError(f"cannot read {note.path}: {problem}") from None
    if read.truncated:
        print(f"notelsp: {note.path}: larger than {MAX_NOTE_BYTES:,} bytes; only its beginning was read",
              file=sys.stderr)
    return read.text


def _read_notebook(path: Path) -> str:
    from .notation.notebook import MAX_NOTEBOOK_CHARS
    from .notefiles import FileProblem, read_text

    try:
        # outputs (images) make notebooks larger than notes; a cut notebook is not JSON, so refuse it whole
        read = read_text(path, MAX_NOTEBOOK_CHARS)
    except FileProblem as problem:
        raise UsageError(f"cannot read {path}: {problem}") from None
    if read.truncated:
        raise UsageError(f"cannot read {path}: larger than {MAX_NOTEBOOK_CHARS:,} bytes, more than a notebook of notes")
    return read.text


def _notebook_reviews(path: str, text: str, settings: Any) -> list:
    """One reviewed file per Markdown cell (positions within the cell); the file alone when it has none."""
    from .formats import ReviewedFile
    from .notation.notebook import NotebookError, markdown_cells

    try:
        cells = markdown_cells(text)
    except NotebookError as problem:
        raise UsageError(f"cannot read {path}: {problem}") from None
    if not cells:  # still listed in the report, with nothing found
        return [ReviewedFile(path, _analysis_host().review_text("", "markdown", settings))]
    return [ReviewedFile(path, _reviewed(f"{path}#cell{cell.number}", cell.source, "markdown", settings), cell.number)
            for cell in cells]


@functools.lru_cache(maxsize=1)  # no argument: one host, made on first use
def _analysis_host() -> Any:
    """This process's analysis host (each worker of a pool has its own): notes share what it remembers."""
    from .review.host import AnalysisHost

    return AnalysisHost()


def _reviewed(name: str, text: str, kind: Any, settings: Any) -> Any:
    """The review of one note, opened in the analysis host, reviewed and closed again."""
    host = _analysis_host()
    host.open(name, None, text, kind)
    try:
        host.set_settings(name, settings)
        host.set_computed(name, _computed_with(settings) or {})
        return host.review(name)
    finally:
        host.close(name)


# --- computed geometries ----------------------------------------------------


COMPUTE_VARIABLE = "NOTELSP_COMPUTE"  # "off" (or 0, false, no): every check is rules-only (the server reads it too)

# The computed species of this run, keyed by the species as written (what review_text's ``computed``
# takes); set by _check before reviewing, and handed to review workers when they start.
_computed: dict[str, Any] = {}


def computing_switched_off() -> bool:
    return os.environ.get(COMPUTE_VARIABLE, "").strip().lower() in ("off", "0", "false", "no")


def _computed_with(settings: Any) -> dict[str, Any]:
    """The run's computed species for a note with these settings (none where its settings say compute = false)."""
    return _computed if getattr(settings, "compute", True) else {}


def _computed_for(wanted: dict[str, None], computing_hit: bool = False) -> dict[str, Any]:
    """Every species the notes to review name (``_looked_up``), computed (from the disk cache where it can)
    over every core.

    Reading the notes twice (once for their species, once to review them) keeps the review streaming.
    ``computing_hit``: a kept report was made with computing on, so a missing package is said still.
    """
    if not wanted and not computing_hit:
        return {}
    from .compute import species_cache
    from .compute.method import missing_packages

    missing = missing_packages()
    if missing:
        print(f"notelsp: computing no geometries ({' and '.join(missing)} not installed); the rules judge alone",
              file=sys.stderr)
        return {}
    if not wanted:
        return {}
    # species cached whole are read without the pool (no chemistry, no worker processes)
    found = species_cache.load_many(list(wanted))
    rest = [text for text in wanted if text not in found]
    if rest:
        from .compute import GeometryPool

        progress = _Progress(len(rest), sys.stderr)
        with GeometryPool() as pool:
            try:
                found.update(zip(rest, pool.compute(rest, on_species=lambda _: progress.step())))
            finally:
                progress.done()
    return {text: found[text] for text in wanted}


def _species_named(text: str, kind: str) -> dict[str, None]:
    """Each species a note names as written (Formula.written: a SMILES or a named centre, HOCl @O, is computed
    as what it is), which is also the key review_text's ``computed`` reads; a notebook's by its cells."""
    from .notation import scan

    parts = [(text, kind)]
    if kind == "notebook":
        from .notation.notebook import NotebookError, markdown_cells

        try:
            parts = [(cell.source, "markdown") for cell in markdown_cells(text)]
        except NotebookError:
            return {}
    return {formula.written: None for part, part_kind in parts for entry in scan(part, part_kind).found
            for formula in entry[4].formulas}


def _stdin_kind(options: CheckOptions) -> str:
    from .review.document import kind_of_path

    name = options.stdin_name or STDIN_NAME
    return "notebook" if name.lower().endswith(".ipynb") else kind_of_path(name)


class _Progress:
    """"computing geometries 12/40" on a terminal's standard error, rewritten in place; nothing elsewhere."""

    def __init__(self, total: int, stream: TextIO) -> None:
        self.total, self.stream, self.count = total, stream, 0
        self.shown = bool(getattr(stream, "isatty", lambda: False)())
        self._draw()

    def step(self) -> None:
        self.count += 1
        self._draw()

    def _draw(self) -> None:
        if self.shown:
            width = 24
            filled = width * self.count // max(self.total, 1)
            self.stream.write(f"\rcomputing geometries [{'#' * filled}{'.' * (width - filled)}] "
                              f"{self.count}/{self.total} species")
            self.stream.flush()

    def done(self) -> None:
        if self.shown:
            self.stream.write("\r\x1b[K")  # the line cleared: the report follows as if nothing was drawn
            self.stream.flush()


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
        json.dump(analysis_to_dict(analysis, formula), out, ensure_ascii=False, indent=2)
        out.write("\n")
    else:
        out.write(species_markdown(analysis) + "\n")
    return EXIT_CLEAN


def _report(paths: Sequence[str], output: str, config: str | None) -> int:
    """``check`` rendered as a page; exit statuses as ``check``'s, the page written whole or not at all."""
    import io

    page = io.StringIO()
    status = _check(paths, CheckOptions(output="html", config=config, cautions="none"), page)
    if status == EXIT_USAGE:
        return status
    try:
        Path(output).write_text(page.getvalue(), encoding="utf-8")
    except OSError as error:
        raise UsageError(f"cannot write {output}: {error.strerror or error}") from None
    print(f"notelsp: wrote {output}", file=sys.stderr)
    return status


def _rules(out: TextIO) -> int:
    from .review.describe import rules_markdown

    out.write(rules_markdown() + "\n")
    return EXIT_CLEAN


def _demo(out: TextIO, page: str | None = None) -> int:
    from importlib import resources  # demo only: importing it costs every check (tempfile, shutil, ...)

    demo = resources.files("notelsp.demo")
    notes = sorted(p.name for p in demo.iterdir() if p.name.endswith(NOTE_SUFFIXES))
    with resources.as_file(demo) as folder:
        out.write(f"Checking the demo notebook ({', '.join(notes)}):\n\n")
        previous = os.getcwd()
        os.chdir(folder)  # report short relative paths
        try:
            _check(notes, CheckOptions(), out)
            if page is not None:
                import io

                rendered = io.StringIO()
                _check(notes, CheckOptions(output="html", cautions="none"), rendered)
        finally:
            os.chdir(previous)
    out.write("\nEach line above is path:line:column: severity[rule] message. "
              "Run 'notelsp explain FORMULA' for the full analysis of a species.\n")
    if page is not None:
        try:
            Path(page).write_text(rendered.getvalue(), encoding="utf-8")
        except OSError as error:
            raise UsageError(f"cannot write {page}: {error.strerror or error}") from None
        out.write(f"The review page, with drawings of every species, is {Path(page).resolve()}: open it in a browser.\n")
    return EXIT_CLEAN


if __name__ == "__main__":
    raise SystemExit(main())
