"""The exact risks of a plan looked up in the code-letter tables.

The tables were built for a continuing process (binomial view); an
inspector applies the plan to one finite lot. For a looked-up plan this
module gives both views side by side:

* ``pa_at_aql_lot``: Pa for a lot holding D1 = floor(N * AQL / 100)
  nonconforming units (hypergeometric, exact), the rounding plan design
  uses; the AQL is taken exactly as typed, so floor() sees no binary
  rounding;
* ``pa_at_aql_process``: Pa for a process at p = AQL / 100 (binomial);
* ``rql_at_consumer_risk_lot``: the smallest D / N with Pa <= the
  consumer's risk (0.10 by default);
* ``rql_at_consumer_risk_process``: the p solving Pa(p) = the consumer's risk.

"Materially different" means the two Pa differ by more than
``PA_MATERIAL`` (0.02) absolute, or the two RQLs by more than
``RQL_MATERIAL`` (10 %) relative to the process RQL. Both thresholds are
our own choice: 0.02 is a visible change in the producer's risk of a plan
meant to accept about 90-99 % of lots at the AQL, and 10 % of the RQL is a
difference a buyer would want to know about.

AQLs above 10: the tables then speak of defects per hundred units, not
percent nonconforming units (common practice; the standard's convention).
A fraction nonconforming "p = AQL / 100" would be meaningless at 150 and
above and misleading below, so for those AQLs the four figures are not
computed (``None``) and a note says why; the plan itself is still given.

With 100 % inspection (the plan's sample size reaches the lot size) the
lot decision is exact: a lot with at most Ac nonconforming units is
accepted for certain, one with more rejected for certain. The lot figures
are then 1 or 0 and (Ac + 1) / N, without a hypergeometric call; the
process figures use the binomial with n = N.

The numerics are those of :mod:`inspector.stats.plans`.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from inspector.stats.tables import TablePlan, aql_fraction

__all__ = ["PA_MATERIAL", "RQL_MATERIAL", "TablePlanRisks", "table_plan_risks"]

PA_MATERIAL = 0.02
RQL_MATERIAL = 0.10
_DEFECTS_ONLY_ABOVE = Fraction(10)


@dataclass(frozen=True, kw_only=True)
class TablePlanRisks:
    """Pa at the AQL and RQL at the consumer's risk, lot and process models.

    Probabilities and RQLs are fractions in [0, 1] (``None`` when not
    defined: see the module notes). ``aql_defectives`` is D1 and
    ``rql_defectives`` the lot-model RQL in units. ``differ_materially``
    is True when the two models differ by the thresholds above.
    """

    consumer_risk: float
    aql_defectives: int | None
    rql_defectives: int | None
    pa_at_aql_lot: float | None
    pa_at_aql_process: float | None
    rql_at_consumer_risk_lot: float | None
    rql_at_consumer_risk_process: float | None
    differ_materially: bool
    notes: tuple[str, ...]


def _pct(x: float) -> str:
    return f"{100 * x:.3g} %"


def table_plan_risks(plan: TablePlan, *, consumer_risk=Fraction(1, 10)) -> TablePlanRisks:
    """The exact risks of a looked-up plan at its lot size and AQL.

    ``consumer_risk`` (beta) is a probability strictly between 0 and 1;
    pass a Fraction or decimal text for exact tie-breaking.
    Raises ValueError naming ``consumer_risk`` when it is out of range.
    """
    from inspector.stats import plans  # numpy lives behind this import

    beta = Fraction(consumer_risk) if not isinstance(consumer_risk, float) else Fraction(repr(consumer_risk))
    if not 0 < beta < 1:
        raise ValueError(f"consumer_risk must lie strictly between 0 and 1, got {consumer_risk!r}")
    N, n, c = plan.lot_size, plan.sample_size, plan.acceptance_number
    aql = aql_fraction(plan.aql) * 100  # in percent, exact

    if aql > _DEFECTS_ONLY_ABOVE:
        return TablePlanRisks(
            consumer_risk=float(beta), aql_defectives=None, rql_defectives=None,
            pa_at_aql_lot=None, pa_at_aql_process=None,
            rql_at_consumer_risk_lot=None, rql_at_consumer_risk_process=None,
            differ_materially=False,
            notes=(
                f"AQL {plan.aql} is above 10: the table reads it as defects per hundred units, "
                "not percent nonconforming units, so the lot and process risks (which count "
                "nonconforming units) are not computed for it.",
            ),
        )

    p = aql / 100
    d1 = (N * aql) // 100  # floor(N * AQL / 100), exact
    notes: list[str] = []

    if c >= n:  # the plan cannot reject the lot: every Pa is 1
        pa_lot = pa_proc = 1.0
        rql_d = None
        rql_lot = rql_proc = None
        notes.append(
            f"The plan accepts with up to {c} nonconforming in a sample of {n}: it cannot reject the lot, "
            "so no RQL exists."
        )
    elif plan.full_inspection:
        # Every unit is inspected: the count found is D itself.
        pa_lot = 1.0 if d1 <= c else 0.0
        rql_d = c + 1 if c + 1 <= N else None
        rql_lot = None if rql_d is None else rql_d / N
        pa_proc = float(plans.pa_process(n, c, float(p)))
        rql_proc = plans.rql_process(n, c, beta)
        notes.append(
            f"Every unit is inspected, so the lot decision is exact: a lot with "
            f"{'no nonconforming unit' if c == 0 else f'at most {c} nonconforming units'} is accepted, "
            f"one with {c + 1} or more rejected. The process figures say how often lots "
            "made at that rate would be accepted."
        )
    else:
        pa_lot = float(plans.pa_lot(N, n, c, d1))
        pa_proc = float(plans.pa_process(n, c, float(p)))
        rql_d = plans.rql_lot(N, n, c, beta)
        rql_lot = None if rql_d is None else rql_d / N
        rql_proc = plans.rql_process(n, c, beta)

    if d1 == 0 and aql > 0:
        notes.append(
            f"At lot size {N}, {plan.aql} % of the lot is less than one unit (floor({N} x {plan.aql} / 100) = 0), "
            "so the lot model's Pa at the AQL is that of a lot with no nonconforming units."
        )

    material = False
    if pa_lot is not None and pa_proc is not None and abs(pa_lot - pa_proc) > PA_MATERIAL:
        material = True
    if rql_lot is not None and rql_proc and abs(rql_lot - rql_proc) / rql_proc > RQL_MATERIAL:
        material = True
    if material:
        rql_text = (
            f"; RQL at consumer's risk {float(beta):g}: {_pct(rql_lot)} of this lot against {_pct(rql_proc)} for the process"
            if rql_lot is not None and rql_proc is not None else ""
        )
        notes.append(
            f"At lot size {N} the finite-lot figures differ materially from the process figures the table "
            f"was built on: Pa at the AQL {pa_lot:.3f} for this lot against {pa_proc:.3f} for the process{rql_text}."
        )
    return TablePlanRisks(
        consumer_risk=float(beta),
        aql_defectives=int(d1),
        rql_defectives=rql_d,
        pa_at_aql_lot=pa_lot,
        pa_at_aql_process=pa_proc,
        rql_at_consumer_risk_lot=rql_lot,
        rql_at_consumer_risk_process=None if rql_proc is None else float(rql_proc),
        differ_materially=material,
        notes=tuple(notes),
    )
