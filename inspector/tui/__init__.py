"""The terminal UI. ``inspector`` with no command calls :func:`run`."""

from __future__ import annotations

import sys


def run(args) -> int:
    """Open the terminal UI on the store ``args.db`` names (else the default).

    When standard output is not a terminal (a pipe, CI), print the command
    overview instead and return 0: a full-screen program there would hang or
    scribble escape codes into a log.
    """
    if not sys.stdout.isatty() or not sys.stdin.isatty():
        from inspector.cli import _parser

        _parser().print_help()
        return 0
    from inspector.services import build_services

    try:
        services = build_services(getattr(args, "db", None))
    except Exception as exc:  # noqa: BLE001 - one line, never a traceback
        print(f"inspector: {' '.join(str(exc).split())}", file=sys.stderr)
        return 2
    from inspector.tui.app import InspectorApp

    with services:
        InspectorApp(services).run()
    return 0
