"""`inspector lot ...`: register a lot, plan, draw, record results, decide,
hold, reject, release with a signature, show and export its record.

Every rule lives in :mod:`inspector.workflow`; this module only parses the
command line, reads secrets and files, and prints. The store, the workflow
and the numerics are imported inside the handlers, so that building the
parser stays cheap.
"""

from __future__ import annotations

import argparse
import os
import sys
from contextlib import contextmanager
from typing import Iterator

from inspector.cli._common import (
    CommandError,
    UsageError,
    add_json,
    emit,
    nonnegative_int,
    open_probability,
    percent,
    positive_int,
    table,
)

CLASS_CHOICES = ("critical", "major", "minor")
METHOD_CHOICES = ("simple", "stratified", "two-stage")

# Which option a workflow field names, for one-line messages.
_OPTION = {
    "id": "--id",
    "supplier": "--supplier",
    "product": "--product",
    "size": "--size",
    "structure": "--structure",
    "manifest": "--manifest",
    "reference": "--reference",
    "notes": "--notes",
    "resubmission_of": "--resubmits",
    "class": "--class",
    "aql": "--aql",
    "rql": "--rql",
    "producer_risk": "--producer-risk",
    "consumer_risk": "--consumer-risk",
    "sample": "--sample",
    "accept": "--accept",
    "method": "--method",
    "seed": "--seed",
    "by": "--by",
    "n": "--sample",
    "containers": "--containers",
    "unit": "UNIT",
    "units": "UNIT",
    "defect": "--defect",
    "note": "--note",
    "reason": "--reason",
    "meaning": "--meaning",
    "secret": "secret",
    "name": "NAME",
    "role": "--role",
    "state": "--state",
    "received_on": "--received",
    "level": "--level",
    "severity": "--severity",
    "table": "--table",
}


# --- shared by the record-keeping command modules ----------------------------------


@contextmanager
def workflow_for(args, options: dict[str, str] | None = None) -> Iterator:
    """Build the services on the store named by ``--db``/``$INSPECTOR_DB`` and
    yield the workflow; turn refusals into one-line errors (exit 2).

    ``options`` names, for this command, the argument behind a workflow field
    where it differs from the lot commands' options (a positional SUPPLIER,
    say)."""
    from inspector.records import StoreError
    from inspector.services import build_services
    from inspector.workflow import WorkflowError

    try:
        services = build_services(getattr(args, "db", None))
    except StoreError as exc:
        raise CommandError(f"--db: {exc}") from None
    try:
        yield services.workflow
    except WorkflowError as exc:
        raise CommandError(_name_option(exc, options)) from None
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    finally:
        services.close()


def _name_option(exc, options: dict[str, str] | None = None) -> str:
    """The workflow's message with its field replaced by our option name."""
    text = str(exc)
    option = (options or {}).get(exc.field) or _OPTION.get(exc.field)
    if option and text.startswith(exc.field + ":"):
        return f"{option}:{text[len(exc.field) + 1:]}"
    return text


def read_secret(args, *, confirm: bool = False, prompt: str = "Secret: ") -> str:
    """The secret from standard input (``--secret-stdin``: one line) or asked
    on the terminal without echo. Never taken from the command line."""
    if getattr(args, "secret_stdin", False):
        line = sys.stdin.readline()
        secret = line[:-1] if line.endswith("\n") else line
        secret = secret[:-1] if secret.endswith("\r") else secret
        if not secret:
            raise UsageError("--secret-stdin: no secret on standard input")
        return secret
    if not sys.stdin.isatty():
        raise UsageError("secret: no terminal to ask on; pass it on standard input with --secret-stdin")
    import getpass

    secret = getpass.getpass(prompt)
    if confirm and getpass.getpass("Same secret again: ") != secret:
        raise UsageError("secret: the two entries differ; nothing was recorded")
    return secret


def _text_arg(text: str) -> str:
    if not text.strip():
        raise argparse.ArgumentTypeError(f"expected some text, got {text!r}")
    return text


