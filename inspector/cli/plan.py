"""`inspector plan ...`: design a plan, show its OC curve, size a zero-acceptance plan."""

from __future__ import annotations

from fractions import Fraction

from inspector.cli._common import (
    UsageError,
    add_json,
    emit,
    int_list,
    nonnegative_int,
    open_probability,
    percent,
    positive_int,
    table,
)


def register(subparsers) -> None:
    plan = subparsers.add_parser("plan", help="design a sampling plan or show its risks")
    plan.set_defaults(handler=lambda args: plan.print_help())
    sub = plan.add_subparsers(title="plan commands", metavar="WHAT")

    design = sub.add_parser(
        "design",
        help="smallest single plan meeting AQL/RQL risks at this lot size",
        description=(
            "Smallest sample size n, then smallest acceptance number c, with "
            "Pa(AQL) >= 1 - producer's risk and Pa(RQL) <= consumer's risk."
        ),
    )
    design.add_argument("--lot-size", type=positive_int, required=True, metavar="N")
    design.add_argument("--aql", type=percent, required=True, metavar="PCT", help="acceptable quality level, percent")
    design.add_argument("--rql", type=percent, required=True, metavar="PCT", help="rejectable quality level, percent")
    design.add_argument("--producer-risk", type=open_probability, default=Fraction(5, 100), metavar="ALPHA", help="default 0.05")
    design.add_argument("--consumer-risk", type=open_probability, default=Fraction(10, 100), metavar="BETA", help="default 0.10")
    design.add_argument("--model", choices=("lot", "process"), default="lot", help="lot: exact finite lot (default); process: binomial")
    add_json(design)
    design.set_defaults(handler=_design)

    oc = sub.add_parser(
        "oc",
        help="OC curve, AOQ and ATI of a single or double plan",
        description="Exact finite-lot OC curve. A double plan adds --reject, --sample2 and --accept2.",
    )
    oc.add_argument("--lot-size", type=positive_int, required=True, metavar="N")
    oc.add_argument("--sample", type=positive_int, required=True, metavar="n", help="sample size (first sample of a double plan)")
    oc.add_argument("--accept", type=nonnegative_int, required=True, metavar="c", help="acceptance number (first sample)")
    oc.add_argument("--defectives", type=int_list, metavar="D1,D2,...", help="nonconforming counts in the lot to evaluate")
    oc.add_argument("--reject", type=positive_int, metavar="r1", help="double plan: rejection number on the first sample")
    oc.add_argument("--sample2", type=positive_int, metavar="n2", help="double plan: second sample size")
    oc.add_argument("--accept2", type=nonnegative_int, metavar="c2", help="double plan: acceptance number on both samples")
    add_json(oc)
    oc.set_defaults(handler=_oc)

    zero = sub.add_parser(
        "zero",
        help="sample size for accept-on-zero at a confidence",
        description="Smallest n with P(no nonconforming found | lot at the RQL) <= 1 - confidence.",
    )
    zero.add_argument("--lot-size", type=positive_int, required=True, metavar="N")
    zero.add_argument("--rql", type=percent, required=True, metavar="PCT")
    zero.add_argument("--confidence", type=open_probability, default=Fraction(95, 100), metavar="C", help="default 0.95")
    zero.add_argument("--model", choices=("lot", "process"), default="lot")
    add_json(zero)
    zero.set_defaults(handler=_zero)

    # The code-letter table route lives in its own module.
    from inspector.cli import plan_table

    plan_table.register(sub)


def _pct(value: Fraction) -> str:
    return f"{float(value):g} %"


