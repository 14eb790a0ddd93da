"""Building the sheets' view model from a lot's record.

``sheet_model_from_record(record, pick_list=...)`` reads the dictionaries
the workflow service returns (:meth:`Workflow.show` for the record,
:meth:`Workflow.pick_list` for the units in walking order) and returns a
:class:`~inspector.sheets.model.SheetData`. It decides nothing: the
effective results, each class's verdict, the decision and the estimate are
the workflow's. The plan's risk figures come from ``inspector.stats.plans``
(:func:`plan_figures`), the same functions the plan was made with.
"""

from __future__ import annotations

import shlex
from decimal import Decimal
from fractions import Fraction
from typing import Any, Mapping

from inspector.sheets.model import (
    SheetClassOutcome,
    SheetCorrection,
    SheetData,
    SheetDecision,
    SheetDraw,
    SheetEstimate,
    SheetLot,
    SheetPlan,
    SheetResult,
    SheetSignature,
    SheetStop,
    SheetSubstitution,
    SheetUnit,
)

__all__ = [
    "draw_command",
    "plan_figures",
    "sheet_model_for_lot",
    "sheet_model_from_record",
    "stops_from_pick_list",
]

CLASS_ORDER = ("critical", "major", "minor")

# Method words of the frame, for lots whose record does not carry the title.
_METHOD_TITLES = {
    "simple": "simple random sample without replacement",
    "stratified": "stratified sample, proportional allocation",
    "two-stage": "two-stage sample, containers by size then equal units in each",
    "with-replacement": "simple random sample WITH replacement, for non-destructive re-checks only",
}


def _exact(value) -> Fraction | None:
    if value is None:
        return None
    if isinstance(value, Fraction):
        return value
    if isinstance(value, str):
        return Fraction(Decimal(value.strip()))
    if isinstance(value, float):
        return Fraction(repr(value))
    return Fraction(value)


def plan_figures(
    *,
    defect_class: str,
    lot_size: int,
    sample_size: int,
    acceptance: int,
    source: str,
    source_text: str,
    aql=None,
    rql=None,
    producer_risk=None,
    consumer_risk=None,
) -> SheetPlan:
    """One class's plan with its exact risks at the actual lot size.

    With ``aql``/``rql`` (percent, exact): Pa at D1 = floor(N AQL / 100) and
    at D2 = ceil(N RQL / 100), as the plan design uses them. Without them (a
    plan typed as n and c): the plan's own quality levels, the largest D
    with Pa >= 0.95 and the smallest D with Pa <= 0.10. With an AQL only (a
    code-letter table plan): the plan's own RQL beside it. AOQL from
    ``plans.aoql_lot``. All from ``inspector.stats``.
    """
    from inspector.stats import plans
    from inspector.stats.design import defectives_at

    N, n, c = lot_size, sample_size, acceptance
    aql_pct, rql_pct = _exact(aql), _exact(rql)
    own = aql_pct is None and rql_pct is None
    if own:
        d1 = plans.aql_lot(N, n, c, Fraction(95, 100))
        d2 = plans.rql_lot(N, n, c, Fraction(10, 100))
        aql_pct = Fraction(100 * d1, N)
        rql_pct = None if d2 is None else Fraction(100 * d2, N)
    else:
        d1 = None if aql_pct is None else defectives_at(N, aql_pct, round_up=False)
        d2 = None if rql_pct is None else defectives_at(N, rql_pct, round_up=True)
    rql_own = not own and rql_pct is None
    if rql_own:
        # A table plan states only its AQL: show where this plan's Pa falls
        # to 0.10 at this lot size, as its own RQL.
        d2 = plans.rql_lot(N, n, c, Fraction(10, 100))
        rql_pct = None if d2 is None else Fraction(100 * d2, N)
    pa1 = None if d1 is None else float(plans.pa_lot(N, n, c, int(d1)))
    pa2 = None if d2 is None else float(plans.pa_lot(N, n, c, int(d2)))
    if n < N:
        aoql, aoql_at = plans.aoql_lot(N, n, c)
    else:
        aoql, aoql_at = 0.0, 0
    return SheetPlan(
        defect_class=defect_class,
        source=source,
        source_text=source_text,
        lot_size=N,
        sample_size=n,
        acceptance=c,
        rejection=c + 1,
        aql_percent=aql_pct,
        rql_percent=rql_pct,
        aql_defectives=None if d1 is None else int(d1),
        rql_defectives=None if d2 is None else int(d2),
        pa_at_aql=pa1,
        pa_at_rql=pa2,
        aoql=float(aoql),
        aoql_defectives=int(aoql_at),
        producer_risk=_exact(producer_risk),
        consumer_risk=_exact(consumer_risk),
        own_levels=own,
        rql_own=rql_own and d2 is not None,
    )


def _position(address: str) -> str:
    return address.rsplit(" / ", 1)[-1]