def _percent_text(text: str) -> str:
    """A percentage, checked as `percent` does, kept as typed for the record."""
    percent(text)
    return text.strip()


def _probability_text(text: str) -> str:
    open_probability(text)
    return text.strip()


def _seed(text: str):
    from inspector.cli.draw import seed_type

    return seed_type(text)


# --- the command group ---------------------------------------------------------------------


def register(subparsers) -> None:
    lot = subparsers.add_parser(
        "lot",
        help="a lot's record: register, plan, draw, record, decide, release, show, export",
        description="Keep one lot's record, from registration to a signed release.",
    )
    lot.set_defaults(handler=lambda args: lot.print_help())
    sub = lot.add_subparsers(title="lot commands", metavar="WHAT")

    p = sub.add_parser("add", help="register a lot and its physical structure")
    p.add_argument("--id", required=True, type=_text_arg, metavar="ID", help="the lot's ID, e.g. HP-2611-07")
    p.add_argument("--supplier", required=True, type=_text_arg, metavar="S")
    p.add_argument("--product", required=True, type=_text_arg, metavar="P")
    p.add_argument("--size", required=True, type=positive_int, metavar="N", help="number of units (declared quantity)")
    shape = p.add_mutually_exclusive_group()
    shape.add_argument("--structure", metavar="SPEC", help="regular containers, outermost first: "
                       "pallet=18,layer=4,carton=9,jar=24")
    shape.add_argument("--manifest", metavar="FILE", help="CSV: container,units or serial,container")
    p.add_argument("--reference", metavar="DOC", help="purchase order or delivery note")
    p.add_argument("--critical", action="store_true", help="food or safety-critical goods (results are advisory)")
    p.add_argument("--notes", metavar="TEXT", help="free notes about the delivery")
    p.add_argument("--resubmits", "--resubmission-of", dest="resubmission_of", type=_text_arg, metavar="ID",
                   help="the earlier, rejected lot this one resubmits (resubmitted lots do not count in switching)")
    p.add_argument("--received", metavar="DATE", help="date received, YYYY-MM-DD (default: today)")
    p.add_argument("--by", type=_text_arg, metavar="NAME", help="who registers the lot")
    add_json(p)
    p.set_defaults(handler=_add)

    p = sub.add_parser("plan", help="set the sampling plan of a defect class",
                       description="Design the plan from AQL/RQL and risks at the actual lot size, type n and c, "
                                   "or look it up in the code-letter tables (--table --aql A [--level L]) at the "
                                   "severity the switching rules give for the lot's supplier and product.")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("--aql", type=_percent_text, metavar="PCT", help="acceptable quality level, percent")
    p.add_argument("--rql", type=_percent_text, metavar="PCT", help="rejectable quality level, percent")
    p.add_argument("--producer-risk", type=_probability_text, metavar="ALPHA", help="default 0.05")
    p.add_argument("--consumer-risk", type=_probability_text, metavar="BETA", help="default 0.10")
    p.add_argument("--sample", type=positive_int, metavar="n", help="typed plan: sample size")
    p.add_argument("--accept", type=nonnegative_int, metavar="c", help="typed plan: acceptance number")
    p.add_argument("--table", action="store_true", help="look the plan up in the code-letter tables")
    p.add_argument("--level", metavar="L", help="table plan: inspection level (S-1..S-4, I, II, III; default II)")
    p.add_argument("--severity", choices=("normal", "tightened"),
                   help="table plan: enter the severity by hand instead of the switching rules' (recorded as entered)")
    p.add_argument("--class", dest="defect_class", choices=CLASS_CHOICES, default="major",
                   help="defect class (default major)")
    p.add_argument("--by", type=_text_arg, metavar="NAME", help="who sets the plan")
    add_json(p)
    p.set_defaults(handler=_plan)

    p = sub.add_parser("draw", help="draw the sample from a recorded seed")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("--method", choices=METHOD_CHOICES, default="simple", help="default simple")
    p.add_argument("--seed", type=_seed, metavar="S", help="whole number; without it one is generated and recorded")
    p.add_argument("--level", metavar="LEVEL", help="stratified/two-stage: the container level")
    p.add_argument("--containers", type=positive_int, metavar="k", help="two-stage: containers to open")
    p.add_argument("--by", type=_text_arg, metavar="NAME", help="who draws (a person, unlike --by of inspector draw)")
    add_json(p)
    p.set_defaults(handler=_draw)

    for name, helptext in (("record", "record a unit's result"), ("correct", "correct a recorded result")):
        p = sub.add_parser(name, help=helptext)
        p.add_argument("lot_id", metavar="ID")
        p.add_argument("unit", metavar="UNIT", help="unit number, address (3/2/7/14) or serial")
        outcome = p.add_mutually_exclusive_group(required=True)
        outcome.add_argument("--pass", dest="outcome", action="store_const", const="pass")
        outcome.add_argument("--fail", dest="outcome", action="store_const", const="fail")
        p.add_argument("--class", dest="defect_class", choices=CLASS_CHOICES, help="defect class")
        p.add_argument("--defect", metavar="TEXT", help="what is wrong with the unit")
        p.add_argument("--note", metavar="TEXT")
        if name == "correct":
            p.add_argument("--reason", required=True, type=_text_arg, metavar="TEXT", help="why the entry is corrected")
        p.add_argument("--by", required=True, type=_text_arg, metavar="NAME", help="who inspected")
        add_json(p)
        p.set_defaults(handler=_record if name == "record" else _correct)

    p = sub.add_parser("substitute", help="replace a drawn unit that cannot be inspected")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("unit", metavar="UNIT")
    p.add_argument("--reason", required=True, type=_text_arg, metavar="TEXT")
    p.add_argument("--by", required=True, type=_text_arg, metavar="NAME")
    add_json(p)
    p.set_defaults(handler=_substitute)

    p = sub.add_parser("show", help="the lot's record")
    p.add_argument("lot_id", metavar="ID")
    add_json(p)
    p.set_defaults(handler=_show)

    p = sub.add_parser("decide", help="decide from the results")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("--by", type=_text_arg, metavar="NAME", help="who takes the decision (it is computed)")
    add_json(p)
    p.set_defaults(handler=_decide)

    p = sub.add_parser("release", help="release the lot with an approver's signature")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("--by", required=True, type=_text_arg, metavar="NAME", help="the approver signing")
    p.add_argument("--meaning", required=True, type=_text_arg, metavar="TEXT", help='e.g. "released by"')
    p.add_argument("--secret-stdin", action="store_true", help="read the secret from standard input")
    add_json(p)
    p.set_defaults(handler=_release)

    for name, helptext in (("hold", "put a decided lot on hold"), ("reject", "reject a decided or held lot")):
        p = sub.add_parser(name, help=helptext)
        p.add_argument("lot_id", metavar="ID")
        p.add_argument("--reason", required=True, type=_text_arg, metavar="TEXT")
        p.add_argument("--by", required=True, type=_text_arg, metavar="NAME")
        add_json(p)
        p.set_defaults(handler=_hold if name == "hold" else _reject)

    p = sub.add_parser("export", help="a complete copy of the lot with its history")
    p.add_argument("lot_id", metavar="ID")
    p.add_argument("--format", required=True, choices=("csv", "json"))
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="file to write ('-' for standard output)")
    add_json(p)
    p.set_defaults(handler=_export)


