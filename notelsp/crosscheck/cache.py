"""Optimised structures on disk, keyed by species, isomer and level of theory.

Lives in ``$NOTELSP_CACHE_DIR``, else ``$XDG_CACHE_HOME/notelsp``, else
``~/.cache/notelsp`` (under a ``crosscheck`` folder).  One small JSON file per
result, written atomically so two processes never see half a file.
"""

from __future__ import annotations

import hashlib
import json
import os
import tempfile
from pathlib import Path

from .protocol import OptimisedIsomer, isomer_from_dict, isomer_to_dict

FORMAT = 1  # bump when the stored result changes shape or meaning


def cache_root() -> Path:
    override = os.environ.get("NOTELSP_CACHE_DIR")
    if override:
        return Path(override)
    xdg = os.environ.get("XDG_CACHE_HOME")
    base = Path(xdg) if xdg else Path.home() / ".cache"
    return base / "notelsp"


def cache_path(species: str, isomer: str, level: str) -> Path:
    key = json.dumps([FORMAT, species, isomer, level])
    digest = hashlib.sha256(key.encode()).hexdigest()[:24]
    return cache_root() / "crosscheck" / f"{digest}.json"


def load(species: str, isomer: str, level: str) -> OptimisedIsomer | None:
    """The stored result, or None when absent or unreadable (then it is simply recomputed)."""
    try:
        raw = json.loads(cache_path(species, isomer, level).read_text(encoding="utf-8"))
        if raw.get("key") != [FORMAT, species, isomer, level]:
            return None
        return isomer_from_dict(raw["isomer"])
    except (OSError, ValueError, KeyError, TypeError):
        return None


def store(result: OptimisedIsomer) -> None:
    """Keep a converged result; a cache that cannot be written is not an error."""
    path = cache_path(result.species, result.isomer, result.level)
    payload = {"key": [FORMAT, result.species, result.isomer, result.level], "isomer": isomer_to_dict(result)}
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(dir=path.parent, suffix=".tmp")
        with os.fdopen(handle, "w", encoding="utf-8") as file:
            json.dump(payload, file)
        os.replace(temporary, path)
    except OSError:
        pass
