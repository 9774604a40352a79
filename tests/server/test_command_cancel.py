"""``$/cancelRequest`` for a running ``workspace/executeCommand`` stops the cross-check the command started.

pygls cancels only the request's own future, not the command it runs; the
server passes the cancel on (``NoteProtocol``).  Water at the default level (HF/6-31G*), as in the
cross-check's own server tests (whose helpers are used here).
"""

from __future__ import annotations

import asyncio
import os
import uuid

import pytest
import pytest_asyncio
from lsprotocol import types
from pytest_lsp import ClientServerConfig

from ..crosscheck.test_crosscheck_server import (
    NOTE, SERVER, WAIT, codes, cross_check_action, kinds, start, wait_for, workers_of,
)


@pytest_asyncio.fixture
async def client(tmp_path):
    cache = tmp_path / "cache"  # a private result cache: the calculation must really run
    config = ClientServerConfig(server_command=SERVER, server_env={**os.environ, "NOTELSP_CACHE_DIR": str(cache)})
    lsp_client = await config.start()
    yield lsp_client
    await lsp_client.shutdown_session()
    await lsp_client.stop()


async def test_cancel_request_for_the_command_stops_its_cross_check(client, tmp_path):
    uri = await start(client, tmp_path)
    command = (await cross_check_action(client, uri, NOTE))["command"]
    server = client._server.pid
    request_id = str(uuid.uuid4())
    running = asyncio.ensure_future(client.protocol.send_request_async(
        types.WORKSPACE_EXECUTE_COMMAND,
        types.ExecuteCommandParams(command=command["command"], arguments=command["arguments"]),
        msg_id=request_id,
    ))
    (token,) = await wait_for(lambda: list(client.progress_reports))
    await wait_for(lambda: workers_of(server))
    client.protocol.notify(types.CANCEL_REQUEST, types.CancelParams(id=request_id))
    with pytest.raises(Exception, match="cancel"):
        await asyncio.wait_for(running, WAIT)
    # The calculation ends as cancelled, not with a result: the command itself was stopped.
    await wait_for(lambda: kinds(client.progress_reports[token])[-1:] == ["WorkDoneProgressEnd"])
    assert client.progress_reports[token][-1].message == "cancelled"
    await wait_for(lambda: workers_of(server) == [], timeout=10)
    assert "computed-angle" not in codes(client, uri)