# --- handlers ----------------------------------------------------------------------------------


def _read_text_file(path: str, option: str) -> str:
    try:
        with open(path, encoding="utf-8-sig", newline="") as fh:
            return fh.read()
    except UnicodeDecodeError:
        raise UsageError(f"{option}: {path!r} is not UTF-8 text") from None
    except OSError as exc:
        raise UsageError(f"{option}: cannot read {path!r} ({exc.strerror or exc})") from None


def _add(args) -> int:
    manifest_text = _read_text_file(args.manifest, "--manifest") if args.manifest else None
    with workflow_for(args) as wf:
        shown = wf.register_lot(
            lot_id=args.id, supplier=args.supplier, product=args.product, size=args.size,
            structure=args.structure, manifest_text=manifest_text,
            manifest_name=os.path.basename(args.manifest) if args.manifest else None,
            reference=args.reference, critical=args.critical, notes=args.notes,
            resubmission_of=args.resubmission_of, received_on=args.received, by=args.by,
        )
    payload = {k: shown[k] for k in ("id", "state", "supplier", "product", "reference", "size", "received_on",
                                     "critical", "structure", "cautions")}
    emit(args, payload, lambda: "\n".join(
        [f"Registered lot {shown['id']}: {shown['product']} from {shown['supplier']}, {shown['size']} units",
         f"Structure: {shown['structure']}"] + shown["cautions"][:-1]))
    return 0


