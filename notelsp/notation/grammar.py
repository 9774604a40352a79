"""The notation grammar: loaded once, lazily, and parsed with LALR.

The grammar ships as package data of ``notelsp.grammar``; in an editable
install that package may not be importable, so the top-level ``grammar/``
folder next to the package is the fallback.

Building the LALR tables takes most of a one-note check, so the built parser
is kept in the user's cache folder (``$XDG_CACHE_HOME/notelsp``, else
``~/.cache/notelsp``) and loaded from there by later processes. lark's own
``cache=`` option unpickles part of a cache file before it checks the file's
hash, so the file is written and checked here instead: its first line is a
fingerprint of the grammar text, the parser options and the lark and Python
versions, and the rest (lark's ``Lark.save``, a pickle) is loaded only when
that line matches and the file is the user's own and writable by nobody else.
Anything else (no such file, another grammar's, a corrupted one, a folder
that cannot be written) means building the parser in memory, silently.
"""

from __future__ import annotations

import hashlib
import sys
from functools import cache
from pathlib import Path

from lark import Lark, __version__ as LARK_VERSION

from .. import user_cache
from ..user_cache import cache_folder

GRAMMAR_FILE = "notation.lark"
START_SYMBOLS = ("formula_spec", "claim")
PARSER_OPTIONS = {"parser": "lalr", "lexer": "contextual", "start": list(START_SYMBOLS)}

CACHE_FOLDER_NAME = user_cache.CACHE_FOLDER_NAME
CACHE_MAGIC = b"notelsp-grammar-cache-1 "
# One cache file per interpreter and lark version; a new grammar replaces the file of the same prefix.
CACHE_PREFIX = f"grammar-py{sys.version_info[0]}{sys.version_info[1]}-lark{LARK_VERSION}-"
CACHE_SUFFIX = ".cache"


def grammar_text() -> str:
    # The package's folders straight from its spec (importlib.resources costs more to import than
    # this read), then the source tree's grammar/ (an editable install cannot import notelsp.grammar).
    from importlib.util import find_spec

    try:
        spec = find_spec("notelsp.grammar")
    except ModuleNotFoundError:
        spec = None
    folders = list(spec.submodule_search_locations or ()) if spec is not None else []
    folders.append(str(Path(__file__).resolve().parents[2] / "grammar"))
    for folder in folders:
        candidate = Path(folder) / GRAMMAR_FILE
        if candidate.is_file():
            return candidate.read_text(encoding="utf-8")
    from importlib.resources import files  # a zip or other loader without plain folders

    return files("notelsp.grammar").joinpath(GRAMMAR_FILE).read_text(encoding="utf-8")


@cache
def parser() -> Lark:
    """The one LALR parser for both start symbols (loaded from the cache or built, on first use)."""
    text = grammar_text()
    fingerprint = grammar_fingerprint(text)
    folder = cache_folder()
    path = folder / f"{CACHE_PREFIX}{fingerprint[:16]}{CACHE_SUFFIX}" if folder is not None else None
    if path is not None:
        loaded = load_cached_parser(path, fingerprint)
        if loaded is not None:
            return loaded
    built = Lark(text, **PARSER_OPTIONS)
    if path is not None:
        save_cached_parser(built, path, fingerprint)
    return built


def grammar_fingerprint(text: str) -> str:
    """What a cached parser must have been built from: grammar, options, lark and Python versions."""
    identity = "\0".join((text, repr(sorted(PARSER_OPTIONS.items())), LARK_VERSION, sys.version))
    return hashlib.sha256(identity.encode("utf-8")).hexdigest()


def load_cached_parser(path: Path, fingerprint: str) -> Lark | None:
    """The parser saved at ``path`` if the file is verifiably this grammar's and the user's own; else None."""
    import io

    data = user_cache.read_trusted(path)
    header = CACHE_MAGIC + fingerprint.encode("ascii") + b"\n"
    if data is None or not data.startswith(header):
        return None
    try:
        loaded = Lark.load(io.BytesIO(data[len(header):]))  # unpickles: only after the checks above
    except Exception:  # truncated or corrupted: build instead
        return None
    return loaded if isinstance(loaded, Lark) else None


def save_cached_parser(built: Lark, path: Path, fingerprint: str) -> None:
    """Write the cache file whole or not at all (user_cache.write_whole); never raises."""
    import io  # only needed when writing

    buffer = io.BytesIO()
    buffer.write(CACHE_MAGIC + fingerprint.encode("ascii") + b"\n")
    try:
        built.save(buffer)
    except Exception:  # a parser that cannot be saved: the one in memory is enough
        return
    if not user_cache.write_whole(path, buffer.getvalue()):
        return
    try:
        for stale in path.parent.glob(f"{CACHE_PREFIX}*{CACHE_SUFFIX}"):  # an earlier grammar's
            if stale != path:
                stale.unlink(missing_ok=True)
    except OSError:
        pass

