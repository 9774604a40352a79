"""Which files are reviewed, and reviews cached by their inputs.

Pure: the server keeps the texts and asks here; a review is a function of
(text, kind, settings), so it is cached by exactly those.
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import TYPE_CHECKING

from .settings import Settings

if TYPE_CHECKING:
    from .document import DocumentKind, DocumentReview

REVIEWED_SUFFIXES = (".md", ".markdown", ".txt")


@lru_cache(maxsize=256)
def _glob_pattern(glob: str) -> re.Pattern[str]:
    """A ``files`` glob as a regex: ``**/`` spans folders (or none), ``*`` and ``?`` stay in one."""
    out, index = [], 0
    while index < len(glob):
        if glob.startswith("**/", index):
            out.append("(?:.*/)?")
            index += 3
        elif glob.startswith("**", index):
            out.append(".*")
            index += 2
        elif glob[index] == "*":
            out.append("[^/]*")
            index += 1
        elif glob[index] == "?":
            out.append("[^/]")
            index += 1
        else:
            out.append(re.escape(glob[index]))
            index += 1
    return re.compile("".join(out) + r"\Z")


def is_reviewed(relative_path: str, settings: Settings) -> bool:
    """Whether a file (path relative to the workspace root, ``/``-separated) gets reviewed."""
    path = relative_path.replace("\\", "/").lstrip("/")
    if not path.lower().endswith(REVIEWED_SUFFIXES):
        return False
    return any(_glob_pattern(glob).match(path) for glob in settings.globs)


@lru_cache(maxsize=8)  # a few versions of the open notes; each holds the text
def cached_review(text: str, kind: "DocumentKind", settings: Settings) -> "DocumentReview":
    """``review_text`` memoised: hover, actions and hints on an unchanged text share one review."""
    from .document import review_text  # file selection above stays importable without the analysis stack

    return review_text(text, kind, settings)