def _plan(args) -> int:
    if args.table or args.level is not None or args.severity is not None:
        return _table_plan(args)
    risk = args.aql is not None or args.rql is not None or args.producer_risk is not None \
        or args.consumer_risk is not None
    typed = args.sample is not None or args.accept is not None
    if risk and typed:
        raise UsageError("--sample/--accept: give either --aql/--rql (with risks) or --sample/--accept, not both")
    if not risk and not typed:
        raise UsageError("--aql/--rql or --sample/--accept: give one way of choosing the plan")
    if risk and (args.aql is None or args.rql is None):
        raise UsageError(f"{'--aql' if args.aql is None else '--rql'}: --aql and --rql go together")
    if typed and (args.sample is None or args.accept is None):
        raise UsageError(f"{'--sample' if args.sample is None else '--accept'}: --sample and --accept go together")
    options = {}
    if risk:
        options = dict(aql=args.aql, rql=args.rql)
        if args.producer_risk is not None:
            options["producer_risk"] = args.producer_risk
        if args.consumer_risk is not None:
            options["consumer_risk"] = args.consumer_risk
    else:
        options = dict(sample=args.sample, accept=args.accept)
    with workflow_for(args) as wf:
        plan = wf.plan(args.lot_id, defect_class=args.defect_class, by=args.by, **options)

    def text() -> str:
        d = plan["details"]
        rows = [["class", plan["class"]], ["sample size n", str(plan["sample_size"])],
                ["acceptance number Ac", str(plan["accept"])], ["rejection number Re", str(plan["reject"])]]
        if plan["chosen_by"] == "table":
            rows += [["code letter", f"{d['code_letter']} (plan from {d['plan_letter']})"],
                     ["cells", d["provenance"]]]
            if d["pa_at_aql_lot"] is not None:
                rows.append([f"Pa at AQL {plan['aql']} % (this lot)", f"{d['pa_at_aql_lot']:.4f}"])
        elif plan["chosen_by"] == "risk":
            rows += [[f"Pa at AQL {plan['aql']} %", f"{d['pa_at_aql']:.4f}"],
                     [f"Pa at RQL {plan['rql']} %", f"{d['pa_at_rql']:.4f}"]]
            if d["full_inspection"]:
                rows.append(["note", "no smaller plan meets both risks: inspect every unit"])
        else:
            rows.append(["risks at this lot size", d["reading"]])
        if "aoql" in d:
            rows.append(["AOQL", f"{100 * d['aoql']:.3f} %"])
        out = f"Plan for lot {plan['lot']} ({plan['chosen_by']}):\n" + table(rows)
        if d.get("caution"):
            out += "\n" + d["caution"]
        return out

    emit(args, plan, text)
    return 0