def stops_from_pick_list(pick, classes_of: Mapping[int, tuple[str, ...]] | None = None) -> tuple[SheetStop, ...]:
    """Walking-order stops from a frame :class:`~inspector.frame.PickList`
    or the workflow's ``pick_list`` dictionary."""
    classes_of = classes_of or {}
    out = []
    if isinstance(pick, Mapping):
        for stop in pick["stops"]:
            units = tuple(
                SheetUnit(
                    unit=int(u["unit"]),
                    address=str(u["address"]),
                    position=_position(str(u["address"])),
                    serial=u.get("serial"),
                    times=int(u.get("times", 1)),
                    replaces=u.get("replaces"),
                    reason=u.get("reason"),
                    classes=classes_of.get(int(u["unit"]), ()),
                )
                for u in stop["units"]
            )
            out.append(SheetStop(container=str(stop["container"]), units=units))
        return tuple(out)
    for stop in pick.stops:
        units = tuple(
            SheetUnit(
                unit=line.unit,
                address=str(line.address),
                position=_position(str(line.address)),
                serial=line.address.serial,
                times=line.times,
                replaces=line.replaces,
                reason=line.reason,
                classes=classes_of.get(line.unit, ()),
            )
            for line in stop.lines
        )
        out.append(SheetStop(container=stop.container, units=units))
    return tuple(out)


def draw_command(
    *,
    lot_size: int,
    sample_size: int,
    method: str,
    seed: str,
    structure_spec: str | None = None,
    manifest: str | None = None,
    by: str | None = None,
    containers: int | None = None,
) -> str:
    """The ``inspector draw`` command line that re-derives a recorded draw.

    ``structure_spec`` is the regular structure (``pallet=18,...``) or None
    for a flat count; ``manifest`` the manifest file's name for a lot
    registered from a manifest.
    """
    args = ["inspector", "draw"]
    if manifest is not None:
        args += ["--manifest", manifest, "--lot-size", str(lot_size)]
    elif structure_spec:
        args += ["--structure", structure_spec, "--lot-size", str(lot_size)]
    else:
        args += ["--lot-size", str(lot_size)]
    args += ["--sample", str(sample_size)]
    if method != "simple":
        args += ["--method", method]
    if by:
        args += ["--by", by]
    if containers is not None:
        args += ["--containers", str(containers)]
    args += ["--seed", str(seed)]
    return shlex.join(args)


def _source_text(plan: Mapping[str, Any]) -> tuple[str, str]:
    chosen = plan.get("chosen_by")
    details = plan.get("details") or {}
    if chosen == "risk":
        alpha = plan.get("producer_risk") or "0.05"
        beta = plan.get("consumer_risk") or "0.10"
        return "design", (
            f"designed for AQL {plan.get('aql')} % at producer's risk {alpha} and RQL {plan.get('rql')} % "
            f"at consumer's risk {beta}, exact at this lot size"
        )
    if chosen == "table":
        bits = ["code-letter table (MIL-STD-105E)"]
        letter = details.get("code_letter")
        if letter:
            bits.append(f"code letter {letter}")
        if plan.get("level"):
            bits.append(f"level {plan['level']}")
        if plan.get("severity"):
            bits.append(f"{plan['severity']} inspection")
        if plan.get("aql") is not None:
            bits.append(f"AQL {plan['aql']} %")
        return "table", ", ".join(bits)
    return "typed", "typed as n and c"


