"""Review settings: defaults, and reading them from ``.notelsp.toml`` text or
from an editor's ``workspace/configuration`` answer.

Parsing is pure (text or dict in, settings and problems out).  Every problem is
reported; a bad value keeps its default in the returned settings, and the
caller decides what a problem means (the command line refuses to review, the
server shows it).  A settings file's problems carry the line they are on.
"""

from __future__ import annotations

import re
import reprlib
from dataclasses import dataclass, replace
from typing import Any, Mapping

from .findings import Severity

DEFAULT_GLOBS = ("**/*",)  # every note file (which files are notes is decided by their type)
MAX_SETTINGS_CHARS = 256 * 1024  # a settings file is a few lines; beyond this it is something else
MAX_NESTING = 16  # arrays and inline tables inside each other; settings need two
MAX_GLOB_CHARS = 256  # matching costs (pattern length) × (path length) per file


@dataclass(frozen=True)
class Settings:
    """How one note (or workspace) is reviewed: tolerances, rule severities, what is switched on."""

    angle_tolerance: float = 5.0  # degrees allowed beyond a predicted range before an angle is flagged
    severities: tuple[tuple[str, Severity], ...] = ()  # per-rule overrides (a tuple keeps Settings hashable)
    disabled: frozenset[str] = frozenset()
    inlay_hints: bool = True
    hover_pictures: bool = True  # a drawing in hover, for clients that render Markdown images
    globs: tuple[str, ...] = DEFAULT_GLOBS
    cross_check_automatic: bool = False
    compute: bool = True  # the server computes each named species' geometry in the background

    def severity_of(self, rule: Any) -> Severity:
        return dict(self.severities).get(rule.code, rule.severity)

    def enabled(self, code: str) -> bool:
        return code not in self.disabled


class SettingsProblem(str):
    """One problem, as its message; ``line`` is its 1-based line in the settings file (None when unknown)."""

    line: int | None

    def __new__(cls, message: str, line: int | None = None) -> "SettingsProblem":
        problem = super().__new__(cls, message)
        problem.line = line
        return problem

    def located(self, file: str) -> str:
        """``file:line: message`` (or ``file: message``), the form a terminal or editor shows."""
        return f"{file}:{self.line}: {self}" if self.line is not None else f"{file}: {self}"


def settings_from_mapping(values: Mapping[str, Any], base: Settings | None = None) -> tuple[Settings, list[str]]:
    """Apply known keys of ``values`` (an editor's settings) over ``base``; unknown or bad values become messages."""
    settings, problems = _apply(values, base or Settings(), prefix="")
    return settings, [message for _, message in problems]


def settings_from_toml(text: str, base: Settings | None = None) -> tuple[Settings, list[SettingsProblem]]:
    """Read the ``[review]`` table of a ``.notelsp.toml`` file's text; problems carry their line."""
    base = base or Settings()
    text = text.removeprefix("\ufeff")  # a byte-order mark some editors write is no part of the TOML
    if len(text) > MAX_SETTINGS_CHARS:
        return base, [SettingsProblem(f"larger than {MAX_SETTINGS_CHARS:,} characters; not a settings file")]
    too_deep = _too_deep_line(text)
    if too_deep is not None:
        return base, [SettingsProblem(f"arrays or tables nested more than {MAX_NESTING} deep", too_deep)]
    import tomllib  # only when a settings file exists: its import is a noticeable part of a check's start

    try:
        document = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        return base, [_toml_error(str(error), text)]
    except RecursionError:  # the depth scan above should make this unreachable; never a traceback
        return base, [SettingsProblem(f"arrays or tables nested more than {MAX_NESTING} deep")]
    lines = _KeyLines(text)
    problems = [
        SettingsProblem(f"unknown table or key {key!r} (settings go under [review])", lines.line_of((key,)))
        for key in document if key != "review"
    ]
    table = document.get("review", {})
    if not isinstance(table, dict):
        return base, problems + [SettingsProblem("[review] must be a table", lines.line_of(("review",)))]
    settings, more = _apply(table, base, prefix="review.")
    return settings, problems + [SettingsProblem(message, lines.line_of(("review", *path))) for path, message in more]