def _table_plan(args) -> int:
    if args.rql is not None or args.sample is not None or args.accept is not None \
            or args.producer_risk is not None or args.consumer_risk is not None:
        raise UsageError("--table: a table plan takes --aql only (no --rql, risks, --sample or --accept)")
    if args.aql is None:
        raise UsageError("--aql: a table plan needs --aql")
    level = None
    if args.level is not None:
        from inspector.cli.plan_table import level as level_type

        try:
            level = level_type(args.level)
        except argparse.ArgumentTypeError as exc:
            raise UsageError(f"--level: {exc}") from None
    with workflow_for(args) as wf:
        plan = wf.plan(args.lot_id, defect_class=args.defect_class, aql=args.aql, level=level or "II",
                       severity=args.severity, by=args.by, table=True)
    emit(args, plan, lambda: table_plan_text(plan))
    return 0


def _fraction_text(value) -> str:
    return "—" if value is None else f"{value:.4f}"


def _percent_of(value) -> str:
    return "—" if value is None else f"{100 * value:.2f} %"


def table_plan_text(plan: dict) -> str:
    """A table plan as stored, for people to read."""
    d = plan["details"]
    source = ("from the switching rules" if d.get("severity_source") == "switching rules"
              else f"entered by hand; the rules give {d.get('severity_by_rules')}")
    lines = [
        f"Plan for lot {plan['lot']} from the tables: {plan['class']}, AQL {plan['aql']}, level {plan['level']}",
        f"Severity: {plan['severity']} ({source}); {d.get('table', '')}",
        f"Code letter {d['code_letter']}" + (f" (plan from letter {d['plan_letter']})"
                                             if d["plan_letter"] != d["code_letter"] else "")
        + f": n={plan['sample_size']} Ac={plan['accept']} Re={plan['reject']}"
        + ("  (every unit)" if d["full_inspection"] else "") + f"; cells {d['provenance']}",
    ]
    if plan["accept"] == 0:
        lines.append(f"{plan['class']}: Ac 0 — any nonconforming unit rejects the lot")
    rows = [["Pa at the AQL", _fraction_text(d["pa_at_aql_lot"]), _fraction_text(d["pa_at_aql_process"])],
            ["RQL at consumer's risk 0.10", _percent_of(d["rql_at_consumer_risk_lot"]),
             _percent_of(d["rql_at_consumer_risk_process"])]]
    lines.append(table(rows, header=["", "this lot", "process"], align="lrr"))
    lines += d["notes"]
    if d.get("caution"):
        lines.append(d["caution"])
    return "\n".join(lines)


def _draw(args) -> int:
    with workflow_for(args) as wf:
        drawn = wf.draw(args.lot_id, method=args.method,
                        seed=None if args.seed is None else args.seed.value,
                        seed_text=None if args.seed is None else args.seed.text,
                        level=args.level, containers=args.containers, by=args.by)
        picks = wf.pick_list(args.lot_id)
    payload = {**drawn, "walking_order": picks["stops"]}

    def text() -> str:
        lines = [f"Drew {len(drawn['units'])} units of lot {drawn['lot']} ({drawn['method']}, {drawn['algorithm']}), "
                 f"seed {drawn['seed']}" + ("  (generated and recorded)" if drawn["seed_generated"] else "")]
        if drawn.get("note"):
            lines.append(drawn["note"])
        for cls, sample in drawn["class_samples"].items():
            if sample["sample_size"] != len(drawn["units"]):
                lines.append(f"{cls}: inspect the {sample['sample_size']} units marked {cls[0].upper()} (a random "
                             "subsample of the drawn units)")
        lines.append("Pick list in walking order:")
        marks = {cls: set(s["units"]) for cls, s in drawn["class_samples"].items()
                 if s["sample_size"] != len(drawn["units"])}
        for stop in picks["stops"]:
            lines.append(f"  {stop['container']}:")
            for line in stop["units"]:
                tag = "".join(cls[0].upper() for cls, units in marks.items() if line["unit"] in units)
                lines.append(f"    #{line['unit']}  {line['address']}" + (f"  [{tag}]" if tag else ""))
        return "\n".join(lines)

    emit(args, payload, text)
    return 0


