"""`inspector plan ...`: design, OC curve, zero-acceptance sample size."""

from __future__ import annotations


def register(subparsers) -> None:
    plan = subparsers.add_parser("plan", help="design a sampling plan or show its risks")
    plan.set_defaults(handler=lambda args: plan.print_help())