def _design(args) -> int:
    if args.rql == 0:
        raise UsageError("argument --rql: must be above 0, got 0")
    if args.aql >= 100:
        raise UsageError(f"argument --aql: must be below 100, got {float(args.aql):g}")
    if args.aql >= args.rql:
        raise UsageError(
            f"argument --aql: {float(args.aql):g} must be below --rql {float(args.rql):g}"
        )
    from inspector.stats.design import design_plan

    try:
        d = design_plan(
            lot_size=args.lot_size,
            aql=args.aql,
            rql=args.rql,
            producer_risk=args.producer_risk,
            consumer_risk=args.consumer_risk,
            model=args.model,
        )
    except ValueError as exc:
        raise UsageError(str(exc)) from None
    notes = []
    if d.full_inspection:
        if d.model == "lot":
            notes.append(
                f"No plan with fewer than {d.lot_size} units meets both risks: inspect every unit "
                f"and accept with at most {d.acceptance_number} nonconforming."
            )
        else:
            notes.append(
                f"The process-model plan asks for {d.sample_size} units, at least the lot size "
                f"{d.lot_size}: inspect every unit."
            )
    payload = {
        "model": d.model,
        "lot_size": d.lot_size,
        "aql": float(args.aql),
        "rql": float(args.rql),
        "producer_risk": float(args.producer_risk),
        "consumer_risk": float(args.consumer_risk),
        "sample_size": d.sample_size,
        "acceptance_number": d.acceptance_number,
        "rejection_number": d.rejection_number,
        "full_inspection": d.full_inspection,
        "pa_at_aql": d.pa_at_aql,
        "pa_at_rql": d.pa_at_rql,
        "aoql": d.aoql,
        "ati_at_aql": d.ati_at_aql,
        "ati_at_rql": d.ati_at_rql,
        "notes": notes,
    }
    if d.model == "lot":
        payload["defectives_at_aql"] = d.defectives_at_aql
        payload["defectives_at_rql"] = d.defectives_at_rql
        payload["aoql_defectives"] = int(d.aoql_at)
    else:
        payload["aoql_fraction"] = float(d.aoql_at)

    def text() -> str:
        model = "exact finite lot (hypergeometric)" if d.model == "lot" else "process (binomial)"
        rows = [
            ["lot size", f"{d.lot_size}"],
            ["model", model],
            ["sample size n", f"{d.sample_size}"],
            ["acceptance number Ac", f"{d.acceptance_number}"],
            ["rejection number Re", f"{d.rejection_number}"],
            [f"Pa at AQL {_pct(args.aql)}", f"{d.pa_at_aql:.4f}  (need >= {1 - float(args.producer_risk):g})"],
            [f"Pa at RQL {_pct(args.rql)}", f"{d.pa_at_rql:.4f}  (need <= {float(args.consumer_risk):g})"],
            ["AOQL", f"{100 * d.aoql:.4f} %"],
            ["ATI at AQL / RQL", f"{d.ati_at_aql:.1f} / {d.ati_at_rql:.1f} units"],
        ]
        if d.model == "lot":
            rows.insert(2, ["nonconforming at AQL / RQL", f"{d.defectives_at_aql} / {d.defectives_at_rql} units"])
        return table(rows) + "".join(f"\n{note}" for note in notes)

    emit(args, payload, text)
    return 0