def _outcome_payload(outcome) -> dict:
    return {
        "lot": outcome.lot_id,
        "unit": outcome.unit,
        "entries": list(outcome.entries),
        "classes": list(outcome.classes),
        "outcome": outcome.outcome,
        "state": outcome.state,
        "tally": {k: t.to_dict() for k, t in outcome.tallies.items()},
        "decision": None if outcome.decision is None else {
            "entry": outcome.decision["entry"], "decision": outcome.decision["decision"],
            "curtailed": outcome.decision["curtailed"]},
        "note": outcome.note,
    }


def _outcome_text(outcome, verb: str) -> str:
    lines = [f"{verb} unit {outcome.unit} of lot {outcome.lot_id}: {outcome.outcome} "
             f"({', '.join(outcome.classes)}), entr{'ies' if len(outcome.entries) > 1 else 'y'} "
             f"{', '.join(map(str, outcome.entries))}"]
    for cls, t in outcome.tallies.items():
        lines.append(f"  {cls}: {t.nonconforming} nonconforming in {t.inspected} of {t.sample_size} "
                     f"(Ac {t.accept}, Re {t.reject}), {len(t.open_units)} open")
    if outcome.decision is not None:
        early = " early: the rejection number was reached" if outcome.decision["curtailed"] else ""
        lines.append(f"Lot decided{early}: {outcome.decision['decision'].upper()}")
    if outcome.note:
        lines.append(f"Note: {outcome.note}")
    return "\n".join(lines)


def _record(args) -> int:
    with workflow_for(args) as wf:
        outcome = wf.record(args.lot_id, args.unit, outcome=args.outcome, by=args.by,
                            defect_class=args.defect_class, defect=args.defect, note=args.note)
    emit(args, _outcome_payload(outcome), lambda: _outcome_text(outcome, "Recorded"))
    return 0


def _correct(args) -> int:
    with workflow_for(args) as wf:
        outcome = wf.correct(args.lot_id, args.unit, outcome=args.outcome, reason=args.reason, by=args.by,
                             defect_class=args.defect_class, defect=args.defect, note=args.note)
    emit(args, _outcome_payload(outcome), lambda: _outcome_text(outcome, "Corrected"))
    return 0


def _substitute(args) -> int:
    with workflow_for(args) as wf:
        done = wf.substitute(args.lot_id, args.unit, reason=args.reason, by=args.by)
    emit(args, done, lambda: f"Unit {done['unit']} of lot {done['lot']} replaced by unit {done['substitute']} "
                             f"({done['address']}), entry {done['entry']}: {done['reason']}")
    return 0


def _show(args) -> int:
    with workflow_for(args) as wf:
        shown = wf.show(args.lot_id)
    emit(args, shown, lambda: show_text(shown))
    return 0


