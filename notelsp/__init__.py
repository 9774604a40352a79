"""notelsp: checks the bonding claims in lab notes."""

from . import dataclass_code

__version__ = "0.1.0"

dataclass_code.install()  # before any of notelsp's dataclasses are made: see dataclass_code.py
