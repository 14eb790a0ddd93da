"""Command-line front end.

``main(argv)`` is cheap to call many times in one process: the argument
parser is built once, and every command imports the heavy modules it needs
(numpy, scipy, the store) only when it runs.

Each command group lives in its own module of this package and exposes
``register(subparsers)``; the module list below is the whole wiring.
"""

from __future__ import annotations

import sys
from typing import Sequence

from inspector.cli._common import CommandError, UsageError, build_root_parser

# Command-group modules, in the order they appear in the overview.
COMMAND_MODULES = (
    "inspector.cli.plan",
    "inspector.cli.estimate",
    "inspector.cli.draw",
    "inspector.cli.person",
    "inspector.cli.lot",
    "inspector.cli.lots",
    "inspector.cli.history",
    "inspector.cli.supplier",
    "inspector.cli.audit",
    "inspector.cli.sheet",
)

_PARSER = None


def _parser():
    global _PARSER
    if _PARSER is None:
        import importlib

        parser, subparsers = build_root_parser()
        for name in COMMAND_MODULES:
            importlib.import_module(name).register(subparsers)
        _PARSER = parser
    return _PARSER


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command and return its exit status.

    0 success; 1 a check that ran and found a difference (``--verify``,
    ``audit verify``); 2 bad input or a step the workflow refused.
    """
    parser = _parser()
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        args = parser.parse_args(argv)
    except UsageError as exc:
        print(f"inspector: {exc}", file=sys.stderr)
        return 2
    except SystemExit as exc:  # --help and --version exit through argparse
        return int(exc.code or 0)
    handler = getattr(args, "handler", None)
    if handler is None:
        return _no_command(args, parser)
    try:
        return int(handler(args) or 0)
    except (UsageError, CommandError) as exc:
        print(f"inspector: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # e.g. piped into `head`
        return 0


def _no_command(args, parser) -> int:
    """Without a command: open the terminal UI when it exists, else the overview."""
    try:
        from inspector.tui import run as run_tui  # noqa: F401
    except ImportError:
        parser.print_help()
        return 0
    return int(run_tui(args) or 0)
