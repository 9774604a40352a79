"""Kate (Debian 12: 22.12) under Xvfb with its LSP Client plugin and editors/kate/settings.json, against the real server.

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
def kate() -> list[str]:
    found = shutil.which("kate")
    if found is None:
        pytest.skip("kate is not installed and `make test` could not install it "
                    "(apt-get install -y --no-install-recommends kate xvfb)")
    xvfb_run = shutil.which("xvfb-run")
    if xvfb_run is None or shutil.which("Xvfb") is None:
        pytest.skip("Xvfb (xvfb-run) is not installed: Kate needs a display (apt-get install -y xvfb)")
    return [xvfb_run, "-a", found]


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
    """Diagnostics for the note published after the client's first pushed settings, once there are some."""
    pushed = next((i for i, e in enumerate(entries) if e["from"] == "client"
                   and e["message"].get("method") == "workspace/didChangeConfiguration"), None)
    if pushed is None:
        return None
    for entry in entries[pushed + 1:]:
        message = entry["message"]
        if (entry["from"] == "server" and message.get("method") == "textDocument/publishDiagnostics"
                and message["params"]["uri"] == note_uri and message["params"]["diagnostics"]):
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
    """Terminate the whole session started with ``process``; returns what is still alive afterwards."""
    session = process.pid  # start_new_session: the session and group ids are its pid
    for sig in (signal.SIGTERM, signal.SIGKILL):
        for pid in session_members(session):
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


def test_kate_pushes_its_settings_and_shows_the_server_s_diagnostics(kate, tmp_path):
    folder = tmp_path / "notes"
    folder.mkdir()
    note = folder / "note.md"
    note.write_text(NOTE)
    # Found by rootIndicationFileNames (else Kate takes $HOME as the root); its choice for the rule
    # that stays on must survive the editor's section pushed over it.
    (folder / ".notelsp.toml").write_text('[review]\nseverity = { wrong-hybridization = "warning" }\n')
    log = tmp_path / "lsp.log"
    env, settings = configure(tmp_path, log)

    kate_output = tmp_path / "kate.out"  # a file, not a pipe: Kate's chatter must never block it
    with kate_output.open("wb") as sink:
        process = subprocess.Popen([*kate, "-n", str(note)], env=env, cwd=tmp_path, start_new_session=True,
                                   stdin=subprocess.DEVNULL, stdout=sink, stderr=subprocess.STDOUT)
    try:
        deadline = time.monotonic() + WAIT_SECONDS
        result = None
        while result is None and time.monotonic() < deadline and process.poll() is None:
            time.sleep(0.25)
            entries = read_log(log)
            opened = [e["message"]["params"]["textDocument"]["uri"] for e in entries
                      if e["message"].get("method") == "textDocument/didOpen"]
            result = settled(entries, opened[0]) if opened else None
    finally:
        left = stop(process)
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
    assert pushes[0]["params"]["settings"] == settings["servers"]["markdown"]["settings"]
    opened = [m["params"]["textDocument"] for m in client if m.get("method") == "textDocument/didOpen"]
    assert [(d["uri"], d["languageId"], d["text"]) for d in opened] == [(note.as_uri(), "markdown", NOTE)]

    by_code = {d["code"]: d for d in result["diagnostics"]}
    assert SHOWN in by_code and DISABLED not in by_code, result
    assert by_code[SHOWN]["severity"] == 2  # Warning, from .notelsp.toml (LSP DiagnosticSeverity)
    server_requests = {e["message"].get("method") for e in entries if e["from"] == "server" and "id" in e["message"]}
    assert "workspace/configuration" not in server_requests  # never asked of a client that does not offer it
