"""`inspector history SUPPLIER`: the supplier's lots with each lot's outcome,
the severity in force for it, and the severity now with the reason (the
switching rules over the recorded lots, per supplier and product)."""

from __future__ import annotations

import argparse

from inspector.cli._common import add_json, emit, table

OPTIONS = {"supplier": "SUPPLIER", "product": "--product"}


def _text_arg(text: str) -> str:
    if not text.strip():
        raise argparse.ArgumentTypeError(f"expected some text, got {text!r}")
    return text


def register(subparsers) -> None:
    p = subparsers.add_parser("history", help="a supplier's lots and the switching severity now",
                              description="Each lot's outcome in the order decided, the severity in force for "
                                          "it, and the severity now with the reason (normal, tightened or "
                                          "discontinued; eligibility for reduced inspection is shown only).")
    p.add_argument("supplier", type=_text_arg, metavar="SUPPLIER")
    p.add_argument("--product", type=_text_arg, metavar="P", help="only this product")
    add_json(p)
    p.set_defaults(handler=_history)


def _history(args) -> int:
    from inspector.cli.lot import workflow_for

    with workflow_for(args, OPTIONS) as wf:
        report = wf.supplier_history(args.supplier, product=args.product)
    emit(args, report, lambda: history_text(report))
    return 0


def _found(lot: dict) -> str:
    if lot["sample_size"] is None or (lot["decision"] is None and lot["inspected"] == 0):
        return "—"
    return f"{lot['nonconforming']}/{lot['sample_size']}"


def _section_text(report: dict, section: dict) -> list[str]:
    product = section["product"]
    lots = [lot for lot in report["lots"] if lot["product"] == product]
    actions = [a for a in report["corrective_actions"] if a["product"] == product]
    lines = [f"{product} from {report['supplier']}",
             f"Severity now: {section['severity'].upper()}"
             + ("  (eligible for reduced inspection)" if section["reduced_eligible"] else ""),
             section["reason"]]
    if not lots:
        lines.append("No lots recorded.")
        return lines
    after: dict = {}
    for action in actions:
        after.setdefault(action["after_lot"], []).append(action)
    rows = []

    def action_rows(key) -> None:
        for action in after.get(key, []):
            rows.append(["", "", "corrective action", "", "", f"{action['note']} ({action['by']}, {action['at'][:10]})"])

    action_rows(None)
    for lot in lots:
        note = lot["note"]
        if lot["resubmission"]:
            note = f"resubmits {lot['resubmission_of']}; " + note if note else f"resubmits {lot['resubmission_of']}"
        if lot["planned_severity"] and lot["severity"] and lot["planned_severity"] != lot["severity"]:
            note = (note + "; " if note else "") + f"planned on {lot['planned_severity']}"
        rows.append([lot["lot_id"], lot["received_on"], lot["decision"] or f"({lot['state']})", _found(lot),
                     lot["severity"] or "—", note])
        action_rows(lot["lot_id"])
    lines.append(table(rows, header=["lot", "received", "decision", "found/n", "severity", "note"],
                       align="lllrll"))
    return lines


def history_text(report: dict) -> str:
    """The supplier's history for people to read."""
    lines: list[str] = [f"! {caution}" for caution in report["cautions"]]
    if not report["products"]:
        lines += [f"{report['supplier']}: no lots recorded.", report["reason"]]
        return "\n".join(lines)
    for k, section in enumerate(report["products"]):
        if k:
            lines.append("")
        lines += _section_text(report, section)
    return "\n".join(lines)
