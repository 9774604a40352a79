"""notelsp: checks the bonding claims in lab notes."""

__version__ = "0.1.0"
