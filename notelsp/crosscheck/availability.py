"""Whether the optional quantum-chemistry extra is installed."""

from __future__ import annotations

import importlib.util

INSTALL_HINT = "install with pip install 'notelsp[qc]'"
REQUIRED = ("pyscf", "geometric")


def missing_extra() -> str | None:
    """A one-line message naming what is missing, or None when the extra is installed.

    Only looks the packages up (no import), so asking is cheap in the server.
    """
    missing = []
    for name in REQUIRED:
        try:
            found = importlib.util.find_spec(name) is not None
        except (ImportError, ValueError):  # ValueError: sys.modules[name] is None
            found = False
        if not found:
            missing.append(name)
    if not missing:
        return None
    return f"the calculation needs {' and '.join(missing)}, which {'is' if len(missing) == 1 else 'are'} not installed: {INSTALL_HINT}"
