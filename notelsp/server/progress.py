"""Work-done progress tokens, asked of the client only when it says it supports them."""

from __future__ import annotations

import itertools
import logging
from typing import Any

log = logging.getLogger("notelsp.server")

_tokens = itertools.count(1)


async def progress_token(ls: Any, kind: str) -> str | None:
    """A work-done progress token the client accepted (``notelsp-<kind>-<n>``), or None.

    None when the client has no ``window.workDoneProgress`` or refuses the token: the work
    then runs and reports its results without progress.
    """
    window = ls.client_capabilities.window
    if not (window and window.work_done_progress):
        return None
    token = f"notelsp-{kind}-{next(_tokens)}"
    try:
        await ls.work_done_progress.create_async(token)
    except Exception as error:  # noqa: BLE001 - whatever the client answers, the work goes on
        log.info("work-done progress refused: %s", error)
        return None
    return token