def sheet_model_from_record(record: Mapping[str, Any], *, pick_list: Mapping[str, Any] | None = None) -> SheetData:
    """The view model of one lot from the workflow's record (``show``) and
    its pick list (``pick_list``; without it the sheets list no units)."""
    N = int(record["size"])
    lot = SheetLot(
        lot_id=record["id"],
        supplier=record["supplier"],
        product=record["product"],
        quantity=N,
        received_on=record["received_on"],
        reference=record.get("reference"),
        structure=record.get("structure"),
        critical=bool(record.get("critical")),
        notes=record.get("notes"),
        state=record.get("state"),
        record_hash=record.get("record_hash"),
    )

    plans = []
    for cls in CLASS_ORDER:
        p = (record.get("plans") or {}).get(cls)
        if p is None:
            continue
        source, text = _source_text(p)
        typed = source == "typed"
        plans.append(
            plan_figures(
                defect_class=cls,
                lot_size=N,
                sample_size=int(p["sample_size"]),
                acceptance=int(p["accept"]),
                source=source,
                source_text=text,
                aql=None if typed else p.get("aql"),
                rql=None if typed else p.get("rql"),
                producer_risk=p.get("producer_risk"),
                consumer_risk=p.get("consumer_risk"),
            )
        )

    draw = None
    d = record.get("draw")
    if d is not None:
        spec = record.get("structure_spec")
        manifest = None
        if spec and spec.startswith("manifest"):
            manifest = spec[len("manifest"):].strip() or "MANIFEST.csv"
            spec = None
        notes = [x for x in (d.get("note"), d.get("subsample_note")) if x]
        containers = tuple(str(x.get("container", x)) if isinstance(x, Mapping) else str(x)
                           for x in d.get("containers") or ())
        draw = SheetDraw(
            method=d["method"],
            method_title=d.get("title") or _METHOD_TITLES.get(d["method"], d["method"]),
            algorithm=d["algorithm"],
            seed=str(d["seed"]),
            lot_size=N,
            sample_size=int(d["sample_size"]),
            command=draw_command(
                lot_size=N,
                sample_size=int(d["sample_size"]),
                method=d["method"],
                seed=str(d["seed"]),
                structure_spec=spec,
                manifest=manifest,
                by=d.get("level"),
                containers=d.get("container_count"),
            ),
            level=d.get("level"),
            containers=containers,
            per_container=d.get("per_container"),
            note=" ".join(notes) or None,
            frame=d.get("frame"),
            substitutions=tuple(
                SheetSubstitution(
                    replaced=int(s["unit"]), substitute=int(s["substitute"]), reason=s["reason"],
                    by=s.get("by"), at=s.get("at"),
                )
                for s in d.get("substitutes") or ()
            ),
            at=d.get("at"),
        )

    classes_of: dict[int, tuple[str, ...]] = {}
    samples = (d or {}).get("class_samples") if d else None
    if samples and len({len(v.get("units", ())) for v in samples.values()}) > 1:
        for cls in CLASS_ORDER:
            for u in (samples.get(cls) or {}).get("units", ()):
                classes_of[int(u)] = classes_of.get(int(u), ()) + (cls,)
    stops = stops_from_pick_list(pick_list, classes_of) if pick_list is not None else ()

    entries = {r["entry"]: r for r in record.get("results") or ()}
    results = tuple(
        SheetResult(
            unit=int(r["unit"]),
            defect_class=r["class"],
            outcome=r["outcome"],
            address=r.get("address"),
            defect=r.get("defect"),
            note=r.get("note"),
            by=r.get("by"),
            at=r.get("at"),
        )
        for r in record.get("results") or ()
        if r.get("current", True)
    )

    def describe(r: Mapping[str, Any]) -> str:
        return r["outcome"] + (f" ({r['defect']})" if r.get("defect") else "")

    corrections = tuple(
        SheetCorrection(
            unit=int(r["unit"]),
            defect_class=r["class"],
            was=describe(entries[r["corrects"]]) if r["corrects"] in entries else f"entry {r['corrects']}",
            now=describe(r),
            reason=r.get("reason") or "(no reason recorded)",
            by=r.get("by"),
            at=r.get("at"),
        )
        for r in record.get("results") or ()
        if r.get("corrects") is not None
    )

    outcomes = tuple(
        SheetClassOutcome(
            defect_class=cls,
            inspected=int(t["inspected"]),
            nonconforming=int(t["nonconforming"]),
            acceptance=int(t["accept"]),
            rejection=int(t["reject"]),
            # Before the draw the workflow's tally has no open units and reads
            # as complete; nothing has been inspected, so the sheet says open.
            result=(t.get("verdict") or "open") if d is not None else "open",
        )
        for cls in CLASS_ORDER
        if (t := (record.get("classes") or {}).get(cls)) is not None
    )

    estimates = tuple(
        SheetEstimate(
            defect_class=cls,
            lot_size=N,
            sample_size=int(e["sample_size"]),
            found=int(e["found"]),
            confidence=_exact(e["confidence"]),
            point=float(e["point_defectives"]),
            lower=int(e["lower_defectives"]),
            upper=int(e["upper_defectives"]),
            upper_bound=int(e["upper_bound_defectives"]),
            curtailed=bool(e.get("curtailed")),
        )
        for cls in CLASS_ORDER
        if (e := (record.get("estimate") or {}).get(cls))
    )

    detail = record.get("decision_detail") or {}
    dispositions = record.get("dispositions") or []
    last = dispositions[-1] if dispositions else {}
    decision = SheetDecision(
        decision=record.get("decision"),
        curtailed=bool(detail.get("curtailed")),
        decided_at=detail.get("at"),
        decided_by=detail.get("by"),
        disposition=last.get("disposition"),
        disposition_reason=last.get("reason"),
        disposition_by=last.get("by"),
        disposition_at=last.get("at"),
    )

    signatures = tuple(
        SheetSignature(
            printed_name=s["printed_name"],
            meaning=s["meaning"],
            at=s["at"],
            changed_since_signed=bool(s.get("changed_since_signed")),
        )
        for s in record.get("signatures") or ()
    )

    return SheetData(
        lot=lot,
        draw=draw,
        stops=stops,
        plans=tuple(plans),
        outcomes=outcomes,
        results=results,
        corrections=corrections,
        decision=decision,
        estimates=estimates,
        signatures=signatures,
    )


def sheet_model_for_lot(workflow, lot_id: str) -> SheetData:
    """Load lot ``lot_id`` through the workflow service and build its model."""
    record = workflow.show(lot_id)
    pick = workflow.pick_list(lot_id) if record.get("draw") is not None else None
    return sheet_model_from_record(record, pick_list=pick)
