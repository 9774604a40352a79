"""Review settings: defaults, and reading them from ``.notelsp.toml`` text or
from an editor's ``workspace/configuration`` answer.

Parsing is pure (text or dict in, settings and error messages out); a bad
value is reported and its default kept, so a typo never stops the review.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, replace
from typing import Any, Mapping

from .findings import Severity

DEFAULT_GLOBS = ("**/*.md", "**/*.markdown", "**/*.txt")


@dataclass(frozen=True)
class Settings:
    angle_tolerance: float = 5.0  # degrees allowed beyond a predicted range before an angle is flagged
    severities: tuple[tuple[str, Severity], ...] = ()  # per-rule overrides (a tuple keeps Settings hashable)
    disabled: frozenset[str] = frozenset()
    inlay_hints: bool = True
    globs: tuple[str, ...] = DEFAULT_GLOBS
    cross_check_automatic: bool = False

    def severity_of(self, rule: Any) -> Severity:
        return dict(self.severities).get(rule.code, rule.severity)

    def enabled(self, code: str) -> bool:
        return code not in self.disabled


def settings_from_mapping(values: Mapping[str, Any], base: Settings | None = None) -> tuple[Settings, list[str]]:
    """Apply known keys of ``values`` over ``base``; unknown or bad values become messages."""
    from .rules import RULES

    settings = base or Settings()
    problems: list[str] = []
    changes: dict[str, Any] = {}
    for key, value in values.items():
        if key == "angle_tolerance":
            if isinstance(value, (int, float)) and not isinstance(value, bool) and 0 <= value <= 45:
                changes[key] = float(value)
            else:
                problems.append(f"angle_tolerance must be a number of degrees from 0 to 45, not {value!r}")
        elif key == "inlay_hints" or key == "cross_check_automatic":
            if isinstance(value, bool):
                changes[key] = value
            else:
                problems.append(f"{key} must be true or false, not {value!r}")
        elif key == "disabled":
            if isinstance(value, list) and all(isinstance(v, str) for v in value):
                unknown = [v for v in value if v not in RULES]
                if unknown:
                    problems.append(f"disabled names unknown rules: {', '.join(unknown)}")
                changes[key] = frozenset(v for v in value if v in RULES)
            else:
                problems.append(f"disabled must be a list of rule codes, not {value!r}")
        elif key == "severity":
            if isinstance(value, Mapping):
                severities = dict(settings.severities)
                for code, level in value.items():
                    if code not in RULES:
                        problems.append(f"severity names an unknown rule: {code}")
                    elif level not in {s.value for s in Severity}:
                        problems.append(f"severity of {code} must be error, warning, information or hint, not {level!r}")
                    else:
                        severities[code] = Severity(level)
                changes["severities"] = tuple(sorted(severities.items()))
            else:
                problems.append(f"severity must be a table of rule = level, not {value!r}")
        elif key == "files":
            if isinstance(value, list) and value and all(isinstance(v, str) and v for v in value):
                changes["globs"] = tuple(value)
            else:
                problems.append(f"files must be a non-empty list of glob patterns, not {value!r}")
        else:
            problems.append(f"unknown setting {key!r}")
    return replace(settings, **changes), problems


def settings_from_toml(text: str, base: Settings | None = None) -> tuple[Settings, list[str]]:
    """Read the ``[review]`` table of a ``.notelsp.toml`` file's text."""
    try:
        document = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        return base or Settings(), [f".notelsp.toml is not valid TOML: {error}"]
    problems: list[str] = []
    for key in document:
        if key != "review":
            problems.append(f"unknown table or key {key!r} (settings go under [review])")
    table = document.get("review", {})
    if not isinstance(table, dict):
        return base or Settings(), problems + ["[review] must be a table"]
    settings, more = settings_from_mapping(table, base)
    return settings, problems + more