# --- validation -------------------------------------------------------------------------


def _apply(values: Mapping[str, Any], settings: Settings, prefix: str) -> tuple[Settings, list[tuple[tuple[str, ...], str]]]:
    from .rules import RULES

    problems: list[tuple[tuple[str, ...], str]] = []
    changes: dict[str, Any] = {}
    for key, value in values.items():
        name = prefix + str(key)
        if key == "angle_tolerance":
            if isinstance(value, (int, float)) and not isinstance(value, bool) and 0 <= value <= 45:
                changes[key] = float(value)
            else:
                problems.append(((key,), f"{name} must be a number of degrees from 0 to 45, not {_shown(value)}"))
        elif key in ("inlay_hints", "cross_check_automatic", "hover_pictures", "compute"):
            if isinstance(value, bool):
                changes[key] = value
            else:
                problems.append(((key,), f"{name} must be true or false, not {_shown(value)}"))
        elif key == "disabled":
            if isinstance(value, list) and all(isinstance(v, str) for v in value):
                unknown = [v for v in value if v not in RULES]
                if unknown:
                    problems.append(((key,), f"{name} names unknown rules: {', '.join(unknown)}"))
                changes[key] = frozenset(v for v in value if v in RULES)
            else:
                problems.append(((key,), f"{name} must be a list of rule codes, not {_shown(value)}"))
        elif key == "severity":
            if isinstance(value, Mapping):
                severities = dict(settings.severities)
                for code, level in value.items():
                    if code not in RULES:
                        problems.append(((key, code), f"{name} names an unknown rule: {code}"))
                    elif level not in {s.value for s in Severity}:
                        problems.append(((key, code), f"{name} of {code} must be error, warning, information or hint, "
                                                      f"not {_shown(level)}"))
                    else:
                        severities[code] = Severity(level)
                changes["severities"] = tuple(sorted(severities.items()))
            else:
                problems.append(((key,), f"{name} must be a table of rule = level, not {_shown(value)}"))
        elif key == "files":
            if isinstance(value, list) and value and all(isinstance(v, str) and v.strip("/\\") for v in value):
                long = [v for v in value if len(v) > MAX_GLOB_CHARS]
                if long:
                    problems.append(((key,), f"{name} has a pattern longer than {MAX_GLOB_CHARS:,} characters"))
                else:
                    changes["globs"] = tuple(value)
            else:
                problems.append(((key,), f"{name} must be a non-empty list of glob patterns, not {_shown(value)}"))
        else:
            where = f" in [{prefix.rstrip('.')}]" if prefix else ""
            problems.append(((key,), f"unknown setting {key!r}{where}"))
    return replace(settings, **changes), problems


_SHORT = reprlib.Repr()
_SHORT.maxlevel, _SHORT.maxstring, _SHORT.maxother, _SHORT.maxlist, _SHORT.maxdict = 3, 40, 40, 5, 5


