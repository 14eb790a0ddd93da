"""`inspector lots`: the registered lots, by state or supplier."""

from __future__ import annotations

from inspector.cli._common import add_json, emit, table

STATE_CHOICES = ("registered", "planned", "drawn", "inspecting", "decided", "released", "rejected", "on hold")


def register(subparsers) -> None:
    p = subparsers.add_parser("lots", help="list the registered lots")
    p.add_argument("--state", choices=STATE_CHOICES, metavar="S", help="only lots in this state: "
                   + ", ".join(STATE_CHOICES))
    p.add_argument("--supplier", metavar="S", help="only lots from this supplier")
    add_json(p)
    p.set_defaults(handler=_lots)


def _lots(args) -> int:
    from inspector.cli.lot import workflow_for

    with workflow_for(args) as wf:
        lots = wf.lots(state=args.state, supplier=args.supplier)

    def text() -> str:
        if not lots:
            return "No lots."
        rows = [[lot["id"], lot["state"] or "", lot["supplier"], lot["product"], str(lot["size"]),
                 lot["decision"] or "", "yes" if lot["critical"] else ""] for lot in lots]
        return table(rows, header=["lot", "state", "supplier", "product", "units", "decision", "critical"],
                     align="llllrll")

    emit(args, {"lots": lots}, text)
    return 0
