"""The fast start-up: its early initialize reply is exactly the one pygls computes, and the server behind it
is in the usual state.

The reference is pygls itself: ``pygls_initialize_result`` builds the real
server in this process and lets pygls answer the same request.  The client
capability sets include the ones pytest-lsp records for real editors.
"""

from __future__ import annotations

import io
import json
import logging
import os
import subprocess
import sys

import pytest
from lsprotocol import types
from pygls.protocol import default_converter
from pytest_lsp import client_capabilities

from notelsp.server.framing import encode_frame, frame_bodies
from notelsp.server.quickstart import answer_initialize, early_result
from notelsp.server.snapshot_tool import SNAPSHOT_PATH, build_snapshot, pygls_initialize_result, snapshot_source

SERVER = [sys.executable, "-m", "notelsp.server"]


def _editor(name: str) -> dict:
    return default_converter().unstructure(client_capabilities(name), types.ClientCapabilities)


CLIENTS = {
    "offers nothing": {},
    "utf-8 offered first": {"general": {"positionEncodings": ["utf-8", "utf-16"]}},
    "utf-16 only": {"general": {"positionEncodings": ["utf-16"]}},
    "utf-32 before utf-8": {"general": {"positionEncodings": ["utf-32", "utf-8"]}},
    "only encodings nobody supports": {"general": {"positionEncodings": ["utf-7"]}},
    "an empty encoding list": {"general": {"positionEncodings": []}},
    "will save offered": {"textDocument": {"synchronization": {"willSave": True, "willSaveWaitUntil": True}}},
    "will save refused": {"textDocument": {"synchronization": {"willSave": False, "willSaveWaitUntil": False}}},
    "rename prepare support": {"textDocument": {"rename": {"prepareSupport": True}}},
    "notebooks": {"notebookDocument": {"synchronization": {"dynamicRegistration": False}}},
    "file operations": {"workspace": {"fileOperations": {name: True for name in (
        "willCreate", "didCreate", "willDelete", "didDelete", "willRename", "didRename")}}},
    "Visual Studio Code": _editor("visual-studio-code"),
    "Neovim 0.7": _editor("neovim@v0.7.0"),
}
PARAMS = {
    "no root": {"processId": None, "rootUri": None},
    "root and workspace folders": {"processId": 4242, "rootUri": "file:///notes", "workspaceFolders": [
        {"uri": "file:///notes", "name": "notes"}, {"uri": "file:///more", "name": "more"}],
        "initializationOptions": {"anything": [1, 2]}, "clientInfo": {"name": "editor", "version": "1"},
        "locale": "en", "trace": "off"},
}


@pytest.mark.parametrize("params", sorted(PARAMS))
@pytest.mark.parametrize("client", sorted(CLIENTS))
def test_early_reply_equals_the_reply_pygls_computes(client, params):
    request = {**PARAMS[params], "capabilities": CLIENTS[client]}
    assert early_result(request) == pygls_initialize_result(request)


def test_the_snapshot_is_current():
    assert SNAPSHOT_PATH.read_text(encoding="utf-8") == snapshot_source(build_snapshot()), (
        "the server's capabilities changed: run python -m notelsp.server.snapshot_tool"
    )


def _request(request_id, params) -> bytes:
    return encode_frame(json.dumps({"jsonrpc": "2.0", "id": request_id, "method": "initialize",
                                    "params": params}).encode())


@pytest.mark.parametrize("first", [
    b"Content-Length: lots\r\n\r\n",  # no usable length
    encode_frame(b"{not json"),
    encode_frame(b'{"jsonrpc": "2.0", "id": 1, "method": "textDocument/hover", "params": {}}'),
    _request(True, {"capabilities": {}}),  # an id JSON-RPC does not allow
    _request(1, {"capabilities": []}),
    _request(1, {"processId": "me", "capabilities": {}}),
    _request(1, {"capabilities": {"general": {"positionEncodings": "utf-8"}}}),
    _request(1, {"capabilities": {"textDocument": {"synchronization": {"willSave": "yes"}}}}),
    _request(1, {"capabilities": {"textDocument": 5}}),
])
def test_anything_but_a_plain_initialize_is_left_to_pygls_unchanged(first):
    written = io.BytesIO()
    early = answer_initialize(io.BytesIO(first + b"rest of the input"), written)
    assert early is not None and early.answered_id is None
    assert early.replay == first and written.getvalue() == b""


