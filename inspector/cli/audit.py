"""`inspector audit verify`: re-read the record store and check the audit chain.

Exit 0 when every entry's hashes match and every guard is in place; 1 naming
the first broken entry when anything recorded was changed behind the tool's
back.
"""

from __future__ import annotations

from inspector.cli._common import add_json, emit


def register(subparsers) -> None:
    audit = subparsers.add_parser("audit", help="check the record store's audit chain")
    audit.set_defaults(handler=lambda args: audit.print_help())
    sub = audit.add_subparsers(title="audit commands", metavar="WHAT")
    p = sub.add_parser("verify", help="recompute every hash and name the first broken entry")
    p.add_argument("--lot", metavar="ID", help="check only this lot's entries")
    add_json(p)
    p.set_defaults(handler=_verify)


def _verify(args) -> int:
    from inspector.cli.lot import workflow_for

    with workflow_for(args) as wf:
        report = wf.verify(args.lot)
    payload = {
        "ok": report.ok,
        "lot": report.lot_id,
        "checked": report.checked,
        "head": report.head,
        "first_broken": None if report.broken is None else {
            "entry": report.broken.seq, "table": report.broken.table, "row": report.broken.row_id,
            "problem": report.broken.problem, "message": report.broken.describe()},
        "problems": [p.describe() for p in report.problems],
        "missing_guards": list(report.missing_guards),
    }

    def text() -> str:
        scope = f"lot {report.lot_id}" if report.lot_id else "the store"
        if report.ok:
            return f"Audit chain of {scope} intact: {report.checked} entries checked; head {report.head}"
        lines = []
        if report.broken is not None:
            lines.append(f"Audit chain of {scope} BROKEN at {report.broken.describe()}")
            if len(report.problems) > 1:
                lines.append(f"  ({len(report.problems) - 1} more problem(s) after it)")
        if report.missing_guards:
            lines.append("Guards against changing records are missing or altered: " + ", ".join(report.missing_guards))
        return "\n".join(lines)

    emit(args, payload, text)
    return 0 if report.ok else 1