def show_text(s: dict) -> str:
    """The lot's record for people to read."""
    lines = [f"Lot {s['id']}  [{s['state']}]",
             f"{s['product']} from {s['supplier']}; {s['size']} units; received {s['received_on']}"
             + (f"; reference {s['reference']}" if s["reference"] else ""),
             f"Structure: {s['structure']}"]
    for caution in s["cautions"]:
        lines.append(f"! {caution}")
    if s["plans"]:
        lines.append("Plans:")
        for cls, p in s["plans"].items():
            how = {"risk": f"AQL {p['aql']} % / RQL {p['rql']} %",
                   "table": f"table, level {p.get('level')}, {p.get('severity')}, AQL {p['aql']}"}.get(
                       p["chosen_by"], "typed")
            if p["chosen_by"] == "table" and (p.get("details") or {}).get("severity_source") == "entered":
                how += " entered by hand"
            lines.append(f"  {cls}: n={p['sample_size']} Ac={p['accept']} Re={p['reject']} ({how}), entry {p['entry']}")
            if p.get("no_allowance"):
                lines.append(f"    {p['allowance']}")
    if s["draw"]:
        d = s["draw"]
        lines.append(f"Draw: {d['method']}, seed {d['seed']}, {d['algorithm']}, {d['sample_size']} units, entry "
                     f"{d['entry']}" + ("" if d["rederived"] else "  (DOES NOT RE-DERIVE)"))
        for sub in d["substitutes"]:
            lines.append(f"  unit {sub['unit']} replaced by {sub['substitute']}: {sub['reason']} ({sub['by']})")
        lines.append("Sample units: " + ", ".join(map(str, s["sample_units"])))
    if s["results"]:
        lines.append("Results (every entry; corrections point at the entry they correct):")
        for r in s["results"]:
            extra = f"  corrects {r['corrects']}: {r['reason']}" if "corrects" in r else ""
            defect = f"  {r['defect']}" if r["defect"] else ""
            old = "" if r["current"] else "  (superseded)"
            lines.append(f"  {r['entry']:>5}  unit {r['unit']:<7} {r['class']:<8} {r['outcome']:<4}{defect}  "
                         f"{r['by']}  {r['at']}{extra}{old}")
    if s["classes"]:
        lines.append("Tally:")
        for cls, t in s["classes"].items():
            lines.append(f"  {cls}: {t['nonconforming']} nonconforming in {t['inspected']} of {t['sample_size']} "
                         f"(Ac {t['accept']}, Re {t['reject']}), {t['open']} open"
                         + (f" -> {t['verdict']}" if t["verdict"] else ""))
    if s["decision"]:
        dd = s["decision_detail"]
        lines.append(f"Decision: {s['decision'].upper()}" + (" (early: curtailed sample)" if dd["curtailed"] else "")
                     + f", entry {dd['entry']} at {dd['at']}")
        if not dd["matches_results"]:
            lines.append("  ! the results were corrected since: the decision no longer matches them")
    for cls, e in (s["estimate"] or {}).items():
        if e:
            lines.append(f"Estimate ({cls}): {e['point_defectives']:.1f} nonconforming units; with "
                         f"{100 * e['confidence']:g} % confidence at most {e['upper_bound_defectives']}")
            if e["label"]:
                lines.append(f"  ({e['label']})")
    for d in s["dispositions"]:
        lines.append(f"Disposition: {d['disposition']}" + (f": {d['reason']}" if d["reason"] else "")
                     + f" ({d['by']}, {d['at']})")
    for sig in s["signatures"]:
        lines.append(f"Signed: {sig['meaning']}: {sig['printed_name']}, {sig['at']}, record {sig['record_hash'][:16]}"
                     + ("  CHANGED SINCE SIGNED" if sig["changed_since_signed"] else ""))
    if s["failed_attempts"]:
        lines.append(f"Failed attempts: {len(s['failed_attempts'])}")
    lines.append(f"Record hash: {s['record_hash']}")
    return "\n".join(lines)


def _decide(args) -> int:
    with workflow_for(args) as wf:
        decided = wf.decide(args.lot_id, by=args.by)
    payload = {"decision": decided["decision"], "entry": decided["entry"], "curtailed": decided["curtailed"],
               "already_decided": bool(decided.get("already")), "redecided": bool(decided.get("redecided")),
               "classes": decided["evidence"].get("classes"), "estimate": decided["evidence"].get("estimates")}

    def text() -> str:
        head = f"Decision: {decided['decision'].upper()}"
        if decided["curtailed"]:
            head += " (early: the rejection number was reached; the sample is curtailed)"
        if decided.get("already"):
            head += f"  (decided earlier, entry {decided['entry']})"
        lines = [head]
        for cls, t in (decided["evidence"].get("classes") or {}).items():
            lines.append(f"  {cls}: {t['nonconforming']} nonconforming in {t['inspected']} of {t['sample_size']} "
                         f"(Ac {t['accept']}, Re {t['reject']})")
        if decided.get("already") and not decided.get("matches_results", True):
            lines.append("  ! the results were corrected since and no longer match this decision")
        return "\n".join(lines)

    emit(args, payload, text)
    return 0


