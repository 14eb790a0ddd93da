"""An invented demo lot for looking at the sheets, the tests and the benchmark.

Harrowgate Preserves ships apricot jam in 370 g jars to Ravensholt Cold
Store (both invented). ``demo_sheet_data()`` builds the view model directly:
the draw and pick list from ``inspector.frame``, the plans' risks and the
estimates from ``inspector.stats``; the bench results are made up.
"""

from __future__ import annotations

import hashlib
from fractions import Fraction

from inspector.sheets.build import draw_command, plan_figures, stops_from_pick_list
from inspector.sheets.model import (
    SheetClassOutcome,
    SheetCorrection,
    SheetData,
    SheetDecision,
    SheetDraw,
    SheetEstimate,
    SheetLot,
    SheetResult,
    SheetSignature,
    SheetSubstitution,
)

INSPECTORS = ("Zoë Ødegård", "Łukasz Wróbel", "山田 花子")
DEFECTS = (
    "lid not vacuum-sealed (button raised)",
    "label skewed > 5 mm",
    "fill below 370 g declared",
    "chipped rim",
    "batch code illegible",
)


def demo_sheet_data(
    *,
    lot_id: str = "HP-2611-07",
    structure: str = "pallet=18,layer=4,carton=9,unit=24",
    method: str = "stratified",
    seed: int = 20250603,
    critical: bool = True,
    major_plan: tuple[int, int] | None = None,
    found: dict[str, int] | None = None,
    supplier: str = "Harrowgate Preserves",
    product: str = "apricot jam 370 g jar",
    signed: bool = True,
) -> SheetData:
    """A complete, decided demo lot.

    ``major_plan`` (n, c) types the major plan; by default it is designed
    for AQL 1.5 % / RQL 10 %. ``found`` gives the nonconforming count per
    class (default: critical 0, major 2, minor 3).
    """
    from inspector import frame
    from inspector.stats.design import design_plan
    from inspector.stats.estimate import estimate_defectives

    lot_structure = frame.parse_structure(structure)
    N = lot_structure.size
    found = {"critical": 0, "major": 2, "minor": 3} if found is None else found

    plans = []
    if major_plan is None:
        d = design_plan(lot_size=N, aql=Fraction(3, 2), rql=Fraction(10), producer_risk=Fraction(5, 100),
                        consumer_risk=Fraction(10, 100))
        major = plan_figures(
            defect_class="major", lot_size=N, sample_size=d.sample_size, acceptance=d.acceptance_number,
            source="design",
            source_text="designed for AQL 1.5 % at producer's risk 0.05 and RQL 10 % at consumer's risk 0.10",
            aql=Fraction(3, 2), rql=Fraction(10), producer_risk=Fraction(5, 100), consumer_risk=Fraction(1, 10),
        )
    else:
        major = plan_figures(
            defect_class="major", lot_size=N, sample_size=major_plan[0], acceptance=major_plan[1],
            source="typed", source_text="typed as n and c",
        )
    n = major.sample_size
    if "critical" in found:
        plans.append(plan_figures(defect_class="critical", lot_size=N, sample_size=n, acceptance=0,
                                  source="typed", source_text="typed as n and c (zero acceptance)"))
    plans.append(major)
    if "minor" in found:
        plans.append(plan_figures(defect_class="minor", lot_size=N, sample_size=n,
                                  acceptance=max(major.acceptance + 2, 2),
                                  source="typed", source_text="typed as n and c"))

    drawn = frame.draw(lot_structure, n, method=method, seed=seed)
    drawn = frame.substitute(lot_structure, drawn, drawn.units[5], "jar broken in transit, glass in carton")
    picks = frame.pick_list(lot_structure, drawn)
    stops = stops_from_pick_list(picks)
    units = [u for s in stops for u in s.units]
    addresses = {u.unit: u.address for u in units}

    results = []
    stamp = "2025-06-03T{h:02d}:{m:02d}:00+01:00"
    # Spread the nonconforming units over the sample (every 7th unit, by class).
    offset = 3
    bad: dict[str, list[int]] = {}
    for cls, k in found.items():
        picks_ = [units[(offset + 7 * i) % len(units)].unit for i in range(k)]
        offset += 2
        bad[cls] = picks_
    for i, u in enumerate(units):
        for cls in (p.defect_class for p in plans):
            fail = u.unit in bad.get(cls, ())
            results.append(
                SheetResult(
                    unit=u.unit, defect_class=cls, outcome="fail" if fail else "pass",
                    address=addresses[u.unit],
                    defect=DEFECTS[(u.unit + len(cls)) % len(DEFECTS)] if fail else None,
                    note="photographed; kept aside <tag 4> & sealed" if fail else None,
                    by=INSPECTORS[i % len(INSPECTORS)],
                    at=stamp.format(h=9 + (i // 60) % 8, m=i % 60),
                )
            )
    corrections = ()
    if bad.get("minor"):
        corrections = (
            SheetCorrection(unit=bad["minor"][0], defect_class="minor", was="pass",
                            now=f"fail ({DEFECTS[(bad['minor'][0] + 5) % len(DEFECTS)]})",
                            reason="re-checked under the bench lamp: label skew missed at first look",
                            by=INSPECTORS[1], at="2025-06-03T11:42:00+01:00"),
        )
    outcomes = []
    estimates = []
    for p in plans:
        x = found.get(p.defect_class, 0)
        outcomes.append(SheetClassOutcome(
            defect_class=p.defect_class, inspected=p.sample_size, nonconforming=x,
            acceptance=p.acceptance, rejection=p.rejection,
            result="reject" if x >= p.rejection else "accept",
        ))
        e = estimate_defectives(lot_size=N, sample_size=p.sample_size, found=x)
        estimates.append(SheetEstimate(
            defect_class=p.defect_class, lot_size=N, sample_size=p.sample_size, found=x,
            confidence=Fraction(95, 100), point=e.point_defectives, lower=e.lower_defectives,
            upper=e.upper_defectives, upper_bound=e.upper_bound_defectives,
        ))
    accepted = all(o.result == "accept" for o in outcomes)
    decision = SheetDecision(
        decision="accept" if accepted else "reject",
        decided_by=INSPECTORS[0],
        decided_at="2025-06-03T15:10:00+01:00",
        disposition="release" if accepted else "hold",
        disposition_reason=None if accepted else "supplier asked to sort at their cost; awaiting reply",
        disposition_by="Márta Kovács-Ó'Brien" if accepted else INSPECTORS[1],
        disposition_at="2025-06-03T16:02:00+01:00",
    )
    signatures = (
        SheetSignature(printed_name="Márta Kovács-Ó'Brien", meaning="Released by",
                       at="2025-06-03T16:02:00+01:00"),
    ) if signed and accepted else ()
    sub = drawn.substitutions[0]
    sheet_draw = SheetDraw(
        method=drawn.method, method_title=drawn.title, algorithm=drawn.algorithm, seed=str(drawn.seed),
        lot_size=N, sample_size=n,
        command=draw_command(lot_size=N, sample_size=n, method=drawn.method, seed=str(drawn.seed),
                             structure_spec=lot_structure.to_text(), by=drawn.level),
        level=drawn.level, note=drawn.note, frame=drawn.frame,
        substitutions=(SheetSubstitution(replaced=sub.replaced, substitute=sub.substitute, reason=sub.reason,
                                         by=INSPECTORS[2], at="2025-06-03T08:55:00+01:00"),),
        by=INSPECTORS[0], at="2025-06-03T08:40:00+01:00",
    )
    lot = SheetLot(
        lot_id=lot_id, supplier=supplier, product=product, quantity=N, received_on="2025-06-03",
        reference="PO 77-1043 / delivery note DN-55812", structure=lot_structure.describe(),
        critical=critical, notes="Trailer reefer log shows 4 °C throughout; seals intact <ok>.",
        state="released" if signatures else "decided",
        record_hash=hashlib.sha256(f"demo record {lot_id} {seed}".encode()).hexdigest(),
    )
    return SheetData(
        lot=lot, draw=sheet_draw, stops=stops, plans=tuple(plans), outcomes=tuple(outcomes),
        results=tuple(results), corrections=corrections, decision=decision, estimates=tuple(estimates),
        signatures=signatures,
    )


def large_demo_sheet_data(*, sample: int = 1250, acceptance: int = 21, **kwargs) -> SheetData:
    """A large lot: 20 pallets x 5 layers x 14 cartons x 25 units (35 000),
    a typed major plan with ``sample`` units."""
    kwargs.setdefault("lot_id", "HP-2611-19")
    kwargs.setdefault("structure", "pallet=20,layer=5,carton=14,unit=25")
    kwargs.setdefault("found", {"major": 9, "minor": 14})
    return demo_sheet_data(major_plan=(sample, acceptance), **kwargs)