def _oc(args) -> int:
    N, n, c = args.lot_size, args.sample, args.accept
    double_args = (args.reject, args.sample2, args.accept2)
    is_double = any(v is not None for v in double_args)
    if is_double and any(v is None for v in double_args):
        raise UsageError("a double plan needs all of --reject, --sample2 and --accept2")
    if n > N:
        raise UsageError(f"argument --sample: {n} exceeds --lot-size {N}")
    if c >= n:
        raise UsageError(f"argument --accept: {c} must be below --sample {n}")
    if args.defectives is not None:
        bad = [d for d in args.defectives if not 0 <= d <= N]
        if bad:
            raise UsageError(f"argument --defectives: {bad[0]} is outside 0..{N} (the lot size)")
    from inspector.stats import plans

    if is_double:
        plan = plans.DoublePlan(n1=n, c1=c, r1=args.reject, n2=args.sample2, c2=args.accept2)
        try:
            plans.check_double(N, plan)
        except ValueError as exc:
            raise UsageError(_double_message(str(exc))) from None
        defectives = args.defectives or _default_defectives(N, n, args.accept2)
        curve = plans.oc_double(N, plan, defectives)
        aoql, aoql_at = plans.aoql_double(N, plan)
    else:
        defectives = args.defectives or _default_defectives(N, n, c)
        curve = plans.oc_single(N, n, c, defectives)
        aoql, aoql_at = plans.aoql_lot(N, n, c)
    points = []
    for i in range(len(curve.defectives)):
        point = {
            "defectives": int(curve.defectives[i]),
            "fraction": float(curve.fraction[i]),
            "pa": float(curve.pa[i]),
            "aoq": float(curve.aoq[i]),
            "ati": float(curve.ati[i]),
        }
        if curve.asn is not None:
            point["asn"] = float(curve.asn[i])
        points.append(point)
    payload = {
        "lot_size": N,
        "plan": (
            {"type": "double", "n1": n, "c1": c, "r1": args.reject, "n2": args.sample2, "c2": args.accept2}
            if is_double
            else {"type": "single", "sample_size": n, "acceptance_number": c, "rejection_number": c + 1}
        ),
        "points": points,
        "aoql": aoql,
        "aoql_defectives": aoql_at,
    }
    if not is_double:
        d95 = plans.aql_lot(N, n, c, Fraction(95, 100))
        d10 = plans.rql_lot(N, n, c, Fraction(10, 100))
        payload["fraction_at_pa_95"] = d95 / N
        payload["fraction_at_pa_10"] = None if d10 is None else d10 / N

    def text() -> str:
        header = ["D", "fraction %", "Pa", "AOQ %", "ATI"] + (["ASN"] if is_double else [])
        rows = []
        for p in points:
            row = [
                str(p["defectives"]),
                f"{100 * p['fraction']:.4g}",
                f"{p['pa']:.6f}",
                f"{100 * p['aoq']:.4f}",
                f"{p['ati']:.1f}",
            ]
            if is_double:
                row.append(f"{p['asn']:.1f}")
            rows.append(row)
        if is_double:
            title = f"Double plan n1={n} c1={c} r1={args.reject}; n2={args.sample2} c2={args.accept2}; lot of {N}"
        else:
            title = f"Single plan n={n} Ac={c} Re={c + 1}; lot of {N}"
        foot = f"AOQL {100 * aoql:.4f} % at D = {aoql_at}"
        if not is_double:
            foot += (
                f"; Pa = 0.95 up to {100 * payload['fraction_at_pa_95']:.4g} % nonconforming"
                + (
                    f", Pa <= 0.10 from {100 * payload['fraction_at_pa_10']:.4g} %"
                    if payload["fraction_at_pa_10"] is not None
                    else ""
                )
            )
        return title + "\n" + table(rows, header, "rrrrrr") + "\n" + foot

    emit(args, payload, text)
    return 0


def _double_message(text: str) -> str:
    # Map the engine's argument names onto the command's options.
    for engine, option in (
        ("n1 + n2", "--sample + --sample2"),
        ("r1 (first rejection number)", "--reject"),
        ("c2 (second acceptance number)", "--accept2"),
        ("c1", "--accept"),
        ("n1", "--sample"),
    ):
        text = text.replace(engine, option)
    return text


def _default_defectives(N: int, n: int, c: int) -> list[int]:
    """21 evenly spaced D from 0 to about where Pa falls to 0.001."""
    from inspector.stats import plans

    top = plans.rql_lot(N, n, c, Fraction(1, 1000)) or N
    top = min(N, max(top, c + 1))
    return sorted({round(i * top / 20) for i in range(21)})


def _zero(args) -> int:
    if args.rql == 0:
        raise UsageError("argument --rql: must be above 0, got 0")
    from inspector.stats import hypergeom as hg
    from inspector.stats.design import defectives_at, zero_acceptance_sample_size

    n = zero_acceptance_sample_size(
        lot_size=args.lot_size, rql=args.rql, confidence=args.confidence, model=args.model
    )
    payload = {
        "model": args.model,
        "lot_size": args.lot_size,
        "rql": float(args.rql),
        "confidence": float(args.confidence),
        "sample_size": n,
        "acceptance_number": 0,
        "rejection_number": 1,
    }
    if args.model == "lot":
        D2 = defectives_at(args.lot_size, args.rql, round_up=True)
        payload["defectives_at_rql"] = D2
        payload["pa_at_rql"] = hg.tails_scalar(0, args.lot_size, D2, min(n, args.lot_size))[0]
    else:
        payload["pa_at_rql"] = (1 - float(args.rql) / 100) ** n
    payload["full_inspection"] = n >= args.lot_size

    def text() -> str:
        lines = [
            f"Inspect {n} units and accept only if none is nonconforming:",
            f"a lot at {float(args.rql):g} % nonconforming passes with probability "
            f"{payload['pa_at_rql']:.4f} (at most {1 - float(args.confidence):g}).",
        ]
        if args.model == "lot":
            lines.append(
                f"Lot model: {args.lot_size} units, {payload['defectives_at_rql']} nonconforming at the RQL."
            )
        return "\n".join(lines)

    emit(args, payload, text)
    return 0
