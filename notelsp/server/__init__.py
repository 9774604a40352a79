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
    from .app import build_server

    server = build_server()
    if address is None:
        server.start_io()
        from .protocol import leave_now

        leave_now(server.protocol.exit_status)  # skip the interpreter's slow teardown
    else:
        server.start_tcp(*address)
    return 0
