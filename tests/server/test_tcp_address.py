"""``notelsp serve --tcp``: loopback only."""

import pytest

from notelsp.server import parse_tcp, run


@pytest.mark.parametrize("address, expected", [
    ("127.0.0.1:2087", ("127.0.0.1", 2087)),
    ("localhost:9000", ("localhost", 9000)),
    ("[::1]:2087", ("::1", 2087)),
])
def test_loopback_addresses_are_accepted(address, expected):
    assert parse_tcp(address) == expected


@pytest.mark.parametrize("address", ["0.0.0.0:2087", "192.168.1.5:2087", "example.org:80"])
def test_other_hosts_are_refused_with_a_reason(address):
    with pytest.raises(ValueError, match="only loopback"):
        parse_tcp(address)


@pytest.mark.parametrize("address", ["2087", "127.0.0.1:", "127.0.0.1:0", "127.0.0.1:70000"])
def test_malformed_addresses_are_refused(address):
    with pytest.raises(ValueError, match="HOST:PORT"):
        parse_tcp(address)


def test_run_refuses_a_public_host_without_serving(capsys):
    assert run("0.0.0.0:2087") == 2
    assert "only loopback" in capsys.readouterr().err
