"""Workers are bounded and replaced: each isomer gets a fresh worker process (so none is reused past
one job), its address space is capped, and a worker killed from outside is started again once for the
same job.  Fast: a stand-in worker script replaces the calculation (its behaviour is the point here)."""

from __future__ import annotations

import asyncio
import json
import subprocess
import sys
from pathlib import Path

import pytest

from notelsp.crosscheck import runner
from notelsp.crosscheck.levels import parse_level
from notelsp.crosscheck.protocol import Job
from notelsp.crosscheck.start import starting_geometries
from notelsp.notation import parse_formula

STAND_IN = """\
import json, os, signal, sys
log = {log!r}
with open(log, "a", encoding="utf-8") as out:
    out.write(json.dumps(sys.argv[1:]) + "\\n")
starts = sum(1 for _ in open(log, encoding="utf-8"))
job = json.loads(sys.stdin.read())
behaviour = {behaviour!r}
if behaviour == "always-killed" or (behaviour == "killed-once" and starts == 1):
    os.kill(os.getpid(), signal.SIGKILL)
if behaviour == "exits":
    raise SystemExit(1)
print(json.dumps({{"event": "error", "kind": "failed", "message": f"worker {{starts}} answered"}}), flush=True)
"""


def _stand_in(tmp_path: Path, behaviour: str, monkeypatch) -> Path:
    log = tmp_path / "starts.log"
    script = tmp_path / "stand_in_worker.py"
    script.write_text(STAND_IN.format(log=str(log), behaviour=behaviour), encoding="utf-8")
    monkeypatch.setattr(runner, "WORKER", (str(script),))
    return log


def _run(job: Job):
    async def go():
        loop = asyncio.get_running_loop()
        return await runner._run_worker_again_if_killed(job, loop.time() + 60, lambda step, energy: None)

    return asyncio.run(go())


@pytest.fixture
def job() -> Job:
    (geometry, *_) = starting_geometries(parse_formula("H2O"), 20)
    return Job(geometry, parse_level("HF/STO-3G"), 5)


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX signals")
def test_a_killed_worker_is_replaced_and_the_job_sent_again(tmp_path, monkeypatch, job):
    log = _stand_in(tmp_path, "killed-once", monkeypatch)
    assert _run(job) == ("failed", "worker 2 answered")  # the second worker's own answer: nothing lost
    starts = [json.loads(line) for line in log.read_text(encoding="utf-8").splitlines()]
    assert len(starts) == 2
    assert all(arguments == ["--memory-bytes", str(runner.WORKER_MEMORY_BYTES)] for arguments in starts)


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX signals")
def test_a_worker_killed_twice_fails_the_job_saying_so(tmp_path, monkeypatch, job):
    log = _stand_in(tmp_path, "always-killed", monkeypatch)
    status, message = _run(job)
    assert status == "failed"
    assert "H2O" in message and "killed (signal 9)" in message and "again after a restart" in message
    assert len(log.read_text(encoding="utf-8").splitlines()) == 1 + runner.WORKER_RETRIES


def test_a_worker_that_fails_by_itself_is_not_started_again(tmp_path, monkeypatch, job):
    log = _stand_in(tmp_path, "exits", monkeypatch)
    status, message = _run(job)
    assert status == "failed" and "exit code 1" in message
    assert len(log.read_text(encoding="utf-8").splitlines()) == 1


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="RLIMIT_AS as Linux applies it")
def test_the_worker_caps_its_address_space():
    bound = 768 * 1024**2
    probe = (
        "import resource\n"
        "from notelsp.crosscheck.worker import _bound_memory\n"
        f"_bound_memory(['--memory-bytes', '{bound}'])\n"
        "print(resource.getrlimit(resource.RLIMIT_AS)[0])\n"
        "try:\n"
        "    block = bytearray(2 * 1024**3)\n"
        "    print('allocated')\n"
        "except MemoryError:\n"
        "    print('MemoryError')\n"
    )
    run = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=60)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == [str(bound), "MemoryError"]


def test_a_worker_with_a_bad_job_still_answers_under_the_cap():
    run = subprocess.run([sys.executable, "-m", "notelsp.crosscheck.worker", "--memory-bytes",
                          str(runner.WORKER_MEMORY_BYTES)], input="not a job", capture_output=True, text=True,
                         timeout=60)
    assert run.returncode == 2
    assert json.loads(run.stdout)["kind"] == "bad-job"
