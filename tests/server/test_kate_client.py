"""Kate 22.12 (Debian 12) under Xvfb, LSP Client plugin on, editors/kate/settings.json, against the real server.

Kate is started with a private home and configuration; the server command of settings.json is
replaced by tests/server/kate/lsp_tee.py in front of `python -m notelsp serve`, which logs every
message both ways. The test reads that log: Kate's `initialize`, the `settings` object it pushes with
`workspace/didChangeConfiguration` (it never answers `workspace/configuration`: it does not offer it),
and the diagnostics the server publishes for the note after that push.

XeF2 claimed bent: VSEPR predicts linear (steric number 5, three lone pairs equatorial); PH3 claimed
sp3: Drago's rule predicts nearly unhybridized bonds (standard VSEPR and Drago's rule, from memory).
"""

from __future__ import annotations

import json
import os
import select
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
TEE = Path(__file__).resolve().parent / "kate" / "lsp_tee.py"
pytestmark = pytest.mark.client

NOTE = "# Notes\n\nXenon difluoride {XeF2: bent}.\nPhosphine {PH3: sp3}.\n"
DISABLED = "wrong-shape"  # what {XeF2: bent} triggers, switched off by the pushed settings
SHOWN = "wrong-hybridization"  # what {PH3: sp3} triggers, still shown
WAIT_SECONDS = 90  # a bound on a busy machine, not a measurement


@pytest.fixture(scope="module")
def programs() -> tuple[str, str]:
    kate = shutil.which("kate")
    if kate is None:
        pytest.skip("kate is not installed and `make test` could not install it "
                    "(apt-get install -y --no-install-recommends kate xvfb)")
    xvfb = shutil.which("Xvfb")
    if xvfb is None:
        pytest.skip("Xvfb is not installed: Kate needs a display (apt-get install -y --no-install-recommends xvfb)")
    return kate, xvfb


def kconfig_list(values: list[str]) -> str:
    """A KConfig string list: entries joined by commas, commas and backslashes inside escaped."""
    return ",".join(v.replace("\\", "\\\\").replace(",", "\\,") for v in values)


def configure(tmp_path: Path, log: Path) -> tuple[dict[str, str], dict]:
    """Private HOME and XDG folders holding katerc and the user server settings; returns (env, settings)."""
    home, config = tmp_path / "home", tmp_path / "config"
    runtime = tmp_path / "runtime"
    for folder in (home, config / "kate" / "lspclient", tmp_path / "data", tmp_path / "cache", runtime):
        folder.mkdir(parents=True)
    runtime.chmod(0o700)

    command = [sys.executable, str(TEE), str(log), "--", sys.executable, "-m", "notelsp", "serve"]
    settings = json.loads((ROOT / "editors" / "kate" / "settings.json").read_text())
    for server in settings["servers"].values():
        server["command"] = command
        server["settings"]["notelsp"]["disabled"] = [DISABLED]
    (config / "kate" / "lspclient" / "settings.json").write_text(json.dumps(settings, indent=2))
    # Kate asks before it starts a server named in the user's settings, and keeps the answer in
    # katerc under the command line joined by spaces; with no one to answer, it records "blocked".
    (config / "katerc").write_text(
        "[Kate Plugins]\nlspclientplugin=true\n\n"
        f"[lspclient]\nAllowedServerCommandLines={kconfig_list([' '.join(command)])}\n"
    )

    env = {k: v for k, v in os.environ.items() if k not in ("SUDO_USER", "KDESU_USER", "DISPLAY", "WAYLAND_DISPLAY")}
    env.update(
        HOME=str(home),
        XDG_CONFIG_HOME=str(config),
        XDG_DATA_HOME=str(tmp_path / "data"),
        XDG_CACHE_HOME=str(tmp_path / "cache"),
        XDG_RUNTIME_DIR=str(runtime),
        # A bus that is not there: Kate runs alone, never joins a running Kate, never starts a bus daemon.
        DBUS_SESSION_BUS_ADDRESS=f"unix:path={tmp_path / 'no-bus'}",
        NOTELSP_COMPUTE="off",  # as for every server the tests start: no quantum-chemistry workers
    )
    return env, settings


def read_log(log: Path) -> list[dict]:
    if not log.exists():
        return []
    entries = []
    for line in log.read_text(encoding="utf-8").splitlines():
        try:
            entries.append(json.loads(line))
        except ValueError:
            break  # a line still being written
    return entries


def settled(entries: list[dict], note_uri: str) -> dict | None:
    """The note's complete diagnostics published after the client's first pushed settings, once there are some.

    A busy server may first publish part of a review, marked by a review-continues finding; the rest follows.
    """
    pushed = next((i for i, e in enumerate(entries) if e["from"] == "client"
                   and e["message"].get("method") == "workspace/didChangeConfiguration"), None)
    if pushed is None:
        return None
    for entry in entries[pushed + 1:]:
        message = entry["message"]
        if (entry["from"] == "server" and message.get("method") == "textDocument/publishDiagnostics"
                and message["params"]["uri"] == note_uri and message["params"]["diagnostics"]
                and all(d["code"] != "review-continues" for d in message["params"]["diagnostics"])):
            return message["params"]
    return None


def session_members(session: int) -> list[int]:
    """Live (not zombie) processes of a session: everything Kate, Xvfb, the tee and the server started."""
    members = []
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            stat = (entry / "stat").read_text()
        except OSError:
            continue
        fields = stat[stat.rindex(")") + 2:].split()  # state ppid pgrp session ...
        if int(fields[3]) == session and fields[0] != "Z":
            members.append(int(entry.name))
    return members


