"""``make bench``: every benchmark, one ``name: value`` line per figure.

The pure-analysis figures run in this process; the server figures drive real
server processes over stdio.  Ratios are taken against floors measured in the
same run.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import analysis  # noqa: E402
import server  # noqa: E402


def main() -> None:
    print(f"cores: {os.cpu_count()}")
    for name, value in server.measure().items():  # first: its fresh processes should not share the CPU with us
        print(f"{name}: {value}", flush=True)
    analysis.main()


if __name__ == "__main__":
    main()
