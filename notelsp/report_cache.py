"""Each note's report as ``check`` last wrote it, kept on disk, so a note that has not changed is not reviewed again.

One small JSON file per note in ``$NOTELSP_CACHE_DIR/reports``, else in the ``reports`` folder of the
user's cache (``user_cache.cache_folder()``), named by the hash of everything the note's report
depends on: this format, a fingerprint of all of notelsp's installed files and the grammar (size and
modification time of each), the Python version and the versions of the packages that decide
findings, the note's path as reports show it, its kind, a hash of its text as reviewed, every field
of its settings, what the report writer asks of each file (cautions, annotation texts) and whether
geometries are computed for it (then also the method, its versions and limits). A report that used
computed geometries is kept only when every species it names was computed whole: a failure or a
structure cut short by a limit may come out otherwise next time.

Entries are read as the compute cache reads its own: a regular file (no link followed), the user's own
and written by no one else, of bounded size, parsed as JSON only after its nesting depth is checked
(never pickle or marshal, never executed), and every field checked; anything off is a miss, the note is
reviewed and its entry written again. Writing is a temporary file renamed into place; a folder that cannot
be written is no error. Past ``MAX_ENTRIES`` files the least recently used are removed, at the end of a run
that wrote entries, when a small counter file says the cap may have been passed. Safe to delete at any time.
"""

from __future__ import annotations

import hashlib
import operator
import os
import re
import stat
import sys
from dataclasses import dataclass, fields
from enum import Enum
from functools import lru_cache
from pathlib import Path
from typing import Any

from .formats import ReportedFile, ReportedFinding, ReportedFix
from .review.findings import Severity
from .user_cache import cache_entries, cache_folder, file_stamps, remove_quietly, trusted

FORMAT = 1  # bump when an entry changes shape or meaning
FOLDER_NAME = "reports"
SWITCH_VARIABLE = "NOTELSP_REPORT_CACHE"  # "off" (or 0, false, no): no report is read or kept
# Packages whose code or data decide findings (element data, SMILES, the grammar's parser, isomers and fits).
DECIDING_PACKAGES = ("mendeleev", "rdkit", "lark", "numpy")

MAX_ENTRY_BYTES = 8 * 1024 * 1024  # a note of 4,000 findings writes about 1 MB; a larger report is not kept
MAX_NESTING = 4  # entry -> files -> file -> one column of its findings (see _file_dict)
MAX_FILES = 10_000  # a notebook's Markdown cells
MAX_STRING = 1_000_000  # an annotation's text, a replacement, a message (the entry's size bounds them all)
MAX_POSITION = 1 << 31
MAX_ENTRIES = 50_000
PRUNE_TO = 0.9  # of MAX_ENTRIES, so pruning does not come back on the next run
COUNTER_NAME = "written"  # entries at the last count and entries written since, as two numbers

_ENTRY_NAME = re.compile(r"[0-9a-f]{32}\.json")
_CODE = re.compile(r"[a-z0-9]+(?:-[a-z0-9]+)*")
_SEVERITIES = frozenset(severity.value for severity in Severity)
_NONBLOCKING = getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_BINARY", 0)


class BadEntry(ValueError):
    """An entry that is not a report this run can use (the reason, for tests)."""


def switched_off() -> bool:
    return os.environ.get(SWITCH_VARIABLE, "").strip().lower() in ("off", "0", "false", "no")


def folder() -> Path | None:
    """``$NOTELSP_CACHE_DIR/reports`` (as the compute cache honours it), else the user's cache's ``reports``."""
    override = os.environ.get("NOTELSP_CACHE_DIR")
    if override:
        return Path(override) / FOLDER_NAME
    base = cache_folder()
    return None if base is None else base / FOLDER_NAME


# --- the key ---------------------------------------------------------------------------------


@lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """Size and modification time of every file of the installed package and of the grammar, the Python
    version and the versions of the packages that decide findings: computed once per process."""
    from .compute.method import installed_version

    seen = [sys.version, *file_stamps(Path(__file__).resolve().parent)]
    seen.extend(f"{name} {installed_version(name) or 'missing'}" for name in DECIDING_PACKAGES)
    return hashlib.sha256("\n".join(seen).encode("utf-8", "surrogatepass")).hexdigest()


@lru_cache(maxsize=1)
def _computing_key() -> str:
    """The method, its versions and every limit of one calculation: what computed species follow from."""
    from .compute.method import METHOD, Limits, versions

    limits = Limits()
    return _json([METHOD, [list(v) for v in versions()], [[f.name, getattr(limits, f.name)] for f in fields(limits)]])


@lru_cache(maxsize=64)  # a run meets a few settings files
def _settings_key(settings: Any) -> str | None:
    """Every field of ``settings`` in a canonical form (sets sorted, severities as text); None when one
    holds something this cannot write faithfully (then nothing is kept for the note)."""
    if not hasattr(settings, "__dataclass_fields__"):
        return None
    try:
        return _json([[f.name, _canonical(getattr(settings, f.name))] for f in fields(settings)])
    except (TypeError, ValueError):
        return None


def _canonical(value: Any) -> Any:
    if isinstance(value, Enum):
        return _canonical(value.value)
    if value is None or isinstance(value, (bool, int, float, str)):
        return value
    if isinstance(value, (frozenset, set)):
        return sorted((_canonical(v) for v in value), key=_json)
    if isinstance(value, (tuple, list)):
        return [_canonical(v) for v in value]
    raise TypeError(f"cannot key a {type(value).__name__}")


def _json(value: Any) -> str:
    import json

    return json.dumps(value, allow_nan=False, separators=(",", ":"))


