"""Leaving the process at once (standard library only, so the fast start-up can use it)."""

from __future__ import annotations

import logging
import os
import sys
from typing import Callable, NoReturn

_before_leaving: list[Callable[[], None]] = []


def before_leaving(action: Callable[[], None]) -> None:
    """Run ``action`` (quick: stopping worker processes) when the process leaves through :func:`leave_now`."""
    _before_leaving.append(action)


def leave_now(status: int = 0) -> NoReturn:
    """Exit at once: a review still running or the interpreter's teardown (over a second with
    the element tables loaded) must not keep a server alive whose client is gone."""
    for action in _before_leaving:
        try:
            action()
        except Exception:  # leaving regardless
            pass
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except Exception:  # the client may have closed the pipe: nothing left to tell it
            pass
    logging.shutdown()
    os._exit(status)
