"""A built wheel, installed with its dependencies into a fresh virtual environment, works from any folder.

The wheel is built from a copy of the source tree (a build inside the tree
would leave a build/ folder whose stale files could reach later wheels), then
installed with pip from PyPI (pip's cache keeps repeat runs short) and run as
a user would: the ``notelsp`` script of that environment, from a folder
outside the project, with a home folder of its own (so the grammar cache is
written there from scratch).
"""

from __future__ import annotations

import json
import os
import queue
import shutil
import subprocess
import sys
import threading
import time
import zipfile
from pathlib import Path

import pytest

from notelsp import __version__
from notelsp.server.framing import encode_frame, frame_bodies

ROOT = Path(__file__).resolve().parent.parent
SOURCES = ("pyproject.toml", "setup.py", "README.md", "LICENSE", "notelsp", "grammar")
LEFT_OUT = shutil.ignore_patterns("__pycache__", "*.pyc", "*.egg-info", "build", "dist")
INSTALL_TIMEOUT_S = 900  # a cold pip cache downloads numpy, pandas and the rest
RUN_TIMEOUT_S = 120

pytestmark = [pytest.mark.slow, pytest.mark.timeout(INSTALL_TIMEOUT_S + 300)]

WRONG_NOTE = "# Halogen fluorides\n\nChlorine trifluoride {ClF3: trigonal planar} is a liquid.\n"


def _run(command: list[str], **options) -> subprocess.CompletedProcess:
    return subprocess.run(command, capture_output=True, text=True, **options)


def _must(result: subprocess.CompletedProcess, what: str) -> None:
    if result.returncode != 0:
        pytest.fail(f"{what} failed ({result.returncode}):\n{result.stdout[-3000:]}\n{result.stderr[-3000:]}")


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    base = tmp_path_factory.mktemp("wheel")
    source = base / "source"
    source.mkdir()
    for name in SOURCES:
        origin = ROOT / name
        if origin.is_dir():
            shutil.copytree(origin, source / name, ignore=LEFT_OUT)
        else:
            shutil.copy2(origin, source / name)
    built = base / "built"
    _must(
        _run(
            [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "-q", "-w", str(built), str(source)],
            timeout=300,
        ),
        "pip wheel",
    )
    (found,) = built.glob("notelsp-*.whl")
    return found


@pytest.fixture(scope="module")
def installed(wheel, tmp_path_factory) -> dict:
    """A fresh venv with the wheel and its dependencies; the folder and environment to run it in."""
    base = tmp_path_factory.mktemp("installed")
    venv = base / "venv"
    _must(_run([sys.executable, "-m", "venv", str(venv)], timeout=300), "python -m venv")
    env = {key: value for key, value in os.environ.items() if not key.startswith(("PYTHON", "VIRTUAL_ENV", "XDG_"))}
    env["PIP_DISABLE_PIP_VERSION_CHECK"] = "1"
    _must(
        _run([str(venv / "bin" / "python"), "-m", "pip", "install", "-q", str(wheel)], env=env, timeout=INSTALL_TIMEOUT_S),
        "pip install of the wheel with its dependencies",
    )
    elsewhere = base / "elsewhere"
    elsewhere.mkdir()
    (elsewhere / "note.md").write_text(WRONG_NOTE, encoding="utf-8")
    home = base / "home"
    home.mkdir()
    run_env = {"PATH": f"{venv / 'bin'}:/usr/bin:/bin", "HOME": str(home), "LANG": "C.UTF-8"}
    return {"notelsp": str(venv / "bin" / "notelsp"), "python": str(venv / "bin" / "python"),
            "cwd": elsewhere, "env": run_env, "home": home}


def _notelsp(installed: dict, *arguments: str) -> subprocess.CompletedProcess:
    return _run([installed["notelsp"], *arguments], cwd=installed["cwd"], env=installed["env"], timeout=RUN_TIMEOUT_S)


def test_the_wheel_holds_every_file_of_the_package_and_the_grammar(wheel):
    with zipfile.ZipFile(wheel) as archive:
        names = set(archive.namelist())
    expected = {
        path.relative_to(ROOT).as_posix()
        for path in (ROOT / "notelsp").rglob("*")
        if path.is_file() and "__pycache__" not in path.parts and path.suffix != ".pyc"
    }
    expected |= {f"notelsp/grammar/{path.name}" for path in (ROOT / "grammar").iterdir() if path.is_file()}
    assert sorted(expected - names) == []
    assert any(name.endswith(".dist-info/licenses/LICENSE") for name in names)


def test_the_installed_package_is_the_wheel_not_the_source(installed):
    result = _run([installed["python"], "-c", "import notelsp; print(notelsp.__file__)"],
                  cwd=installed["cwd"], env=installed["env"], timeout=RUN_TIMEOUT_S)
    _must(result, "import notelsp")
    assert not result.stdout.strip().startswith(str(ROOT))
    assert "site-packages" in result.stdout


