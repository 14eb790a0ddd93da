"""`inspector plan table`: a plan from the code-letter tables, with its exact risks.

    inspector plan table --lot-size N --aql A [--level II] [--severity normal|tightened] [--json]

Looks the plan up in MIL-STD-105E Table I and Table II-A (normal) or II-B
(tightened), following the table's arrows, and shows beside it what the plan
risks for this lot size (exact hypergeometric) and for a continuing process
(binomial). Cells not confirmed from a published source are said to be
inferred; cells whose arrow leads off the table are refused.
"""

from __future__ import annotations

import argparse

from inspector.cli._common import UsageError, add_json, emit, table

_ARGUMENT = {"lot_size": "--lot-size", "aql": "--aql", "level": "--level", "severity": "--severity"}

CAUTION = (
    "Results are advisory: sampling gives evidence about a lot, not proof. For food and other "
    "safety-critical goods the applicable regulation, the buyer's specification and qualified "
    "inspectors decide."
)


# --- argument types (argparse prefixes the option name to these messages) ---


def lot_size(text: str) -> int:
    try:
        value = int(text.strip().replace("_", ""))
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number of units, got {text!r}") from None
    if value < 2:
        raise argparse.ArgumentTypeError(f"expected a whole number of at least 2 (Table I starts at 2), got {text!r}")
    return value


def aql(text: str) -> str:
    from inspector.stats.tables import TableError, parse_aql

    try:
        return parse_aql(text)
    except TableError as exc:
        raise argparse.ArgumentTypeError(str(exc)) from None


def level(text: str) -> str:
    from inspector.stats.tables import LEVELS

    wanted = text.strip().upper().replace(" ", "")
    if wanted.startswith("S") and "-" not in wanted:  # "S1" as people often write it
        wanted = "S-" + wanted[1:]
    if wanted not in LEVELS:
        raise argparse.ArgumentTypeError(f"expected one of {', '.join(LEVELS)}, got {text!r}")
    return wanted


def severity(text: str) -> str:
    from inspector.stats.tables import SEVERITIES

    wanted = text.strip().lower()
    if wanted not in SEVERITIES:
        extra = " (reduced inspection has no table here)" if wanted == "reduced" else ""
        raise argparse.ArgumentTypeError(f"expected one of {', '.join(SEVERITIES)}, got {text!r}{extra}")
    return wanted


def register(plan_subparsers) -> None:
    """Add ``table`` to the ``inspector plan`` group."""
    p = plan_subparsers.add_parser(
        "table",
        help="plan from the code-letter tables (MIL-STD-105E / Z1.4) with its exact risks",
        description=(
            "Look up the single-sampling plan for a lot in MIL-STD-105E Table I and Table II-A "
            "(normal) or II-B (tightened), and show its risks for this lot (exact) and for a "
            "continuing process. AQL in percent as the table writes it (0.65, 1.0, 2.5, ...)."
        ),
    )
    p.add_argument("--lot-size", type=lot_size, required=True, metavar="N", help="units in the lot (at least 2)")
    p.add_argument("--aql", type=aql, required=True, metavar="A", help="AQL in percent, one of the table's columns")
    p.add_argument("--level", type=level, default="II", metavar="L", help="inspection level S-1..S-4, I, II, III (default II)")
    p.add_argument(
        "--severity", type=severity, default="normal", metavar="S",
        help="normal or tightened (default normal)",
    )
    add_json(p)
    p.set_defaults(handler=run)


def run(args) -> int:
    from inspector.stats.table_risks import table_plan_risks
    from inspector.stats.tables import TableError, lookup_plan

    try:
        plan = lookup_plan(lot_size=args.lot_size, aql=args.aql, level=args.level, severity=args.severity)
    except TableError as exc:
        name = _ARGUMENT.get(exc.field, exc.field)
        raise UsageError(f"argument {name}: {exc}") from None
    risks = table_plan_risks(plan)
    notes = list(plan.notes) + list(risks.notes)
    payload = {
        "lot_size": plan.lot_size,
        "aql": float(plan.aql),
        "aql_column": plan.aql,
        "level": plan.level,
        "severity": plan.severity,
        "code_letter": plan.code_letter,
        "plan_letter": plan.plan_letter,
        "sample_size": plan.sample_size,
        "table_sample_size": plan.table_sample_size,
        "acceptance_number": plan.acceptance_number,
        "rejection_number": plan.rejection_number,
        "full_inspection": plan.full_inspection,
        "consumer_risk": risks.consumer_risk,
        "aql_nonconforming_in_lot": risks.aql_defectives,
        "rql_nonconforming_in_lot": risks.rql_defectives,
        "pa_at_aql_lot": risks.pa_at_aql_lot,
        "pa_at_aql_process": risks.pa_at_aql_process,
        "rql_at_consumer_risk_lot": risks.rql_at_consumer_risk_lot,
        "rql_at_consumer_risk_process": risks.rql_at_consumer_risk_process,
        "models_differ_materially": risks.differ_materially,
        "provenance": plan.provenance,
        "sources": list(plan.sources),
        "notes": notes,
        "caution": CAUTION,
    }
    emit(args, payload, lambda: _text(plan, risks, notes))
    return 0


def _prob(x) -> str:
    return "n/a" if x is None else f"{x:.4f}"


def _share(x) -> str:
    return "n/a" if x is None else f"{100 * x:.3g} %"


def _text(plan, risks, notes) -> str:
    title = f"Plan from the code-letter tables (MIL-STD-105E / ANSI/ASQ Z1.4), {plan.severity} inspection"
    sample = f"{plan.sample_size}"
    if plan.full_inspection:
        sample += f" (every unit; the table's plan samples {plan.table_sample_size})"
    facts = table(
        [
            ["lot size", f"{plan.lot_size}"],
            ["inspection level", plan.level],
            ["AQL", f"{plan.aql} %"],
            ["code letter", plan.code_letter + (f" (plan of {plan.plan_letter})" if plan.plan_letter != plan.code_letter else "")],
            ["sample size", sample],
            ["acceptance number (Ac)", f"{plan.acceptance_number}"],
            ["rejection number (Re)", f"{plan.rejection_number}"],
            ["table cells", plan.provenance],
        ]
    )
    beta = f"{risks.consumer_risk:g}"
    risk_rows = table(
        [
            ["Pa at the AQL", _prob(risks.pa_at_aql_lot), _prob(risks.pa_at_aql_process)],
            [f"RQL at Pa = {beta}", _share(risks.rql_at_consumer_risk_lot), _share(risks.rql_at_consumer_risk_process)],
        ],
        header=["", "this lot (exact)", "process"],
        align="lrr",
    )
    lines = [title, "", facts, "", risk_rows, "", "Notes:"]
    lines += [f"  - {note}" for note in notes]
    lines += ["", CAUTION]
    return "\n".join(lines)