def test_end_of_input_before_a_whole_frame_means_nobody_to_serve():
    assert answer_initialize(io.BytesIO(b""), io.BytesIO()) is None
    assert answer_initialize(io.BytesIO(b"Content-Length: 40\r\n\r\n{}"), io.BytesIO()) is None


class _Sent(list):
    """A writer for the protocol that keeps what it is given."""

    def write(self, data: bytes) -> None:
        self.append(data)

    def close(self) -> None:
        pass


def test_a_reply_that_drifted_from_the_snapshot_is_reported_and_not_sent_twice(caplog):
    from notelsp.server.app import build_server

    server = build_server()
    sent = _Sent()
    server.protocol.set_writer(sent)
    server.protocol.expect_early_reply(1, {"capabilities": {}, "serverInfo": {"name": "notelsp"}})
    request = {"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": {"processId": None, "capabilities": {}}}
    with caplog.at_level(logging.WARNING, logger="notelsp.server"):
        server.protocol.handle_message(server.protocol.structure_message(request))
    assert sent == []
    assert "snapshot_tool" in caplog.text


def _session(first: bytes, params: dict, root) -> list[dict]:
    """Run the server over stdio on ``first``, then initialize, initialized, a note, shutdown and exit."""
    note = root / "note.md"
    note.write_text("{ClF3: trigonal planar} {ClF3: zigzag}\n", encoding="utf-8")
    (root / ".notelsp.toml").write_text('[review]\ndisabled = ["wrong-shape"]\n', encoding="utf-8")
    messages = [
        {"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": params},
        {"jsonrpc": "2.0", "method": "initialized", "params": {}},
        {"jsonrpc": "2.0", "method": "textDocument/didOpen", "params": {"textDocument": {
            "uri": note.as_uri(), "languageId": "markdown", "version": 1, "text": note.read_text(encoding="utf-8")}}},
        {"jsonrpc": "2.0", "id": 2, "method": "textDocument/diagnostic", "params": {"textDocument": {"uri": note.as_uri()}}},
        {"jsonrpc": "2.0", "id": 3, "method": "shutdown"},
        {"jsonrpc": "2.0", "method": "exit"},
    ]
    data = first + b"".join(encode_frame(json.dumps(m).encode()) for m in messages)
    process = subprocess.Popen(SERVER, stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, cwd=root)
    output, errors = process.communicate(data, timeout=60)
    assert process.returncode == 0, errors.decode()
    assert b"snapshot_tool" not in errors  # no drift reported
    return [json.loads(body) for body in frame_bodies(io.BytesIO(output))]


@pytest.mark.parametrize("first", [b"", b"Content-Length: lots\r\n\r\n"], ids=["initialize first", "junk first"])
def test_the_server_behind_the_early_reply_is_in_the_usual_state(tmp_path, first):
    folder = tmp_path.resolve().as_uri()
    params = {"processId": os.getpid(), "rootUri": None, "workspaceFolders": [{"uri": folder, "name": "notes"}],
              "capabilities": {"general": {"positionEncodings": ["utf-8"]}, "textDocument": {"diagnostic": {}}}}
    received = _session(first, params, tmp_path)
    (initialized,) = [m for m in received if m.get("id") == 1]  # one reply, not two
    assert initialized["result"] == pygls_initialize_result(params)
    (pulled,) = [m for m in received if m.get("id") == 2]
    codes = {item["code"] for item in pulled["result"]["items"]}
    # the workspace folder is the root: its .notelsp.toml switched wrong-shape off, and nothing else
    assert "unknown-claim" in codes and "wrong-shape" not in codes
