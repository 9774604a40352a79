"""Compiled code of notelsp's dataclass methods, kept between runs.

At every start Python's ``dataclasses`` writes out the source of each method it
generates (``__init__``, ``__repr__``, ``__eq__``, ``__hash__``, ``__setattr__`` ...)
and compiles it: on Python 3.11 about 520 compilations for the ~90 dataclasses a
one-note check imports, a quarter of that check's start-up
(``benchmarks/cli_start.py``). This keeps the compiled code objects, keyed by their
whole source text, in one file of the user's cache folder, so that a later start runs
the same code without compiling it again.

Only the ``exec`` name that the dataclasses module looks up is replaced, and only
sources compiled for notelsp's own modules are kept; anything else is compiled as
before. Keyed by the complete text, a kept code object is what compiling that text
gives. The file is read only when it is the user's own and no one else may write it
(``user_cache.trusted``, stricter than Python's own bytecode cache), only by an
interpreter with the bytecode magic number that heads it, and it is written whole
at exit when something new was compiled (after an upgrade, or on first use).
"""

from __future__ import annotations

import atexit
import builtins
import marshal
import os
import sys
import types
from importlib.util import MAGIC_NUMBER
from pathlib import Path
from typing import Any

from .user_cache import cache_folder, read_trusted, write_whole

SWITCH_VARIABLE = "NOTELSP_DATACLASS_CODE"  # "off": compile every time, as Python does (to measure, or to rule this out)
FILE_NAME = f"dataclass-code-py{sys.version_info[0]}{sys.version_info[1]}.marshal"
OWN_PACKAGE = "notelsp"
# A check uses ~460-610 sources and every command together ~700; past this, code of classes since changed
# is dropped at the next write (only what that process used is kept) so the file stays quick to read (~4 ms).
MAX_KEPT = 1_200


class KeptCode:
    """The ``exec`` the dataclasses module calls: compiles each of notelsp's sources once per install."""

    def __init__(self, path: Path) -> None:
        self.path = path
        self.kept = read_kept(path)
        self.used: dict[str, types.CodeType] = {}
        self.compiled = 0  # sources compiled in this process (0: nothing to write)

    def __call__(self, source: Any, globals: dict | None = None, locals: Any = None, **options: Any) -> None:  # noqa: A002 - exec's own names
        if not (isinstance(source, str) and globals is not None and _own(globals)):
            builtins.exec(source, globals, locals, **options)
            return
        code = self.used.get(source) or self.kept.get(source)  # frozen classes share their __setattr__ text
        if code is None:
            code = compile(source, "<string>", "exec")  # the name exec itself gives a string it compiles
            self.compiled += 1
        self.used[source] = code
        builtins.exec(code, globals, locals, **options)

    def write(self) -> None:
        """Keep what this process compiled (with what was kept before, while under MAX_KEPT)."""
        if not self.compiled:
            return
        everything = {**self.kept, **self.used}
        write_whole(self.path, MAGIC_NUMBER + marshal.dumps(everything if len(everything) <= MAX_KEPT else self.used))


def _own(globals: dict) -> bool:
    name = globals.get("__name__")
    return isinstance(name, str) and name.partition(".")[0] == OWN_PACKAGE


def read_kept(path: Path) -> dict[str, types.CodeType]:
    """The kept code objects by source text; {} when the file is absent, not trusted, of another
    interpreter or damaged."""
    data = read_trusted(path)
    if data is None or not data.startswith(MAGIC_NUMBER):
        return {}
    try:
        kept = marshal.loads(data[len(MAGIC_NUMBER):])
    except (EOFError, ValueError, TypeError):
        return {}
    if not isinstance(kept, dict) or not all(
            isinstance(text, str) and isinstance(code, types.CodeType) for text, code in kept.items()):
        return {}
    return kept


def install() -> KeptCode | None:
    """Route the dataclasses module's compiling through the kept code (once per process); None
    when there is no cache folder or it is switched off."""
    import dataclasses

    if os.environ.get(SWITCH_VARIABLE, "").strip().lower() in ("off", "0", "false", "no"):
        return None

    current = getattr(dataclasses, "exec", None)
    if isinstance(current, KeptCode):
        return current
    folder = cache_folder()
    if folder is None:
        return None
    kept = KeptCode(folder / FILE_NAME)
    dataclasses.exec = kept  # type: ignore[attr-defined] - dataclasses looks exec up in its module first
    atexit.register(kept.write)
    return kept
