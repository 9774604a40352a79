"""Protocol faults against the running server over stdio (raw bytes over pipes).

Each fault gets a JSON-RPC error or is ignored as JSON-RPC 2.0 / LSP say, and
the next valid request is still answered.  Error codes are JSON-RPC 2.0's
(-32700 parse error, -32600 invalid request, -32601 method not found,
-32602 invalid params; jsonrpc.org specification, from memory).
"""

from __future__ import annotations

import json
import random

import pytest

from .scale import scaled, tried
from .stdio_wire import frame, message, start_server

NOTE_URI = "file:///reliability/faults.md"
NOTE = "# Faults\n{ClF3: trigonal planar}\n"
PARSE_ERROR, INVALID_REQUEST, METHOD_NOT_FOUND, INVALID_PARAMS = -32700, -32600, -32601, -32602


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    wire = start_server(cwd=str(tmp_path_factory.mktemp("faults")))
    wire.initialize()
    wire.notify("textDocument/didOpen", {"textDocument": {"uri": NOTE_URI, "languageId": "markdown",
                                                          "version": 1, "text": NOTE}})
    yield wire
    wire.close()


def _still_serving(server) -> None:
    """A valid request after the fault is answered with a real result."""
    answer = server.request("textDocument/hover", {"textDocument": {"uri": NOTE_URI},
                                                   "position": {"line": 1, "character": 2}})
    assert "result" in answer and answer["result"] is not None
    tried("valid requests answered after a fault")


def _error_for(server, request_id):
    return server.wait(lambda m: m.get("id") == request_id and "error" in m)["error"]["code"]


def _request(request_id, method, params):
    body = {"jsonrpc": "2.0", "id": request_id, "method": method}
    if params is not ...:
        body["params"] = params
    return message(body)


ANSWERED_FAULTS = {
    "unknown method": (_request(1, "notelsp/noSuchThing", {}), 1, METHOD_NOT_FOUND),
    "unknown method without params": (_request(2, "no/such", ...), 2, METHOD_NOT_FOUND),
    "params of the wrong type": (_request(3, "textDocument/hover", {"textDocument": 5}), 3, INVALID_PARAMS),
    "position of the wrong type": (_request(4, "textDocument/hover", {"textDocument": {"uri": NOTE_URI},
                                                                   "position": {"line": "x", "character": []}}),
                                   4, INVALID_PARAMS),
    "params missing": (_request(5, "textDocument/codeAction", ...), 5, INVALID_PARAMS),
    "params a list": (_request(6, "textDocument/documentSymbol", [1, 2]), 6, INVALID_PARAMS),
    "invalid JSON": (frame(b'{"jsonrpc": "2.0", "id": 7, "method": '), None, PARSE_ERROR),
    "not UTF-8": (frame(b"\xff\xfe\x00garbage"), None, PARSE_ERROR),
    "a JSON array": (frame(b"[1, 2, 3]"), None, INVALID_REQUEST),
    "a JSON number": (frame(b"42"), None, INVALID_REQUEST),
    "an empty object": (frame(b"{}"), None, INVALID_REQUEST),
    "id of the wrong type": (frame(json.dumps({"jsonrpc": "2.0", "id": {"x": 1}, "method": "textDocument/hover",
                                                "params": {}}).encode()), None, INVALID_REQUEST),
}


@pytest.mark.parametrize("fault", sorted(ANSWERED_FAULTS))
def test_faulty_request_is_answered_with_its_error(server, fault):
    data, request_id, code = ANSWERED_FAULTS[fault]
    server.send_raw(data)
    tried("protocol fault frames sent")
    assert _error_for(server, request_id) == code
    _still_serving(server)


