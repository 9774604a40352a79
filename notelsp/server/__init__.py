"""The notelsp language server: ``run()`` serves stdio, or TCP on loopback only."""

from __future__ import annotations

import ipaddress
import logging
import sys

LOOPBACK_NAMES = ("localhost",)


def parse_tcp(address: str) -> tuple[str, int]:
    """``HOST:PORT`` -> (host, port); ValueError with a readable message for anything not loopback."""
    host, sep, port_text = address.rpartition(":")
    host = host.strip("[]")
    if not sep or not host or not port_text.isdigit() or not 0 < int(port_text) < 65536:
        raise ValueError(f"--tcp wants HOST:PORT with a port from 1 to 65535, not {address!r}")
    if host not in LOOPBACK_NAMES:
        try:
            loopback = ipaddress.ip_address(host).is_loopback
        except ValueError:
            loopback = False
        if not loopback:
            raise ValueError(
                f"refusing to listen on {host!r}: notelsp serves only loopback (127.0.0.1, ::1, localhost), "
                "since the protocol has no authentication"
            )
    return host, int(port_text)


def _one_client(host: str, port: int):
    """Listen on the loopback address and take one client's connection (as stdio serves one client)."""
    import socket

    family, _, _, _, where = socket.getaddrinfo(host, port, type=socket.SOCK_STREAM)[0]
    with socket.create_server(where, family=family) as listener:
        print(f"notelsp serve: listening on {host}:{port}", file=sys.stderr, flush=True)
        connection, _ = listener.accept()
    return connection


def run(tcp: str | None = None) -> int:
    """Serve the language server on stdio (default) or on ``tcp`` = ``HOST:PORT`` (loopback)."""
    address = None
    if tcp is not None:
        try:
            address = parse_tcp(tcp)
        except ValueError as error:
            print(f"notelsp serve: {error}", file=sys.stderr)
            return 2
    logging.basicConfig(level=logging.INFO, stream=sys.stderr, format="notelsp: %(message)s")
    logging.getLogger("pygls").setLevel(logging.WARNING)  # it logs every message at INFO
    if address is not None:
        from .app import build_server, settle_long_lived_objects

        server = build_server()
        settle_long_lived_objects()
        connection = _one_client(*address)
        # the same bounded frame reader and writer as stdio (pygls's own TCP reader has no bounds)
        server.start_io(stdin=connection.makefile("rb"), stdout=connection.makefile("wb"))
        return 0
    from .exiting import leave_now
    from .quickstart import ClientInput, answer_initialize

    early = answer_initialize(sys.stdin.buffer, sys.stdout.buffer)  # before pygls: see quickstart
    if early is None:
        leave_now(0)  # the client closed its end before its first message
    client_input = ClientInput(sys.stdin.buffer, early.replay)  # an exit while building is not kept waiting
    from .app import build_server, settle_long_lived_objects

    server = build_server()
    settle_long_lived_objects()
    if early.answered_id is not None:
        server.protocol.expect_early_reply(early.answered_id, early.answered_result)
    client_input.server_ready()
    server.start_io(stdin=client_input)
    leave_now(server.protocol.exit_status)  # skip the interpreter's slow teardown