def stop(process: subprocess.Popen) -> list[int]:
    """End the session started with ``process`` (its leader): the leader first, then whatever remains.

    Ending the leader alone first lets it stop and reap its own children (Kate its server); a parent
    killed before its children would leave them to init. Returns what is still alive afterwards.
    """
    session = process.pid  # start_new_session: the session id is the leader's pid
    for sig, leader_only in ((signal.SIGTERM, True), (signal.SIGTERM, False), (signal.SIGKILL, False)):
        for pid in [session] if leader_only else session_members(session):
            try:
                os.kill(pid, sig)
            except ProcessLookupError:
                pass
        deadline = time.monotonic() + 10
        while session_members(session) and time.monotonic() < deadline:
            time.sleep(0.1)
        if not session_members(session):
            break
    try:
        process.wait(timeout=5)
    except subprocess.TimeoutExpired:
        pass
    return session_members(session)


def start_display(xvfb: str, output: Path) -> tuple[subprocess.Popen, str]:
    """A private X server; it picks a free display number itself and writes it to a pipe (-displayfd)."""
    read_end, write_end = os.pipe()
    with output.open("wb") as sink:
        server = subprocess.Popen([xvfb, "-displayfd", str(write_end), "-nolisten", "tcp",
                                   "-screen", "0", "1280x800x24"], pass_fds=(write_end,), start_new_session=True,
                                  stdin=subprocess.DEVNULL, stdout=sink, stderr=subprocess.STDOUT)
    os.close(write_end)
    number = b""
    try:
        deadline = time.monotonic() + 30
        while not number.endswith(b"\n"):
            ready, _, _ = select.select([read_end], [], [], max(0.0, deadline - time.monotonic()))
            chunk = os.read(read_end, 16) if ready else b""
            if not chunk:
                stop(server)
                raise AssertionError(f"Xvfb gave no display number:\n{output.read_text(errors='replace')[-2000:]}")
            number += chunk
    finally:
        os.close(read_end)
    return server, f":{number.decode().strip()}"


@pytest.mark.parametrize("name", ["note.md", "note.txt"])  # settings.json's two servers: Markdown and None modes
def test_kate_pushes_its_settings_and_shows_the_server_s_diagnostics(programs, tmp_path, name):
    kate, xvfb = programs
    folder = tmp_path / "notes"
    folder.mkdir()
    note = folder / name
    note.write_text(NOTE)
    # Found by rootIndicationFileNames (else Kate takes $HOME as the root); its choice for the rule
    # that stays on must survive the editor's section pushed over it.
    (folder / ".notelsp.toml").write_text('[review]\nseverity = { wrong-hybridization = "warning" }\n')
    log = tmp_path / "lsp.log"
    env, settings = configure(tmp_path, log)

    kate_output = tmp_path / "kate.out"  # files, not pipes: Kate's and Xvfb's chatter must never block them
    x_server, env["DISPLAY"] = start_display(xvfb, tmp_path / "xvfb.out")
    editor = None
    result = None
    try:
        with kate_output.open("wb") as sink:
            editor = subprocess.Popen([kate, "-n", str(note)], env=env, cwd=tmp_path, start_new_session=True,
                                      stdin=subprocess.DEVNULL, stdout=sink, stderr=subprocess.STDOUT)
        deadline = time.monotonic() + WAIT_SECONDS
        while result is None and time.monotonic() < deadline and editor.poll() is None:
            time.sleep(0.25)
            entries = read_log(log)
            opened = [e["message"]["params"]["textDocument"]["uri"] for e in entries
                      if e["message"].get("method") == "textDocument/didOpen"]
            result = settled(entries, opened[0]) if opened else None
    finally:
        left = (stop(editor) if editor is not None else []) + stop(x_server)
    output = kate_output.read_text(encoding="utf-8", errors="replace")
    assert not left, f"processes left behind: {left}"

    entries = read_log(log)
    summary = [(e["from"], e["message"].get("method"), e["message"].get("id")) for e in entries]
    assert result is not None, f"no diagnostics after the pushed settings; log: {summary}\nKate said:\n{output[-3000:]}"

    client = [e["message"] for e in entries if e["from"] == "client"]
    assert client[0]["method"] == "initialize"
    assert not client[0]["params"]["capabilities"].get("workspace", {}).get("configuration")
    assert Path(client[0]["params"]["rootPath"]) == folder  # the folder holding .notelsp.toml
    pushes = [m for m in client if m.get("method") == "workspace/didChangeConfiguration"]
    server_entry = "markdown" if note.suffix == ".md" else "plaintext"  # also the languageId Kate sends
    assert pushes[0]["params"]["settings"] == settings["servers"][server_entry]["settings"]
    opened = [m["params"]["textDocument"] for m in client if m.get("method") == "textDocument/didOpen"]
    assert [(d["uri"], d["languageId"], d["text"]) for d in opened] == [(note.as_uri(), server_entry, NOTE)]

    by_code = {d["code"]: d for d in result["diagnostics"]}
    assert SHOWN in by_code and DISABLED not in by_code, result
    assert by_code[SHOWN]["severity"] == 2  # Warning, from .notelsp.toml (LSP DiagnosticSeverity)
    server_requests = {e["message"].get("method") for e in entries if e["from"] == "server" and "id" in e["message"]}
    assert "workspace/configuration" not in server_requests  # never asked of a client that does not offer it
