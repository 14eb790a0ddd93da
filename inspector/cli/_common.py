"""Shared pieces of the command-line front end: the parser class that turns
argparse's exits into one-line errors, argument types that name what they
expected, and the output helper behind every command's ``--json``."""

from __future__ import annotations

import argparse
import json
import math
import sys
from decimal import Decimal, InvalidOperation
from fractions import Fraction
from typing import Any, Callable


class UsageError(Exception):
    """Bad input on the command line: reported as one line, exit status 2."""


class CommandError(Exception):
    """A step the tool refused (bad data, a workflow rule): one line, exit 2."""


class Parser(argparse.ArgumentParser):
    """An ArgumentParser that raises instead of printing usage and exiting."""

    def error(self, message: str):  # noqa: D401 - argparse API
        raise UsageError(message)


def build_root_parser():
    from inspector import __version__

    parser = Parser(
        prog="inspector",
        description=(
            "Acceptance sampling of physical lots: number the units, draw the "
            "sample, record results, decide with exact finite-lot risks. "
            "Without a command, opens the terminal UI."
        ),
    )
    parser.add_argument("--version", action="version", version=f"inspector {__version__}")
    parser.add_argument(
        "--db",
        metavar="PATH",
        help="the record store (default: $INSPECTOR_DB, else the user's data directory)",
    )
    subparsers = parser.add_subparsers(title="commands", metavar="COMMAND")
    return parser, subparsers


def add_json(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--json", action="store_true", help="print one JSON object on stdout")


# --- argument types -------------------------------------------------------
# Each raises ArgumentTypeError with what was expected; argparse prefixes the
# option name, so the one-line message names both the argument and the value.


def positive_int(text: str) -> int:
    value = _int(text)
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a whole number of at least 1, got {text!r}")
    return value


def nonnegative_int(text: str) -> int:
    value = _int(text)
    if value < 0:
        raise argparse.ArgumentTypeError(f"expected a whole number of at least 0, got {text!r}")
    return value


def _int(text: str) -> int:
    try:
        return int(text.strip().replace("_", ""))
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None


def exact_decimal(text: str) -> Fraction:
    """A decimal number exactly as typed (no binary rounding)."""
    try:
        value = Decimal(text.strip())
    except InvalidOperation:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not value.is_finite():
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return Fraction(value)


def percent(text: str) -> Fraction:
    """A percentage as the trade writes it (``1.5`` means 1.5 %), in [0, 100]."""
    value = exact_decimal(text)
    if not 0 <= value <= 100:
        raise argparse.ArgumentTypeError(f"expected a percentage from 0 to 100, got {text!r}")
    return value


def open_probability(text: str) -> Fraction:
    """A probability strictly between 0 and 1, exactly as typed."""
    value = exact_decimal(text)
    if not 0 < value < 1:
        raise argparse.ArgumentTypeError(f"expected a number strictly between 0 and 1, got {text!r}")
    return value


def int_list(text: str) -> list[int]:
    """A comma-separated list of whole numbers, e.g. ``3,8,10``."""
    items = [item for item in text.replace(" ", "").split(",")]
    if not items or any(item == "" for item in items):
        raise argparse.ArgumentTypeError(f"expected whole numbers separated by commas, got {text!r}")
    out = []
    for item in items:
        try:
            out.append(int(item))
        except ValueError:
            raise argparse.ArgumentTypeError(
                f"expected whole numbers separated by commas, got {text!r}"
            ) from None
    return out


# --- output -----------------------------------------------------------------


def _jsonable(value: Any) -> Any:
    if isinstance(value, Fraction):
        return float(value)
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if hasattr(value, "item") and callable(value.item):  # numpy scalars
        return value.item()
    raise TypeError(f"not JSON serialisable: {type(value).__name__}")


def emit(args: argparse.Namespace, payload: dict, text: Callable[[], str] | str) -> None:
    """Print ``payload`` as one JSON object with ``--json``, else the text form."""
    if getattr(args, "json", False):
        sys.stdout.write(json.dumps(payload, default=_jsonable, allow_nan=False) + "\n")
    else:
        sys.stdout.write((text() if callable(text) else text).rstrip("\n") + "\n")


def table(rows: list[list[str]], header: list[str] | None = None, align: str | None = None) -> str:
    """A plain aligned text table; ``align`` holds one of 'l'/'r' per column."""
    body = ([header] if header else []) + rows
    if not body:
        return ""
    widths = [max(len(str(row[i])) for row in body) for i in range(len(body[0]))]
    align = align or "l" * len(widths)
    lines = []
    for k, row in enumerate(body):
        cells = [
            str(cell).rjust(w) if a == "r" else str(cell).ljust(w)
            for cell, w, a in zip(row, widths, align)
        ]
        lines.append("  ".join(cells).rstrip())
        if header and k == 0:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines)