def text_digest(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8", "surrogatepass")).hexdigest()


@dataclass(frozen=True)
class Remembered:
    """Where one note's report is kept and the digest of the text it is the report of (picklable: a
    worker that reviews the note writes the entry)."""

    folder: str
    key: str  # the hex digest of the whole key; the file is named by its first 32 digits
    text: str  # the digest of the note's text as looked up

    @property
    def path(self) -> str:
        return os.path.join(self.folder, f"{self.key[:32]}.json")

    def keep(self, text: str, files: list[ReportedFile]) -> bool:
        """Write the report of ``text`` if it is the text looked up (a note edited between the lookup
        and the review is not kept: the lookup's key does not describe it). False when not written."""
        if text_digest(text) != self.text:
            return False
        try:
            data = _json({"format": FORMAT, "key": self.key, "files": [_file_dict(f) for f in files]})
        except (TypeError, ValueError):
            return False
        if len(data) > MAX_ENTRY_BYTES:
            return False
        return write_whole(self.path, data.encode("ascii"))  # json.dumps escapes all but ASCII, surrogates too


def _file_dict(file: ReportedFile) -> dict[str, Any]:
    """A reported file as columns, one list per field of its findings (positions four numbers each): a warm
    check reads tens of thousands of findings, and a column is checked at once rather than item by item."""
    findings, fixes = file.findings, [x for f in file.findings for x in f.fixes]
    return {"path": file.path, "cell": file.cell, "annotations": file.annotations,
            "regions": [n for f in findings for n in f.region], "severities": [f.severity for f in findings],
            "codes": [f.code for f in findings], "messages": [f.message for f in findings],
            "formulas": [f.formula for f in findings], "claims": [f.claim for f in findings],
            "annotation_texts": [f.annotation for f in findings], "fix_counts": [len(f.fixes) for f in findings],
            "fix_titles": [x.title for x in fixes], "fix_replacements": [x.replacement for x in fixes],
            "fix_regions": [n for x in fixes for n in x.region], "cautions": [t for pair in file.cautions for t in pair]}


_FIELDS = frozenset(_file_dict(ReportedFile("", None, 0, (), ())))


class ReportCache:
    """The report cache as one ``check`` run uses it: what the writer asks for is fixed for the run."""

    def __init__(self, where: Path, wants_cautions: bool, wants_annotation_texts: bool) -> None:
        self.folder = where
        self.wants_cautions = wants_cautions
        self.wants_annotation_texts = wants_annotation_texts
        self._run = _json([FORMAT, code_fingerprint(), wants_cautions, wants_annotation_texts])
        self.kept = 0  # entries asked to be written (an estimate from above, for pruning)

    def remembered(self, path: str, kind: str, text: str, settings: Any, computes: bool) -> Remembered | None:
        """The place of this note's report (None when its settings cannot be keyed)."""
        try:
            settings_key = _settings_key(settings)
        except TypeError:  # settings that cannot be hashed cannot be keyed either
            settings_key = None
        if settings_key is None:
            return None
        digest = text_digest(text)
        key = _json([self._run, settings_key, _computing_key() if computes else None, path, kind, digest])
        return Remembered(str(self.folder), hashlib.sha256(key.encode("ascii")).hexdigest(), digest)

    def present(self, remembered: Remembered) -> bool:
        """Whether an entry is there to be read (it is checked when it is read)."""
        try:
            return stat.S_ISREG(os.lstat(remembered.path).st_mode)
        except OSError:
            return False

    def load(self, remembered: Remembered, path: str, notebook: bool) -> list[ReportedFile] | None:
        """The kept report for ``remembered``, or None when absent or unusable (then the note is reviewed)."""
        data = read_entry(remembered.path)
        if data is None:
            return None
        try:
            return parse_entry(data, remembered.key, path, notebook, self.wants_cautions, self.wants_annotation_texts)
        except BadEntry:
            return None

    def finish(self) -> None:
        """Once the run has written its entries: remove the oldest when the count says the cap may be passed."""
        if self.kept:
            prune_if_due(self.folder, self.kept)


# --- reading ---------------------------------------------------------------------------------


def read_entry(path: str | Path, limit: int = MAX_ENTRY_BYTES) -> bytes | None:
    """The bytes of an entry that is a regular file (no link), the user's own, of at most ``limit`` bytes.

    Its modification time is set to now (through the open file), so pruning removes the least recently used.
    """
    try:
        descriptor = os.open(path, os.O_RDONLY | _NONBLOCKING)
    except OSError:
        return None
    try:
        status = os.fstat(descriptor)
        if not trusted(status) or status.st_size > limit:
            return None
        chunks, size = [], 0
        while size <= limit:
            chunk = os.read(descriptor, limit + 1 - size)
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
        if size > limit:
            return None
        if os.utime in os.supports_fd:
            try:
                os.utime(descriptor)
            except OSError:
                pass  # a read-only folder: the entry is still good
        return b"".join(chunks)
    except OSError:
        return None
    finally:
        os.close(descriptor)


def parse_entry(data: bytes, key: str, path: str, notebook: bool, wants_cautions: bool,
                wants_annotation_texts: bool) -> list[ReportedFile]:
    """The files of an entry if it is well formed, is the entry for ``key`` and describes ``path``; else BadEntry."""
    import json

    if not nested_at_most(data, MAX_NESTING):
        raise BadEntry(f"nested deeper than {MAX_NESTING}")
    try:
        payload = json.loads(data.decode("ascii"))  # written as ASCII: anything else is not an entry of ours
    except (ValueError, RecursionError) as error:
        raise BadEntry("not JSON") from error
    if type(payload) is not dict or payload.keys() != {"format", "key", "files"}:
        raise BadEntry("not an entry")
    if payload["format"] != FORMAT or payload["key"] != key:
        raise BadEntry("an entry of another format or key")
    listed = payload["files"]
    if type(listed) is not list or not 1 <= len(listed) <= MAX_FILES:
        raise BadEntry("not a list of files")
    files = [_file(item, path, wants_cautions, wants_annotation_texts) for item in listed]
    cells = [f.cell for f in files]
    if notebook:
        whole = cells == [None]  # a notebook without Markdown cells is listed once, as a file
        if not whole and (None in cells or any(a >= b for a, b in zip(cells, cells[1:]))):
            raise BadEntry("a notebook's cells are not in order")
    elif cells != [None]:
        raise BadEntry("a note is one file")
    return files


_ALL_BUT_BRACKETS = bytes(b for b in range(256) if b not in b"[]{}")


def nested_at_most(data: bytes, most: int) -> bool:
    """Whether the JSON ``data`` nests its arrays and objects at most ``most`` deep (a deeper one at most twice
    that may pass; nothing deeper does), found without parsing, before ``json.loads`` recurses into it.

    Strings are taken out first (their escaped backslashes and quotes, then everything between quotes); each
    round then removes the empty pairs of brackets, at least one level and at most two. Unbalanced brackets
    are never left empty: such text is no JSON and is refused.
    """
    plain = data.replace(b"\\\\", b"").replace(b'\\"', b"")
    brackets = b"".join(plain.split(b'"')[::2]).translate(None, _ALL_BUT_BRACKETS)
    for _ in range(most):
        if not brackets:
            return True
        brackets = brackets.replace(b"[]", b"").replace(b"{}", b"")
    return not brackets


def _file(item: Any, path: str, wants_cautions: bool, wants_annotation_texts: bool) -> ReportedFile:
    """One reported file from its columns (``_file_dict``), every column checked whole: its type, its length,
    the type and size of what it holds."""
    if type(item) is not dict or item.keys() != _FIELDS:
        raise BadEntry("a file is not the fields of a report")
    if item["path"] != path:
        raise BadEntry("a file of another path")
    cell, annotations = item["cell"], item["annotations"]
    if cell is not None and not (type(cell) is int and 0 < cell < MAX_POSITION):
        raise BadEntry("a cell is not a positive number")
    if not (type(annotations) is int and 0 <= annotations < MAX_POSITION):
        raise BadEntry("annotations is not a count")
    severities = _strings(item["severities"], None)
    count = len(severities)
    if not set(severities) <= _SEVERITIES:
        raise BadEntry("an unknown severity")
    codes = _strings(item["codes"], count)
    if not all(map(_CODE.fullmatch, codes)) or max(map(len, codes), default=0) > 100:
        raise BadEntry("a rule code is not kebab-case")
    messages = _strings(item["messages"], count)
    formulas = _strings(item["formulas"], count, optional=True)
    claims = _strings(item["claims"], count, optional=True)
    annotation_texts = _strings(item["annotation_texts"], count)
    if not wants_annotation_texts and any(annotation_texts):
        raise BadEntry("an annotation's text the report does not show")
    regions = _regions(item["regions"], count)
    fix_counts = item["fix_counts"]
    if type(fix_counts) is not list or len(fix_counts) != count or (
            fix_counts and (set(map(type, fix_counts)) != {int} or min(fix_counts) < 0)):
        raise BadEntry("fix_counts is not a count for each finding")
    fixed = sum(fix_counts)
    fixes = list(map(ReportedFix, _strings(item["fix_titles"], fixed), _strings(item["fix_replacements"], fixed),
                     _regions(item["fix_regions"], fixed)))
    if fixed:
        grouped, start = [], 0
        for number in fix_counts:
            grouped.append(tuple(fixes[start:start + number]))
            start += number
    else:
        grouped = [()] * count
    cautions = _strings(item["cautions"], None)
    if len(cautions) % 2 or (cautions and not wants_cautions):
        raise BadEntry("cautions are not pairs, or ones the report does not show")
    findings = tuple(map(ReportedFinding, regions, severities, codes, messages, formulas, claims, grouped,
                         annotation_texts))
    return ReportedFile(path, cell, annotations, findings, tuple(zip(cautions[0::2], cautions[1::2])))


def _strings(column: Any, count: int | None, optional: bool = False) -> list:
    """``column`` if it is a list of ``count`` (any number when None) strings of bounded length (or nulls)."""
    if type(column) is not list or (count is not None and len(column) != count):
        raise BadEntry("a column of another length")
    if column:
        kinds = set(map(type, column))
        if not (kinds <= _OPTIONAL_TEXT if optional else kinds == _TEXT):
            raise BadEntry("a column of strings holds something else")
        if max(map(len, filter(None, column)), default=0) > MAX_STRING:
            raise BadEntry("a string longer than an entry holds")
    return column


_TEXT = {str}
_OPTIONAL_TEXT = {str, type(None)}


def _regions(column: Any, count: int) -> list[tuple[int, int, int, int]]:
    """``count`` regions from four positive whole numbers each, none ending before it starts."""
    if type(column) is not list or len(column) != 4 * count:
        raise BadEntry("regions of another length")
    if not column:
        return []
    if set(map(type, column)) != {int} or min(column) < 1 or max(column) >= MAX_POSITION:
        raise BadEntry("a region is not four positive whole numbers")
    if not all(map(operator.le, zip(column[0::4], column[1::4]), zip(column[2::4], column[3::4]))):
        raise BadEntry("a region ends before it starts")
    return list(zip(column[0::4], column[1::4], column[2::4], column[3::4]))


# --- writing and pruning ---------------------------------------------------------------------


def write_whole(path: str | Path, data: bytes) -> bool:
    """Write the file whole or not at all (a ``.entry-`` temporary file, the user's only, renamed into
    place); False when the folder cannot be written. Never raises for the disk."""
    where = os.path.dirname(path)
    temporary = os.path.join(where, f".entry-{os.getpid()}-{os.urandom(6).hex()}.tmp")
    try:
        os.makedirs(where, mode=0o700, exist_ok=True)
        descriptor = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_NOFOLLOW", 0), 0o600)
    except OSError:
        return False
    try:
        with os.fdopen(descriptor, "wb") as handle:
            handle.write(data)
        os.replace(temporary, path)
        return True
    except OSError:
        remove_quietly(temporary)
        return False


def prune_if_due(where: Path, written: int, cap: int | None = None) -> int:
    """Count ``written`` new entries; past the cap (as the counter estimates it from above), remove the
    least recently used down to ``PRUNE_TO`` of it. The number removed."""
    cap = MAX_ENTRIES if cap is None else cap
    counted = _read_counter(where / COUNTER_NAME)
    if counted is not None and counted[0] + counted[1] + written <= cap:
        _write_counter(where / COUNTER_NAME, counted[0], counted[1] + written)
        return 0
    remaining, removed = prune(where, int(cap * PRUNE_TO))
    _write_counter(where / COUNTER_NAME, remaining, 0)
    return removed


def prune(where: Path, keep: int) -> tuple[int, int]:
    """Remove the least recently used entries past ``keep`` and temporary files of writers that died;
    (entries left, entries removed)."""
    entries = [(status.st_mtime_ns, path) for status, path in cache_entries(where, _ENTRY_NAME.fullmatch)]
    entries.sort()
    removed = 0
    for _, path in entries[: max(len(entries) - keep, 0)]:
        removed += remove_quietly(Path(path))
    return len(entries) - removed, removed


def _read_counter(path: Path) -> tuple[int, int] | None:
    data = read_entry(path, 64)
    if data is None:
        return None
    parts = data.split()
    if len(parts) != 2 or not all(part.isdigit() and len(part) <= 12 for part in parts):
        return None
    return int(parts[0]), int(parts[1])


def _write_counter(path: Path, entries: int, written: int) -> None:
    write_whole(path, f"{entries} {written}\n".encode("ascii"))


