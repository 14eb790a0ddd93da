"""`inspector estimate`: the lot's nonconforming count from a sample result."""

from __future__ import annotations


def register(subparsers) -> None:
    return None
