"""The user's cache folder, where notelsp keeps what it builds once and later processes read back.

``$XDG_CACHE_HOME/notelsp`` (an absolute ``XDG_CACHE_HOME`` only), else ``~/.cache/notelsp``.
The grammar's built parser (``notation/grammar.py``) and the element table (``elements.py``)
live there. What is read back is read only from a file that is the user's own and that no
one else may write (``trusted``); a file that is missing, foreign or damaged means building
the thing again, silently.
"""

from __future__ import annotations

import os
import stat
from collections.abc import Callable
from functools import lru_cache
from pathlib import Path

CACHE_FOLDER_NAME = "notelsp"


def cache_folder() -> Path | None:
    """$XDG_CACHE_HOME/notelsp (an absolute XDG_CACHE_HOME only), else ~/.cache/notelsp; None without a home."""
    base = os.environ.get("XDG_CACHE_HOME", "")
    if not os.path.isabs(base):
        try:
            base = str(Path.home() / ".cache")
        except (RuntimeError, KeyError, OSError):
            return None
    return Path(base) / CACHE_FOLDER_NAME


def trusted(status: os.stat_result) -> bool:
    """A regular file owned by this user that no one else may write (where the system has owners and modes)."""
    if not stat.S_ISREG(status.st_mode):
        return False
    if not hasattr(os, "getuid"):  # Windows: no POSIX owner or group bits; the user's profile folder guards it
        return True
    return status.st_uid == os.getuid() and not status.st_mode & (stat.S_IWGRP | stat.S_IWOTH)


def read_trusted(path: Path) -> bytes | None:
    """The file's bytes if it is the user's own (:func:`trusted`); None when absent, unreadable or not."""
    try:
        with open(path, "rb") as handle:
            if not trusted(os.fstat(handle.fileno())):
                return None
            return handle.read()
    except OSError:
        return None


def write_whole(path: Path, data: bytes) -> bool:
    """Write the file whole or not at all (a temporary file renamed into place); never raises."""
    import tempfile  # only needed when writing

    temporary = None
    try:
        path.parent.mkdir(mode=0o700, parents=True, exist_ok=True)
        descriptor, temporary = tempfile.mkstemp(dir=path.parent, prefix=f".{path.stem}-", suffix=".tmp")
        with os.fdopen(descriptor, "wb") as handle:
            handle.write(data)
        os.replace(temporary, path)
        temporary = None
        return True
    except Exception:  # a read-only or full disk: what was built in memory is enough
        return False
    finally:
        if temporary is not None:
            try:
                os.unlink(temporary)
            except OSError:
                pass


@lru_cache(maxsize=4)  # one package, walked once per process however many caches ask
def file_stamps(package: Path) -> tuple[str, ...]:
    """"path size mtime_ns" for every file of ``package`` (folders walked in sorted order, __pycache__
    left out) and for the source tree's grammar beside it (an editable install), paths relative to the
    package's parent ("notelsp/chem/vsepr.py"); "path absent" for the grammar when there is none.

    What a cache keyed by notelsp's own code compares: any edit, install or upgrade changes it.
    """
    stamps = []
    for folder, folders, names in os.walk(package):
        folders[:] = sorted(f for f in folders if f != "__pycache__")
        stamps.extend(_stamp(Path(folder, name), package.parent) for name in sorted(names))
    stamps.append(_stamp(package.parent / "grammar" / "notation.lark", package.parent))
    return tuple(stamps)


def _stamp(path: Path, base: Path) -> str:
    try:
        status = path.stat()
    except OSError:
        return f"{path.relative_to(base)} absent"
    return f"{path.relative_to(base)} {status.st_size} {status.st_mtime_ns}"


STALE_TEMPORARY_S = 3600.0  # a temporary file (".entry-...") this old belongs to a writer that died


def cache_entries(folder: Path, is_entry: Callable[[str], bool]) -> list[tuple[os.stat_result, str]]:
    """(status, path) of every regular file in ``folder`` whose name ``is_entry`` accepts, links not
    followed; temporary files of writers that died are removed on the way. [] when it cannot be listed."""
    import time

    entries = []
    now = time.time()
    try:
        with os.scandir(folder) as found:
            for item in found:
                try:
                    status = item.stat(follow_symlinks=False)
                except OSError:
                    continue
                if not stat.S_ISREG(status.st_mode):
                    continue
                if item.name.startswith(".entry-") and now - status.st_mtime > STALE_TEMPORARY_S:
                    remove_quietly(item.path)
                elif is_entry(item.name):
                    entries.append((status, item.path))
    except OSError:
        return []
    return entries


def remove_quietly(path: str | Path) -> bool:
    """Remove a file; False (no error) when it cannot be."""
    try:
        os.unlink(path)
        return True
    except OSError:
        return False
