"""Designing a single sampling plan from a contract's AQL and RQL risks.

Given a lot of N units, quality levels AQL < RQL (percent nonconforming)
and risks alpha (producer's) and beta (consumer's), find the smallest sample
size n, and for it the smallest acceptance number c, with

    Pa(AQL) >= 1 - alpha   and   Pa(RQL) <= beta    (both inclusive).

Lot model: D1 = floor(N AQL / 100), D2 = ceil(N RQL / 100), computed
exactly from the percentages as typed. Because Pa falls as D grows, the
conditions then hold for every lot with at most D1 (at least D2)
nonconforming units.

Search (exact, not heuristic): for each c = 0, 1, ... let n_c be the
smallest n with Pa(D2; n, c) <= beta (Pa falls as n grows, so a galloping
bisection finds it). For that c no larger n can help (Pa(D1) also falls
with n), and n_c does not decrease with c; so the first c whose n_c also
meets Pa(D1; n_c, c) >= 1 - alpha gives the smallest n, and no smaller c
meets both at that n. When n_c reaches N first, no plan with n < N exists
and the lot must be inspected 100 %.

Process model: the same search on the binomial with p1 = AQL/100 and
p2 = RQL/100; n may exceed the lot size (then the tool says to inspect all).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from inspector.stats import _search
from inspector.stats import hypergeom as hg
from inspector.stats import plans

__all__ = ["PlanDesign", "design_plan", "zero_acceptance_sample_size", "as_fraction", "defectives_at"]

MODELS = ("lot", "process")

# The binomial search is unbounded in n; stop at a size no inspection
# department would draw, with a clear error instead of looping.
_PROCESS_MAX_N = 10**8


@dataclass(frozen=True, kw_only=True)
class PlanDesign:
    """The designed plan and its risks (probabilities are fractions in [0, 1])."""

    model: str
    lot_size: int
    sample_size: int
    acceptance_number: int
    full_inspection: bool
    pa_at_aql: float
    pa_at_rql: float
    aoql: float
    aoql_at: float  # D (lot model) or p (process model) where AOQ peaks
    ati_at_aql: float
    ati_at_rql: float
    defectives_at_aql: int | None  # D1 (lot model)
    defectives_at_rql: int | None  # D2 (lot model)

    @property
    def rejection_number(self) -> int:
        return self.acceptance_number + 1


def as_fraction(value, name: str) -> Fraction:
    """Exact value of a number as typed: '1.5' -> 3/2, 0.1 (float) -> 1/10."""
    if isinstance(value, Fraction):
        return value
    if isinstance(value, bool):
        raise TypeError(f"{name} must be a number, got {value!r}")
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ValueError(f"{name} must be finite, got {value!r}")
        return Fraction(repr(value))  # the shortest decimal that reads back as value
    try:
        return Fraction(value)
    except (TypeError, ValueError):
        raise ValueError(f"{name} must be a number, got {value!r}") from None


def defectives_at(N: int, percent: Fraction, *, round_up: bool) -> int:
    """N * percent / 100 rounded down (AQL) or up (RQL), exactly."""
    v = N * Fraction(percent) / 100
    return math.ceil(v) if round_up else math.floor(v)


def _check_common(lot_size, aql, rql, producer_risk, consumer_risk, model):
    if model not in MODELS:
        raise ValueError(f"model must be one of {', '.join(MODELS)}, got {model!r}")
    N = plans._whole("lot_size", lot_size, 1)
    aql = as_fraction(aql, "aql")
    rql = as_fraction(rql, "rql")
    alpha = as_fraction(producer_risk, "producer_risk")
    beta = as_fraction(consumer_risk, "consumer_risk")
    if not 0 <= aql < 100:
        raise ValueError(f"aql must be a percentage in [0, 100), got {float(aql):g}")
    if not 0 < rql <= 100:
        raise ValueError(f"rql must be a percentage in (0, 100], got {float(rql):g}")
    if aql >= rql:
        raise ValueError(f"aql ({float(aql):g}) must be below rql ({float(rql):g})")
    if not 0 < alpha < 1:
        raise ValueError(f"producer_risk must lie strictly between 0 and 1, got {float(alpha):g}")
    if not 0 < beta < 1:
        raise ValueError(f"consumer_risk must lie strictly between 0 and 1, got {float(beta):g}")
    return N, aql, rql, alpha, beta


def design_plan(
    *,
    lot_size: int,
    aql,
    rql,
    producer_risk=Fraction(1, 20),
    consumer_risk=Fraction(1, 10),
    model: str = "lot",
) -> PlanDesign:
    """Smallest single plan (n, c) meeting both risks; see the module doc.

    Parameters
    ----------
    lot_size : int, at least 1.
    aql, rql : percentages as typed (str, Decimal, Fraction, int or float;
        floats are read as their shortest decimal), 0 <= aql < rql <= 100.
    producer_risk, consumer_risk : alpha and beta in (0, 1), exact likewise.
    model : ``"lot"`` (hypergeometric, default) or ``"process"`` (binomial).

    Notes
    -----
    Comparisons at the boundary are exact: a Pa that equals beta (or
    1 - alpha) as a rational number meets the condition. Lot model: when no
    n < N works, ``full_inspection`` is True, n = N, and c = D1 (with every
    unit inspected the lot is accepted exactly when it holds at most D1
    nonconforming units).
    """
    N, aql, rql, alpha, beta = _check_common(
        lot_size, aql, rql, producer_risk, consumer_risk, model
    )
    if model == "lot":
        return _design_lot(N, aql, rql, alpha, beta)
    return _design_process(N, aql, rql, alpha, beta)


def _design_lot(N, aql, rql, alpha, beta) -> PlanDesign:
    D1 = defectives_at(N, aql, round_up=False)
    D2 = defectives_at(N, rql, round_up=True)
    accept_goal = 1 - alpha
    beta_f = float(beta)

    def pa(D: int, n: int, c: int) -> float:
        return hg.tails_scalar(c, N, D, n)[0]

    found = None
    n_prev = 1
    for c in range(0, D2):
        if c + 1 >= N:
            break

        def meets_rql(n: int, c=c):
            value = pa(D2, n, c)
            ok = _search.compare(value, beta, lambda: _search.exact_lot_cdf(c, N, D2, n)) <= 0
            return ok, _log_ratio(value, beta_f)

        lo = max(c + 1, n_prev)
        guess = _guess_n(c, beta_f, D2 / N, N)
        n_c = _search.smallest_true(meets_rql, lo, N, guess)
        if n_c >= N:
            break
        n_prev = n_c
        ok = _search.compare(
            pa(D1, n_c, c), accept_goal, lambda: _search.exact_lot_cdf(c, N, D1, n_c)
        )
        if ok >= 0:
            found = (n_c, c)
            break
    if found is None:
        return PlanDesign(
            model="lot",
            lot_size=N,
            sample_size=N,
            acceptance_number=D1,
            full_inspection=True,
            pa_at_aql=1.0,
            pa_at_rql=0.0,
            aoql=0.0,
            aoql_at=0,
            ati_at_aql=float(N),
            ati_at_rql=float(N),
            defectives_at_aql=D1,
            defectives_at_rql=D2,
        )
    n, c = found
    pa1, rej1 = hg.tails_scalar(c, N, D1, n)
    pa2, rej2 = hg.tails_scalar(c, N, D2, n)
    aoql, aoql_at = plans.aoql_lot(N, n, c)
    return PlanDesign(
        model="lot",
        lot_size=N,
        sample_size=n,
        acceptance_number=c,
        full_inspection=False,
        pa_at_aql=pa1,
        pa_at_rql=pa2,
        aoql=aoql,
        aoql_at=aoql_at,
        ati_at_aql=n + rej1 * (N - n),
        ati_at_rql=n + rej2 * (N - n),
        defectives_at_aql=D1,
        defectives_at_rql=D2,
    )


def _design_process(N, aql, rql, alpha, beta) -> PlanDesign:
    p1, p2 = aql / 100, rql / 100
    p1f, p2f = float(p1), float(p2)
    accept_goal = 1 - alpha
    beta_f = float(beta)

    def pa(p: float, n: int, c: int) -> float:
        return hg.binom_tails_scalar(c, n, p)[0]

    n_prev = 1
    c = 0
    while True:

        def meets_rql(n: int, c=c):
            value = pa(p2f, n, c)
            ok = _search.compare(value, beta, lambda: _search.exact_binom_cdf(c, n, p2)) <= 0
            return ok, _log_ratio(value, beta_f)

        lo = max(c + 1, n_prev)
        guess = max(lo, _guess_n(c, beta_f, p2f, None))
        hi = max(guess, lo)
        while not meets_rql(hi)[0]:
            hi *= 2
            if hi > _PROCESS_MAX_N:
                raise ValueError(
                    "no process-model plan below 10^8 units: aql and rql are too close"
                )
        n_c = _search.smallest_true(meets_rql, lo, hi, guess)
        n_prev = n_c
        if (
            _search.compare(pa(p1f, n_c, c), accept_goal, lambda: _search.exact_binom_cdf(c, n_c, p1))
            >= 0
        ):
            break
        c += 1
    n = n_c
    pa1, pa2 = pa(p1f, n, c), pa(p2f, n, c)
    aoql, p_at = plans.aoql_process(N, n, c)
    inspected = min(n, N)
    return PlanDesign(
        model="process",
        lot_size=N,
        sample_size=n,
        acceptance_number=c,
        full_inspection=n >= N,
        pa_at_aql=pa1,
        pa_at_rql=pa2,
        aoql=aoql,
        aoql_at=p_at,
        ati_at_aql=inspected + (1 - pa1) * (N - inspected),
        ati_at_rql=inspected + (1 - pa2) * (N - inspected),
        defectives_at_aql=None,
        defectives_at_rql=None,
    )


def _log_ratio(value: float, target: float) -> float:
    """log(value / target), the interpolation score of the searches."""
    return math.log(value / target) if value > 0 else -math.inf


def _guess_n(c: int, beta: float, p2: float, N: int | None) -> int:
    """Start for the n_c search: Poisson n p2 = lambda_c, finite-lot corrected."""
    lam = plans.poisson_mean_for(c, beta)
    n_inf = lam / max(p2, 1e-300)
    if N is None:
        return max(1, int(n_inf))
    return max(1, int(n_inf * N / (N + n_inf)))


def zero_acceptance_sample_size(*, lot_size: int, rql, confidence, model: str = "lot") -> int:
    """Smallest n with P(X = 0 | D2) <= 1 - confidence (accept on zero found).

    Lot model: D2 = ceil(N RQL / 100) and P(X = 0) = C(N - D2, n) / C(N, n);
    the answer is at most N - D2 + 1 (then a nonconforming unit must be
    drawn). Process model: the smallest n with (1 - p)^n <= 1 - confidence,
    i.e. n = ceil(ln(1 - C) / ln(1 - p)), decided exactly at ties.
    """
    if model not in MODELS:
        raise ValueError(f"model must be one of {', '.join(MODELS)}, got {model!r}")
    N = plans._whole("lot_size", lot_size, 1)
    rql = as_fraction(rql, "rql")
    conf = as_fraction(confidence, "confidence")
    if not 0 < rql <= 100:
        raise ValueError(f"rql must be a percentage in (0, 100], got {float(rql):g}")
    if not 0 < conf < 1:
        raise ValueError(f"confidence must lie strictly between 0 and 1, got {float(conf):g}")
    target = 1 - conf
    if model == "process":
        p = rql / 100
        if p == 1:
            return 1
        guess = max(1, int(math.log(float(target)) / math.log1p(-float(p))))

        def ok_p(n: int) -> bool:
            value = math.exp(n * math.log1p(-float(p)))
            return _search.compare(value, target, lambda: (1 - p) ** n) <= 0

        hi = max(guess, 1)
        while not ok_p(hi):
            hi *= 2
        return _search.smallest_true(ok_p, 1, hi, guess)
    D2 = defectives_at(N, rql, round_up=True)
    hi = N - D2 + 1

    def ok(n: int) -> bool:
        value = hg.tails_scalar(0, N, D2, n)[0]
        return _search.compare(value, target, lambda: _search.exact_lot_cdf(0, N, D2, n)) <= 0

    guess = int(math.log(float(target)) / math.log1p(-D2 / N)) if D2 < N else 1
    guess = max(1, int(guess * N / (N + guess)))
    return _search.smallest_true(ok, 1, hi, guess)
