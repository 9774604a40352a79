"""``python -m notelsp.server [--tcp HOST:PORT]``: the server without the rest of the command line."""

import argparse

from . import run

parser = argparse.ArgumentParser(prog="python -m notelsp.server")
parser.add_argument("--tcp", metavar="HOST:PORT", help="listen on loopback TCP instead of stdio")
raise SystemExit(run(parser.parse_args().tcp))
