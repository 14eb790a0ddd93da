"""`inspector supplier action`: record corrective action for a supplier and
product. When inspection of that supplier and product is discontinued under
the switching rules, the action lets it resume on tightened; the rule lives in
:mod:`inspector.workflow`."""

from __future__ import annotations

import argparse

from inspector.cli._common import add_json, emit

# The arguments behind the workflow's fields, for one-line messages.
OPTIONS = {"supplier": "SUPPLIER", "product": "--product", "note": "--note", "by": "--by"}


def _text_arg(text: str) -> str:
    if not text.strip():
        raise argparse.ArgumentTypeError(f"expected some text, got {text!r}")
    return text


def register(subparsers) -> None:
    supplier = subparsers.add_parser("supplier", help="a supplier's corrective actions",
                                     description="Records about a supplier as a whole.")
    supplier.set_defaults(handler=lambda args: supplier.print_help())
    sub = supplier.add_subparsers(title="supplier commands", metavar="WHAT")

    p = sub.add_parser("action", help="record corrective action (lifts a discontinuation back to tightened)",
                       description="Record corrective action taken by the supplier for one product. If "
                                   "inspection of that product was discontinued, it resumes on tightened.")
    p.add_argument("supplier", type=_text_arg, metavar="SUPPLIER")
    p.add_argument("--product", type=_text_arg, metavar="P",
                   help="the product (needed when the supplier ships several)")
    p.add_argument("--note", required=True, type=_text_arg, metavar="TEXT", help="what was done")
    p.add_argument("--by", required=True, type=_text_arg, metavar="NAME", help="who records it (a registered person)")
    add_json(p)
    p.set_defaults(handler=_action)


def _action(args) -> int:
    from inspector.cli.lot import workflow_for

    with workflow_for(args, OPTIONS) as wf:
        done = wf.record_corrective_action(args.supplier, product=args.product, note=args.note, by=args.by)

    def text() -> str:
        head = (f"Corrective action recorded for {done['product']} from {done['supplier']}, entry {done['entry']} "
                f"(after lot {done['lot']}), by {done['by']}.")
        if done["lifted"]:
            change = "Inspection was discontinued; it resumes on tightened."
        else:
            change = f"Inspection was not discontinued; the severity stays {done['severity']}."
        return "\n".join([head, change, done["reason"]])

    emit(args, done, text)
    return 0