def _shown(value: Any) -> str:
    """A value as the user wrote it (TOML/JSON spelling for scalars), bounded in length and depth."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if value is None:
        return "null"
    if isinstance(value, str):
        import json  # only to show a bad value: a valid settings file never needs it

        shown = json.dumps(value if len(value) <= 40 else value[:37] + "...", ensure_ascii=False)
        return shown
    return _SHORT.repr(value)


# --- reading the text around tomllib ------------------------------------------------------

_TOML_POSITION = re.compile(r"\s*\(at line (\d+), column \d+\)$|\s*\(at end of document\)$")


def _toml_error(message: str, text: str) -> SettingsProblem:
    position = _TOML_POSITION.search(message)
    if position is None:
        line = None
    elif position.group(1):
        line = int(position.group(1))
    else:  # "at end of document": the last line that has anything on it
        line = text.rstrip("\n").count("\n") + 1
    reason = message[:position.start()] if position else message
    return SettingsProblem(f".notelsp.toml is not valid TOML: {reason}", line)


def _too_deep_line(text: str) -> int | None:
    """The line where brackets and braces outside strings and comments first nest past MAX_NESTING, or None.

    tomllib recurses once per level; this bounds the depth before it sees the text.  Strings are
    skipped as TOML reads them, so a bracket inside one is not counted; where the text is not
    valid TOML, tomllib stops at the first fault, before any depth this scan did not see.
    """
    depth, index, length, line = 0, 0, len(text), 1
    while index < length:
        char = text[index]
        if char == "\n":
            line += 1
        elif char == "#":
            end = text.find("\n", index)
            index = length if end == -1 else end
            continue
        elif char in "[{":
            depth += 1
            if depth > MAX_NESTING:
                return line
        elif char in "]}":
            depth = max(depth - 1, 0)
        elif char in "\"'":
            end = _string_end(text, index)
            line += text.count("\n", index, end)
            index = end
            continue
        index += 1
    return None


def _string_end(text: str, start: int) -> int:
    """Just past the TOML string opening at ``start`` (or the end of its line, when it is unterminated)."""
    quote = text[start]
    if text.startswith(quote * 3, start):  # multi-line; it may end with one or two extra quotes
        index = start + 3
        while True:
            close = text.find(quote * 3, index)
            if close == -1:
                return len(text)
            if quote == '"':
                escapes = len(text[index:close]) - len(text[index:close].rstrip("\\"))
                if escapes % 2:  # an escaped quote: keep looking after it
                    index = close + 1
                    continue
            end = close + 3
            while end < len(text) and end < close + 5 and text[end] == quote:
                end += 1
            return end
    index = start + 1
    while index < len(text):
        char = text[index]
        if char == "\\" and quote == '"':
            index += 2
            continue
        if char == quote:
            return index + 1
        if char == "\n":
            return index  # unterminated: tomllib stops here
        index += 1
    return len(text)


_HEADER = re.compile(r"\s*\[\[?\s*([^\]]*?)\s*\]\]?\s*(?:#.*)?$")
_KEY = re.compile(r"\s*((?:[A-Za-z0-9_-]+|\"(?:[^\"\\]|\\.)*\"|'[^']*')(?:\s*\.\s*(?:[A-Za-z0-9_-]+|\"(?:[^\"\\]|\\.)*\"|'[^']*'))*)\s*=")
_KEY_PART = re.compile(r"[A-Za-z0-9_-]+|\"((?:[^\"\\]|\\.)*)\"|'([^']*)'")


def _key_parts(dotted: str) -> tuple[str, ...]:
    parts = []
    for match in _KEY_PART.finditer(dotted):
        if match.group(1) is not None:
            parts.append(match.group(1))
        elif match.group(2) is not None:
            parts.append(match.group(2))
        else:
            parts.append(match.group(0))
    return tuple(parts)


class _KeyLines:
    """Which line defines a key, found by a light scan of table headers and ``key =`` lines."""

    def __init__(self, text: str) -> None:
        self.lines: dict[tuple[str, ...], int] = {}
        table: tuple[str, ...] = ()
        for number, line in enumerate(text.split("\n"), 1):  # TOML breaks lines at \n only
            header = _HEADER.match(line)
            if header:
                table = _key_parts(header.group(1))
                self.lines.setdefault(table, number)
                continue
            key = _KEY.match(line)
            if key:
                self.lines.setdefault(table + _key_parts(key.group(1)), number)

    def line_of(self, path: tuple[str, ...]) -> int | None:
        """The line of ``path``, or of the nearest enclosing key or table that is written out."""
        for length in range(len(path), 0, -1):
            if path[:length] in self.lines:
                return self.lines[path[:length]]
        return None
