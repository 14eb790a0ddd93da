"""`inspector estimate`: the lot's nonconforming count from a sample result."""

from __future__ import annotations

from fractions import Fraction

from inspector.cli._common import (
    UsageError,
    add_json,
    emit,
    nonnegative_int,
    open_probability,
    percent,
    positive_int,
    table,
)


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "estimate",
        help="estimate the lot's nonconforming count with exact bounds",
        description=(
            "Point estimate N x / n, exact two-sided interval and one-sided upper "
            "bound for the nonconforming units in the lot (hypergeometric)."
        ),
    )
    p.add_argument("--lot-size", type=positive_int, required=True, metavar="N")
    p.add_argument("--sample", type=positive_int, required=True, metavar="n")
    p.add_argument("--found", type=nonnegative_int, required=True, metavar="x", help="nonconforming units found")
    p.add_argument("--confidence", type=open_probability, default=Fraction(95, 100), metavar="C", help="default 0.95")
    p.add_argument("--aql", type=percent, metavar="PCT", help="with --rql: evidence against both quality levels")
    p.add_argument("--rql", type=percent, metavar="PCT")
    add_json(p)
    p.set_defaults(handler=_estimate)


def _estimate(args) -> int:
    N, n, x = args.lot_size, args.sample, args.found
    if n > N:
        raise UsageError(f"argument --sample: {n} exceeds --lot-size {N}")
    if x > n:
        raise UsageError(f"argument --found: {x} exceeds --sample {n}")
    if (args.aql is None) != (args.rql is None):
        raise UsageError("--aql and --rql go together: give both or neither")
    if args.aql is not None:
        if args.aql >= args.rql:
            raise UsageError(f"argument --aql: {float(args.aql):g} must be below --rql {float(args.rql):g}")
        if args.rql == 0:
            raise UsageError("argument --rql: must be above 0, got 0")
    from inspector.stats.estimate import estimate_defectives, evidence

    e = estimate_defectives(lot_size=N, sample_size=n, found=x, confidence=args.confidence)
    payload = {
        "lot_size": N,
        "sample_size": n,
        "found": x,
        **e.bounds(),
    }
    ev = None
    if args.aql is not None:
        ev = evidence(lot_size=N, sample_size=n, found=x, aql=args.aql, rql=args.rql)
        payload.update(
            {
                "aql": float(args.aql),
                "rql": float(args.rql),
                "defectives_at_aql": ev.defectives_at_aql,
                "defectives_at_rql": ev.defectives_at_rql,
                "p_value_at_aql": ev.p_value_at_aql,
                "p_value_at_rql": ev.p_value_at_rql,
                "reading": ev.reading,
            }
        )

    def text() -> str:
        c = f"{100 * e.confidence:g} %"
        rows = [
            ["found", f"{x} nonconforming in a sample of {n} from a lot of {N}"],
            ["point estimate", f"{e.point_defectives:.6g} units ({100 * e.point_fraction:.4g} %)"],
            [
                f"{c} interval",
                f"{e.lower_defectives} to {e.upper_defectives} units "
                f"({100 * e.lower_fraction:.4g} % to {100 * e.upper_fraction:.4g} %)",
            ],
            [
                f"{c} upper bound",
                f"at most {e.upper_bound_defectives} units ({100 * e.upper_bound_fraction:.4g} %)",
            ],
        ]
        if ev is not None:
            rows.append([f"P(>= {x} found | lot at AQL)", f"{ev.p_value_at_aql:.4g}"])
            rows.append([f"P(<= {x} found | lot at RQL)", f"{ev.p_value_at_rql:.4g}"])
        out = table(rows)
        if ev is not None:
            out += "\n" + ev.reading
        return out + "\nSampling gives evidence about the lot, never proof that every unit is good."

    emit(args, payload, text)
    return 0
