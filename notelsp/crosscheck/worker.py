"""The worker process: ``python -m notelsp.crosscheck.worker [--memory-bytes N]`` runs one job.

Reads the job from stdin, answers on stdout in JSON lines (see protocol).
Anything the libraries print goes to stderr, so the protocol stays clean.
"""

from __future__ import annotations

import json
import os
import sys

from .protocol import isomer_to_dict, job_from_json


def _bound_memory(arguments: list[str]) -> None:
    """``--memory-bytes N``: cap this process's address space, so a runaway calculation ends here
    (MemoryError, reported as a failure) rather than exhausting the machine."""
    if "--memory-bytes" not in arguments:
        return
    limit = int(arguments[arguments.index("--memory-bytes") + 1])
    try:
        import resource

        _, hard = resource.getrlimit(resource.RLIMIT_AS)
        resource.setrlimit(resource.RLIMIT_AS, (limit if hard == resource.RLIM_INFINITY else min(limit, hard), hard))
    except (ImportError, ValueError, OSError):  # no such limit on this system: run unbounded
        pass


def main(arguments: list[str] | None = None) -> int:
    _bound_memory(sys.argv[1:] if arguments is None else arguments)
    answer = os.fdopen(os.dup(sys.stdout.fileno()), "w", buffering=1)
    os.dup2(sys.stderr.fileno(), sys.stdout.fileno())  # library chatter -> stderr

    def send(message: dict) -> None:
        answer.write(json.dumps(message) + "\n")
        answer.flush()

    try:
        job = job_from_json(sys.stdin.read())
    except (ValueError, KeyError, TypeError) as error:
        send({"event": "error", "kind": "bad-job", "message": f"unreadable job: {error}"})
        return 2
    try:
        from .compute import optimise

        import pyscf  # noqa: F401  (fail here, with the install hint, not mid-run)
        import geometric  # noqa: F401
    except ImportError as error:
        from .availability import INSTALL_HINT

        send({"event": "error", "kind": "missing-extra", "message": f"{error.name or error}: {INSTALL_HINT}"})
        return 3
    try:
        result = optimise(job, lambda step, energy: send({"event": "step", "step": step, "energy": energy}))
    except Exception as error:  # a failed SCF or optimiser: report it, the parent decides
        send({"event": "error", "kind": "failed", "message": f"{type(error).__name__}: {error}"})
        return 1
    send({"event": "done", "isomer": isomer_to_dict(result)})
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