def test_version_long_and_short(installed):
    for option in ("--version", "-V"):
        result = _notelsp(installed, option)
        _must(result, f"notelsp {option}")
        assert result.stdout == f"notelsp {__version__}\n"


def test_check_text(installed):
    result = _notelsp(installed, "check", "note.md")
    assert result.returncode == 1, result.stderr  # 1: errors found
    assert "wrong-shape" in result.stdout
    assert "note.md:3:" in result.stdout


def test_check_json(installed):
    result = _notelsp(installed, "check", "--format", "json", "note.md")
    assert result.returncode == 1, result.stderr
    report = json.loads(result.stdout)
    codes = [finding["code"] for file in report["files"] for finding in file["findings"]]
    assert "wrong-shape" in codes


def test_check_sarif(installed):
    result = _notelsp(installed, "check", "--format", "sarif", "note.md")
    assert result.returncode == 1, result.stderr
    log = json.loads(result.stdout)
    assert log["version"] == "2.1.0"  # SARIF 2.1.0 (OASIS standard)
    assert "wrong-shape" in [r["ruleId"] for run in log["runs"] for r in run["results"]]


def test_demo(installed):
    result = _notelsp(installed, "demo")
    _must(result, "notelsp demo")
    assert "notebook.md" in result.stdout


def test_explain(installed):
    result = _notelsp(installed, "explain", "ClF3")
    _must(result, "notelsp explain ClF3")
    # ClF3 is T-shaped (VSEPR, AX3E2: common practice, no source)
    assert "t-shaped" in result.stdout.lower()


def test_rules(installed):
    result = _notelsp(installed, "rules")
    _must(result, "notelsp rules")
    assert "wrong-shape" in result.stdout


def test_the_grammar_cache_was_written_in_the_users_cache_folder(installed):
    _must(_notelsp(installed, "explain", "SF4"), "notelsp explain SF4")
    assert list((installed["home"] / ".cache" / "notelsp").glob("*"))


class _Client:
    """Just enough of an LSP client on the server's stdio: frames out, frames in on a thread."""

    def __init__(self, process: subprocess.Popen):
        self.process = process
        self.inbox: queue.Queue = queue.Queue()
        threading.Thread(target=self._read, daemon=True).start()

    def _read(self) -> None:
        for body in frame_bodies(self.process.stdout):
            self.inbox.put(json.loads(body))

    def send(self, body: dict) -> None:
        self.process.stdin.write(encode_frame(json.dumps(body).encode("utf-8")))
        self.process.stdin.flush()

    def wait_for(self, predicate, timeout: float) -> dict:
        deadline = time.monotonic() + timeout
        while (remaining := deadline - time.monotonic()) > 0:
            try:
                message = self.inbox.get(timeout=remaining)
            except queue.Empty:
                break
            if "id" in message and "method" in message:  # a request from the server: answer it plainly
                self.send({"jsonrpc": "2.0", "id": message["id"], "result": None})
            if predicate(message):
                return message
        pytest.fail(f"no matching message from the server within {timeout} s")


def test_serve_over_stdio(installed):
    process = subprocess.Popen([installed["notelsp"], "serve"], cwd=installed["cwd"], env=installed["env"],
                               stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL)
    try:
        client = _Client(process)
        uri = (installed["cwd"] / "note.md").as_uri()
        client.send({"jsonrpc": "2.0", "id": 1, "method": "initialize",
                     "params": {"processId": os.getpid(), "rootUri": installed["cwd"].as_uri(), "capabilities": {}}})
        reply = client.wait_for(lambda m: m.get("id") == 1 and "method" not in m, RUN_TIMEOUT_S)
        assert "capabilities" in reply["result"]
        client.send({"jsonrpc": "2.0", "method": "initialized", "params": {}})
        client.send({"jsonrpc": "2.0", "method": "textDocument/didOpen", "params": {
            "textDocument": {"uri": uri, "languageId": "markdown", "version": 1, "text": WRONG_NOTE}}})
        published = client.wait_for(
            lambda m: m.get("method") == "textDocument/publishDiagnostics" and m["params"]["uri"] == uri
            and any(d.get("code") == "wrong-shape" for d in m["params"]["diagnostics"]),
            RUN_TIMEOUT_S,
        )
        (diagnostic,) = [d for d in published["params"]["diagnostics"] if d["code"] == "wrong-shape"]
        assert diagnostic["range"]["start"]["line"] == 2
        client.send({"jsonrpc": "2.0", "id": 2, "method": "shutdown"})
        client.wait_for(lambda m: m.get("id") == 2 and "method" not in m, RUN_TIMEOUT_S)
        client.send({"jsonrpc": "2.0", "method": "exit"})
        assert process.wait(timeout=30) == 0
    finally:
        if process.poll() is None:
            process.kill()
            process.wait()
