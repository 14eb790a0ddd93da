"""`inspector plan ...`: design, OC curve, zero-acceptance sample size."""

from __future__ import annotations


def register(subparsers) -> None:
    plan = subparsers.add_parser("plan", help="design a sampling plan or show its risks")
    plan.set_defaults(handler=lambda args: plan.print_help())
    sub = plan.add_subparsers(title="plan commands", metavar="WHAT")
    try:  # the code-letter table route lives in its own module
        from inspector.cli import plan_table
    except ImportError:
        plan_table = None
    if plan_table is not None:
        plan_table.register(sub)