IGNORED_FAULTS = {
    "notification for an unknown method": message({"jsonrpc": "2.0", "method": "notelsp/whatever", "params": {}}),
    "notification with bad params": message({"jsonrpc": "2.0", "method": "textDocument/didOpen", "params": {"x": 1}}),
    "cancel of an unknown request": message({"jsonrpc": "2.0", "method": "$/cancelRequest", "params": {"id": 999999}}),
    "cancel without params": message({"jsonrpc": "2.0", "method": "$/cancelRequest"}),
    "a response nobody asked for": message({"jsonrpc": "2.0", "id": 424242, "result": {"x": 1}}),
    "an error response nobody asked for": message({"jsonrpc": "2.0", "id": 434343, "error": {"code": 1, "message": "?"}}),
    "wrong jsonrpc version": message({"jsonrpc": "1.0", "id": 8, "method": "shutdown"}),
    "header with a non-numeric Content-Length": b"Content-Length: lots\r\n\r\n",
    "header without a length": b"Content-Type: application/vscode-jsonrpc; charset=utf-8\r\n\r\n",
    "stray bytes between frames": b"\r\n\r\nhello\r\n",
    "didChange for an unopened document": message({"jsonrpc": "2.0", "method": "textDocument/didChange", "params": {
        "textDocument": {"uri": "file:///never/opened.md", "version": 2},
        "contentChanges": [{"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}},
                            "text": "x"}]}}),
    "didClose for an unopened document": message({"jsonrpc": "2.0", "method": "textDocument/didClose",
                                                  "params": {"textDocument": {"uri": "file:///never/opened.md"}}}),
    "didSave for an unopened document": message({"jsonrpc": "2.0", "method": "textDocument/didSave",
                                                 "params": {"textDocument": {"uri": "file:///never/opened.md"}}}),
    "configuration change of the wrong shape": message({"jsonrpc": "2.0", "method": "workspace/didChangeConfiguration",
                                                        "params": {"settings": {"notelsp": [1, 2, {"angle_tolerance": "x"}]}}}),
}


@pytest.mark.parametrize("fault", sorted(IGNORED_FAULTS))
def test_ignored_fault_leaves_the_server_serving(server, fault):
    server.send_raw(IGNORED_FAULTS[fault])
    tried("protocol fault frames sent")
    _still_serving(server)
    assert not [m for m in server.drain() if m.get("id") in (8,)]  # the 1.0 "shutdown" did nothing


@pytest.mark.parametrize("declared", ["longer", "shorter"])
def test_wrong_content_length_costs_at_most_the_next_frame(server, declared):
    body = json.dumps({"jsonrpc": "2.0", "id": 50, "method": "textDocument/hover",
                       "params": {"textDocument": {"uri": NOTE_URI}, "position": {"line": 1, "character": 2}}}).encode()
    length = len(body) + 40 if declared == "longer" else len(body) - 7
    server.send_raw(b"Content-Length: %d\r\n\r\n" % length + body)
    tried("protocol fault frames sent")
    # A longer length swallows the start of the next frame: that one is lost, the one after it is read.
    server.notify("notelsp/sacrificed", {"padding": "x" * 60})
    _still_serving(server)


UNOPENED = "file:///reliability/never-opened.md"
POSITION_REQUESTS = [
    ("textDocument/hover", {"textDocument": {"uri": UNOPENED}, "position": {"line": 0, "character": 0}}),
    ("textDocument/completion", {"textDocument": {"uri": UNOPENED}, "position": {"line": 3, "character": 9}}),
    ("textDocument/codeAction", {"textDocument": {"uri": UNOPENED}, "range": {"start": {"line": 0, "character": 0},
                                 "end": {"line": 0, "character": 1}}, "context": {"diagnostics": []}}),
    ("textDocument/documentSymbol", {"textDocument": {"uri": UNOPENED}}),
    ("textDocument/inlayHint", {"textDocument": {"uri": UNOPENED}, "range": {"start": {"line": 0, "character": 0},
                                "end": {"line": 9, "character": 0}}}),
    ("textDocument/diagnostic", {"textDocument": {"uri": UNOPENED}}),
]


@pytest.mark.parametrize("method, params", POSITION_REQUESTS, ids=[m for m, _ in POSITION_REQUESTS])
def test_requests_for_unopened_documents(server, method, params):
    answer = server.request(method, params)
    tried("protocol fault frames sent")
    assert "result" in answer or answer["error"]["code"] in (INVALID_PARAMS, -32803)
    _still_serving(server)


def test_positions_past_the_end(server):
    far = [{"line": 1, "character": 10_000}, {"line": 10_000, "character": 0}, {"line": 2**31 - 1, "character": 2**31 - 1}]
    for position in far:
        for method, params in [
            ("textDocument/hover", {"position": position}),
            ("textDocument/completion", {"position": position}),
            ("textDocument/codeAction", {"range": {"start": {"line": 0, "character": 0}, "end": position},
                                         "context": {"diagnostics": []}}),
            ("textDocument/codeAction", {"range": {"start": position, "end": position}, "context": {"diagnostics": []}}),
            ("textDocument/inlayHint", {"range": {"start": {"line": 0, "character": 0}, "end": position}}),
        ]:
            answer = server.request(method, {"textDocument": {"uri": NOTE_URI}, **params})
            tried("protocol fault frames sent")
            assert "result" in answer, (method, position, answer)
    _still_serving(server)