def _release(args) -> int:
    secret = read_secret(args)
    with workflow_for(args) as wf:
        released = wf.release(args.lot_id, by=args.by, meaning=args.meaning, secret=secret)
    sig = released["signature"]
    emit(args, released, lambda: f"Lot {released['lot']} released. Signed: {sig['meaning']}: {sig['printed_name']}, "
                                 f"{sig['at']}; record hash {sig['record_hash']}")
    return 0


def _hold(args) -> int:
    with workflow_for(args) as wf:
        done = wf.hold(args.lot_id, reason=args.reason, by=args.by)
    emit(args, done, lambda: f"Lot {done['lot']} on hold: {done['reason']} ({done['by']})")
    return 0


def _reject(args) -> int:
    with workflow_for(args) as wf:
        done = wf.reject(args.lot_id, reason=args.reason, by=args.by)
    emit(args, done, lambda: f"Lot {done['lot']} rejected: {done['reason']} ({done['by']})")
    return 0


# --- export -----------------------------------------------------------------------------------------

CSV_COLUMNS = ("entry", "kind", "at", "by", "unit", "address", "entered_as", "class", "outcome", "defect", "note",
               "corrects", "reason", "summary", "data", "hash")
# A spreadsheet runs a cell starting with one of these as a formula.
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def neutralise(value) -> str:
    """A CSV cell that no spreadsheet will run: text starting with = + - @,
    a tab or a carriage return gets a leading apostrophe. Everything else is
    written exactly as recorded (a code 000123 stays 000123)."""
    import json

    if value is None:
        return ""
    if isinstance(value, bool):
        text = "true" if value else "false"
    elif isinstance(value, (dict, list)):
        text = json.dumps(value, sort_keys=True, ensure_ascii=False)
    else:
        text = str(value)
    if text.startswith(_FORMULA_START):
        return "'" + text
    return text


def export_csv(report: dict) -> str:
    """The lot's history as CSV: a lot header block, then one row per entry."""
    import csv
    import io

    out = io.StringIO()
    writer = csv.writer(out)
    writer.writerow(["lot", report["id"]])
    for key in ("supplier", "product", "reference", "size", "received_on", "structure", "critical", "state",
                "decision", "record_hash"):
        writer.writerow([key, neutralise(report[key])])
    writer.writerow(["changed_since_signed", neutralise(report["changed_since_signed"])])
    writer.writerow(["chain_verified", neutralise(report["chain"]["verified"])])
    for caution in report["cautions"]:
        writer.writerow(["caution", neutralise(caution)])
    writer.writerow([])
    writer.writerow(CSV_COLUMNS)
    for item in report["history"]:
        writer.writerow([neutralise(item.get(column)) for column in CSV_COLUMNS])
    return out.getvalue()


def _export(args) -> int:
    import json

    target = args.output
    if target != "-":
        directory = os.path.dirname(os.path.abspath(target))
        if not os.path.isdir(directory):
            raise UsageError(f"--output: directory {directory!r} does not exist")
        if os.path.isdir(target):
            raise UsageError(f"--output: {target!r} is a directory")
    with workflow_for(args) as wf:
        report = wf.export(args.lot_id)
    if args.format == "json":
        text = json.dumps(report, sort_keys=True, ensure_ascii=False, indent=1, allow_nan=False) + "\n"
    else:
        text = export_csv(report)
    if target == "-":
        sys.stdout.write(text)
        return 0
    encoding = "utf-8-sig" if args.format == "csv" else "utf-8"  # the mark lets spreadsheets read UTF-8
    temporary = f"{target}.part"
    try:
        with open(temporary, "w", encoding=encoding, newline="") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(temporary, target)
    except OSError as exc:
        raise CommandError(f"--output: cannot write {target!r} ({exc.strerror or exc})") from None
    payload = {"lot": report["id"], "format": args.format, "file": target, "entries": len(report["history"]),
               "chain_verified": report["chain"]["verified"]}
    emit(args, payload, lambda: f"Wrote {len(report['history'])} entries of lot {report['id']} to {target} "
                                f"({args.format}).")
    return 0