def test_edits_past_the_end_and_stale_versions_keep_the_server_consistent(server):
    uri = "file:///reliability/stale.md"
    server.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown", "version": 10,
                                                            "text": "{NH3: trigonal planar}\n"}})
    edits = [
        (11, {"range": {"start": {"line": 50, "character": 3}, "end": {"line": 60, "character": 0}}, "text": "tail "}),
        (5, {"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}}, "text": "stale "}),
        (12, {"range": {"start": {"line": 0, "character": 900}, "end": {"line": 0, "character": 2}}, "text": ""}),
        (13, {"text": "{ClF3: trigonal planar}\n"}),  # a full replacement settles the text
    ]
    for version, change in edits:
        server.notify("textDocument/didChange", {"textDocument": {"uri": uri, "version": version},
                                                 "contentChanges": [change]})
        tried("protocol fault frames sent")
    pulled = server.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})
    assert [d["code"] for d in pulled["result"]["items"]] == ["wrong-shape"]
    _still_serving(server)


def test_cancel_request_in_flight(server):
    server.send({"jsonrpc": "2.0", "id": 77, "method": "textDocument/codeAction", "params": {
        "textDocument": {"uri": NOTE_URI}, "range": {"start": {"line": 1, "character": 0},
                                                     "end": {"line": 1, "character": 20}},
        "context": {"diagnostics": []}}})
    server.notify("$/cancelRequest", {"id": 77})
    tried("protocol fault frames sent", 2)
    answer = server.wait(lambda m: m.get("id") == 77)  # a result or the LSP RequestCancelled error
    assert "result" in answer or answer["error"]["code"] == -32800
    _still_serving(server)


def test_random_byte_storm(server):
    """Random bytes, random slices of valid frames and random JSON, then the server still answers."""
    rng = random.Random(7)  # fixed seed: the same storm every run
    valid = message({"jsonrpc": "2.0", "id": 99, "method": "textDocument/hover",
                     "params": {"textDocument": {"uri": NOTE_URI}, "position": {"line": 1, "character": 2}}})
    count = scaled(300, 5_000)
    for _ in range(count):
        choice = rng.random()
        if choice < 0.1:  # a wrong length, either way
            body = json.dumps({"jsonrpc": "2.0", "method": "notelsp/noise", "params": {"n": rng.random()}}).encode()
            chunk = b"Content-Length: %d\r\n\r\n" % max(1, len(body) + rng.randrange(-20, 20)) + body
        elif choice < 0.3:
            chunk = frame(bytes(rng.randrange(256) for _ in range(rng.randrange(1, 60))))
        elif choice < 0.6:
            cut = rng.randrange(len(valid))
            chunk = frame(valid[len(b"Content-Length: 000\r\n\r\n") + cut:] or b"{")
        else:
            chunk = frame(json.dumps(rng.choice([None, [], {}, 1, "x", {"jsonrpc": "2.0"},
                                                 {"jsonrpc": "2.0", "method": rng.choice(["", "x", "shutdown/"]),
                                                  "params": rng.choice([1, "s", [], {}])}])).encode())
        server.send_raw(chunk)
    tried("protocol fault frames sent", count)
    server.send_raw(b"\r\n" * 3 + message({"jsonrpc": "2.0", "method": "notelsp/sacrificed", "params": {"p": "x" * 60}}))
    _still_serving(server)


@pytest.mark.parametrize("method, params", [
    ("textDocument/didOpen", {"textDocument": {"uri": "file:///reliability/with-id.md", "languageId": "markdown",
                                               "version": 1, "text": "{NH3: trigonal planar}\n"}}),
    ("notelsp/someNotification", {}),
    ("$/cancelRequest", {"id": 123456}),
])
def test_notification_with_an_id_is_answered(server, method, params):
    """JSON-RPC 2.0: a message with an id is a request and gets a response, whatever its method."""
    server.next_id += 1
    request_id = server.next_id
    server.send({"jsonrpc": "2.0", "id": request_id, "method": method, "params": params})
    tried("protocol fault frames sent")
    answer = server.wait(lambda m: m.get("id") == request_id and "method" not in m)
    assert "result" in answer or answer["error"]["code"] == METHOD_NOT_FOUND
    _still_serving(server)


def test_notification_with_an_id_is_also_handled(server):
    uri = "file:///reliability/handled-with-id.md"
    server.send({"jsonrpc": "2.0", "id": "open-1", "method": "textDocument/didOpen", "params": {"textDocument": {
        "uri": uri, "languageId": "markdown", "version": 1, "text": "{ClF3: trigonal planar}\n"}}})
    tried("protocol fault frames sent")
    assert server.wait(lambda m: m.get("id") == "open-1")["result"] is None
    pulled = server.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})
    assert [d["code"] for d in pulled["result"]["items"]] == ["wrong-shape"]
